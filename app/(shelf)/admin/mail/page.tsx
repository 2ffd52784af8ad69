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
          {messages.map((m) => (
            <li key={m.id} className="panel" data-testid="mail-message" data-to={m.envelopeTo.join(',')}>
              <header className="grid grid-cols-[7rem_1fr] gap-x-3 gap-y-0.5 border-b border-rule px-4 py-3 text-sm">
                <span className="field-label">Subject</span>
                <span className="font-medium">{m.subject || '(no subject)'}</span>
                <span className="field-label">To</span>
                <span>{m.envelopeTo.join(', ')}</span>
                <span className="field-label">From</span>
                <span>{m.fromHeader ?? m.envelopeFrom ?? '—'}</span>
                <span className="field-label">Received</span>
                <time className="num text-xs" dateTime={m.receivedAt}>
                  {m.receivedAt.replace('T', ' ').slice(0, 19)} UTC
                </time>
              </header>
              <pre className="whitespace-pre-wrap px-4 py-3 font-sans text-sm">
                {m.textBody ? <TextWithLinks text={m.textBody} /> : '(no plain-text part)'}
              </pre>
            </li>
          ))}
        </ol>
      )}
    </>
  );
}
