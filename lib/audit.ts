// Writes to audit_events, the append-only record (the table refuses UPDATE and DELETE; see its migration).
// Call it inside the same transaction as the change it records, so the record and the change stand or
// fall together.
import type { Knex } from 'knex';
import { db } from '@/lib/db';

export interface AuditEntry {
  actorId: string | null;
  action: string;
  subjectType: string;
  subjectId?: string | null;
  details?: Record<string, unknown>;
}

export interface AuditEvent {
  id: string;
  at: Date;
  actorId: string | null;
  action: string;
  subjectType: string;
  subjectId: string | null;
  details: Record<string, unknown>;
}

export async function recordAudit(trx: Knex | Knex.Transaction, entry: AuditEntry): Promise<void> {
  await trx('audit_events').insert({
    actor_id: entry.actorId,
    action: entry.action,
    subject_type: entry.subjectType,
    subject_id: entry.subjectId ?? null,
    details: JSON.stringify(entry.details ?? {}),
  });
}

export async function auditTrail(subjectType: string, subjectId: string, limit = 50): Promise<AuditEvent[]> {
  const rows = await db()('audit_events')
    .where({ subject_type: subjectType, subject_id: subjectId })
    .orderBy('id', 'desc')
    .limit(limit);
  return rows.map((r) => ({
    id: String(r.id),
    at: r.at,
    actorId: r.actor_id,
    action: r.action,
    subjectType: r.subject_type,
    subjectId: r.subject_id,
    details: r.details,
  }));
}
