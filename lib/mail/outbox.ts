// Reading the captured mail for Admin › Mail.
import { db } from '@/lib/db';

export interface CapturedMail {
  id: string;
  receivedAt: string;
  envelopeFrom: string | null;
  envelopeTo: string[];
  fromHeader: string | null;
  subject: string;
  textBody: string | null;
}

export async function listOutbox(limit = 100): Promise<CapturedMail[]> {
  const rows = await db()('outbox')
    .select('id', 'received_at', 'envelope_from', 'envelope_to', 'from_header', 'subject', 'text_body')
    .orderBy('id', 'desc')
    .limit(limit);
  return rows.map((r) => ({
    id: String(r.id),
    receivedAt: (r.received_at as Date).toISOString(),
    envelopeFrom: r.envelope_from,
    envelopeTo: r.envelope_to,
    fromHeader: r.from_header,
    subject: r.subject,
    textBody: r.text_body,
  }));
}
