// The local fake SMTP server: accepts any message on loopback and files it into the outbox table. It never
// relays. scripts/fake-smtp.ts runs it beside the app; integration tests start their own on a free port.
import { SMTPServer } from 'smtp-server';
import type { Knex } from 'knex';
import { parseMessage } from '@/lib/mail/mime';

export interface FakeSmtp {
  port: number;
  close(): Promise<void>;
}

const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

export async function storeMessage(
  knex: Knex,
  raw: Buffer,
  envelope: { from: string | null; to: string[] },
): Promise<number> {
  const parsed = await parseMessage(raw);
  const [row] = await knex('outbox')
    .insert({
      envelope_from: envelope.from,
      envelope_to: envelope.to,
      message_id: parsed.messageId,
      from_header: parsed.from,
      to_header: parsed.to,
      subject: parsed.subject,
      text_body: parsed.text,
      html_body: parsed.html,
      raw: raw.toString('utf8'),
    })
    .returning('id');
  return Number(row.id);
}

export function startFakeSmtp(knex: Knex, port: number, host = '127.0.0.1'): Promise<FakeSmtp> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Modeshelf fake SMTP: messages are captured, never delivered',
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('error', callback);
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          callback(Object.assign(new Error('Message exceeds the 10 MiB limit'), { responseCode: 552 }));
          return;
        }
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : null;
        const to = session.envelope.rcptTo.map((r) => r.address);
        storeMessage(knex, Buffer.concat(chunks), { from, to }).then(
          () => callback(),
          (err: Error) => {
            console.error('[fake-smtp] could not store message', err);
            callback(Object.assign(new Error('Could not store the message'), { responseCode: 451 }));
          },
        );
      });
    },
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => {
      const address = server.server.address();
      const actualPort = typeof address === 'object' && address ? address.port : port;
      resolve({
        port: actualPort,
        close: () => new Promise<void>((done) => server.close(() => done())),
      });
    });
  });
}
