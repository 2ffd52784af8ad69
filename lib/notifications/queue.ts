// The queue of notification mail (mail_queue) and its delivery after commit.
//
// Why a queue and not a send inside the request: a review decision must stand whatever the mail server
// does. The intent row commits with the decision; delivery happens afterwards (lib/notifications/sender.ts
// runs it right after the request and in the worker's loop), a failed send is retried with back-off, and
// nothing that happens to a mail ever touches the review. A sender that dies mid-send leaves its claim to
// expire, so another picks the mail up: delivery is at least once.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { sendMail, type OutgoingMail } from '@/lib/mail/transport';
import type { MailContent } from '@/lib/mail/templates';
import type { NotificationKind, Recipient } from '@/lib/notifications/preferences';

// After this many failed attempts a mail is marked failed and left for an admin to see; common practice
// for mail queues is a handful of retries over about an hour, which the back-off below spans.
export const MAX_ATTEMPTS = 6;
const FIRST_RETRY_SECONDS = 30;
const LONGEST_RETRY_SECONDS = 3600;
const CLAIM_SECONDS = 120;

/** Seconds to wait before attempt n + 1 after n failures: 30 s, 60 s, 120 s, … at most an hour. */
export function retryDelaySeconds(failedAttempts: number): number {
  return Math.min(LONGEST_RETRY_SECONDS, FIRST_RETRY_SECONDS * 2 ** Math.max(0, failedAttempts - 1));
}

/** The kind of a pin notice to controller project members (lib/notifications/pin-notices.ts): not a preference. */
export const PIN_NOTICE_KIND = 'pin_changed';

/** Queues one mail; with a dedupe key, a second queueing of the same key is a no-op. Returns whether queued. */
export async function queueMail(
  trx: Knex | Knex.Transaction,
  input: { kind: NotificationKind | typeof PIN_NOTICE_KIND; recipient: Recipient; content: MailContent; dedupeKey?: string },
): Promise<boolean> {
  const inserted = await trx('mail_queue')
    .insert({
      kind: input.kind,
      recipient_id: input.recipient.id,
      to_address: input.recipient.email,
      subject: input.content.subject,
      text_body: input.content.text,
      html_body: input.content.html,
      dedupe_key: input.dedupeKey ?? null,
    })
    .onConflict('dedupe_key')
    .ignore()
    .returning('id');
  return inserted.length > 0;
}

/** Mails claimed per call; a round calls again while a call comes back full (lib/notifications/sender.ts). */
export const DELIVERY_BATCH = 50;
const SEND_CONCURRENCY = 8;

export interface DeliveryReport {
  sent: number;
  /** failed this round and will be tried again */
  retrying: number;
  /** failed for the last time (status 'failed') */
  gaveUp: number;
}

interface QueuedMailRow {
  id: string;
  to_address: string;
  subject: string;
  text_body: string;
  html_body: string;
  attempts: number;
}

/**
 * Sends what is due: pending mail whose next attempt has come, and mail whose sender's claim expired.
 * Claims rows with SKIP LOCKED so several senders never send one mail at the same moment, and sends
 * outside any transaction. `send` is the transport (tests pass a failing one).
 */
export async function deliverDueMail(
  options: {
    limit?: number;
    send?: (mail: OutgoingMail) => Promise<string>;
    /** Only these queue rows (tests, and an admin's "send now"). */
    onlyIds?: readonly string[];
    /** The moment to judge "due" and to schedule retries from; the database clock when absent (tests move it). */
    now?: Date;
  } = {},
): Promise<DeliveryReport> {
  const limit = options.limit ?? DELIVERY_BATCH;
  const send = options.send ?? sendMail;
  const knex = db();
  const clock = options.now ? knex.raw('?::timestamptz', [options.now.toISOString()]) : knex.raw('clock_timestamp()');
  const only = options.onlyIds ? `AND id = ANY(?::bigint[])` : '';
  const claimed = await knex.raw<{ rows: QueuedMailRow[] }>(
    `UPDATE mail_queue
        SET status = 'sending', attempts = attempts + 1,
            claimed_until = ? + make_interval(secs => ?)
      WHERE id IN (
        SELECT id FROM mail_queue
         WHERE ((status = 'pending' AND next_attempt_at <= ?)
            OR (status = 'sending' AND claimed_until < ?)) ${only}
         ORDER BY id
         LIMIT ?
         FOR UPDATE SKIP LOCKED)
      RETURNING id, to_address, subject, text_body, html_body, attempts`,
    [clock, CLAIM_SECONDS, clock, clock, ...(options.onlyIds ? [options.onlyIds as string[]] : []), limit],
  );
  const report: DeliveryReport = { sent: 0, retrying: 0, gaveUp: 0 };
  const deliverOne = async (row: QueuedMailRow) => {
    try {
      const messageId = await send({ to: row.to_address, subject: row.subject, text: row.text_body, html: row.html_body });
      await knex('mail_queue')
        .where({ id: row.id, status: 'sending' })
        .update({ status: 'sent', sent_at: knex.raw('clock_timestamp()'), message_id: messageId ?? null, claimed_until: null, last_error: null });
      report.sent += 1;
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      const giveUp = row.attempts >= MAX_ATTEMPTS;
      await knex('mail_queue')
        .where({ id: row.id, status: 'sending' })
        .update({
          status: giveUp ? 'failed' : 'pending',
          claimed_until: null,
          last_error: message.slice(0, 1000),
          next_attempt_at: knex.raw('? + make_interval(secs => ?)', [clock, retryDelaySeconds(row.attempts)]),
        });
      if (giveUp) report.gaveUp += 1;
      else report.retrying += 1;
      console.error(`[modeshelf] mail ${row.id} to ${row.to_address} failed (attempt ${row.attempts}): ${message}`);
    }
  };
  // A send is mostly waiting on the SMTP dialogue, so a few run side by side.
  const rows = [...claimed.rows];
  const lanes = Array.from({ length: Math.min(SEND_CONCURRENCY, rows.length) }, async () => {
    for (let row = rows.shift(); row; row = rows.shift()) await deliverOne(row);
  });
  await Promise.all(lanes);
  return report;
}
