import type { Metadata } from 'next';
import { Fragment } from 'react';
import { requirePageRole } from '@/lib/auth';
import { listOutbox } from '@/lib/mail/outbox';
import { PageHeader } from '@/components/shell/PageHeader';

export const metadata: Metadata = { title: 'Admin › Mail' };

const URL_PATTERN = /(https?:\/\/[^\s<>"]+)/g;

/** Plain text with its links made clickable; nothing else from the message is interpreted. */
function TextWithLinks({ text }: { text: string }) {
  const pieces = text.split(URL_PATTERN);
  return (
    <>
      {pieces.map((piece, i) =>
        i % 2 === 1 ? (
          <a key={i} href={piece} className="break-all">
            {piece}
          </a>
        ) : (
          <Fragment key={i}>{piece}</Fragment>
        ),
      )}
    </>
  );
}

export default async function MailPage() {
  await requirePageRole('admin');
  const messages = await listOutbox();
  return (
    <>
      <PageHeader
        title="Admin › Mail"
        lead="Every message Modeshelf has sent. Mail goes to the local capture server and is kept here; nothing leaves this machine."
      />
      {messages.length === 0 ? (
        <section className="panel max-w-3xl p-6">
          <h2 className="text-base font-semibold">No mail yet</h2>
          <p className="mt-2 text-sm text-graphite-soft">
            Invitations and password reset links will appear here as soon as they are sent. Invite someone on Admin ›
            People to see one.
          </p>
        </section>
      ) : (
        <ol className="space-y-4" aria-label="Captured mail">
          {messages.map((m, index) => (
            <li key={m.id} className="panel" data-testid="mail-message" data-to={m.envelopeTo.join(',')}>
              {/* The newest few open; older ones fold to their subject line. */}
              <details open={index < 5}>
                <summary className="flex cursor-pointer flex-wrap items-baseline gap-x-4 px-4 py-2 text-sm">
                  <span className="font-medium">{m.subject || '(no subject)'}</span>
                  <span className="text-graphite-soft">to {m.envelopeTo.join(', ')}</span>
                  <time className="num ml-auto text-xs text-graphite-soft" dateTime={m.receivedAt}>
                    {m.receivedAt.replace('T', ' ').slice(0, 19)} UTC
                  </time>
                </summary>
                <div className="grid grid-cols-[7rem_1fr] gap-x-3 gap-y-0.5 border-t border-rule px-4 py-2 text-sm">
                  <span className="field-label">From</span>
                  <span>{m.fromHeader ?? m.envelopeFrom ?? '—'}</span>
                  <span className="field-label">To</span>
                  <span>{m.envelopeTo.join(', ')}</span>
                </div>
                <pre className="whitespace-pre-wrap border-t border-rule px-4 py-3 font-sans text-sm">
                  {m.textBody ? <TextWithLinks text={m.textBody} /> : '(no plain-text part)'}
                </pre>
              </details>
            </li>
          ))}
        </ol>
      )}
    </>
  );
}
