// People: the users table, its schemas, and the admin actions on it (invite, role change, deactivation).
// Permission checks for these actions live in the route handlers (requireRole('admin')); the rules that
// protect the shelf as a whole — never leave it without an active admin — live here, next to the writes.
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError } from '@/lib/http';
import { ROLES, type Role } from '@/lib/roles';

export interface Person {
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  /** False while an invitation is open: the person has not chosen a password yet. */
  hasPassword: boolean;
  lastSignedInAt: string | null;
  createdAt: string;
}

export interface UserRow {
  id: string;
  email: string;
  name: string;
  password_hash: string | null;
  role: Role;
  active: boolean;
  last_signed_in_at: Date | null;
  created_at: Date;
  updated_at: Date;
}

export const emailSchema = z
  .string({ error: 'E-mail is required.' })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: 'E-mail must be an address like name@example.org.' }));

const personBase = z.object({
  email: emailSchema,
  name: z
    .string({ error: 'Name is required.' })
    .trim()
    .min(1, 'Name is required.')
    .max(120, 'Name must be at most 120 characters.'),
  role: z.enum(ROLES, { error: `Role must be one of ${ROLES.join(', ')}.` }),
  active: z.boolean({ error: 'Active must be true or false.' }),
});

export const inviteSchema = personBase.pick({ email: true, name: true, role: true });
export const personUpdateSchema = personBase
  .pick({ role: true, active: true })
  .partial()
  .refine((u) => u.role !== undefined || u.active !== undefined, { message: 'Give a role or an active flag to change.' });

export type InviteInput = z.infer<typeof inviteSchema>;
export type PersonUpdate = z.infer<typeof personUpdateSchema>;

export function toPerson(row: UserRow): Person {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    active: row.active,
    hasPassword: row.password_hash !== null,
    lastSignedInAt: row.last_signed_in_at ? row.last_signed_in_at.toISOString() : null,
    createdAt: row.created_at.toISOString(),
  };
}

export async function listPeople(): Promise<Person[]> {
  const rows: UserRow[] = await db()('users').orderBy('name');
  return rows.map(toPerson);
}

export async function findUserById(id: string, trx: Knex | Knex.Transaction = db()): Promise<UserRow | undefined> {
  return trx<UserRow>('users').where({ id }).first();
}

export async function findUserByEmail(email: string, trx: Knex | Knex.Transaction = db()): Promise<UserRow | undefined> {
  return trx<UserRow>('users').where({ email: email.trim().toLowerCase() }).first();
}

/**
 * Creates the account of an invited person (no password yet), or refreshes an open invitation.
 * Returns the user row; the caller issues the invitation token in the same transaction.
 */
export async function createInvitedUser(trx: Knex.Transaction, input: InviteInput, actorId: string): Promise<UserRow> {
  const existing = await findUserByEmail(input.email, trx);
  if (existing && existing.password_hash !== null) {
    throw new ApiError(409, 'already_registered', `${input.email} already has an account.`, 'email');
  }
  let row: UserRow;
  if (existing) {
    [row] = await trx<UserRow>('users')
      .where({ id: existing.id })
      .update({ name: input.name, role: input.role, active: true, updated_at: trx.fn.now() })
      .returning('*');
  } else {
    [row] = await trx<UserRow>('users')
      .insert({ email: input.email, name: input.name, role: input.role, active: true })
      .returning('*');
  }
  await recordAudit(trx, {
    actorId,
    action: existing ? 'user.reinvited' : 'user.invited',
    subjectType: 'user',
    subjectId: row.id,
    details: { email: row.email, role: row.role },
  });
  return row;
}

/** Role change and (de)activation by an admin. Refuses to leave the shelf without an active admin. */
export async function updatePerson(
  id: string,
  change: PersonUpdate,
  actorId: string,
  outer: Knex | Knex.Transaction = db(),
): Promise<Person> {
  return outer.transaction(async (trx) => {
    const before = await trx<UserRow>('users').where({ id }).forUpdate().first();
    if (!before) throw new ApiError(404, 'not_found', 'That person was not found.');
    const after = { role: change.role ?? before.role, active: change.active ?? before.active };
    const losesAdmin = before.role === 'admin' && before.active && (after.role !== 'admin' || !after.active);
    if (losesAdmin) {
      // Lock every active admin row so two admins demoting each other at once cannot both succeed.
      const admins = await trx('users').where({ role: 'admin', active: true }).forUpdate().select('id');
      if (admins.length <= 1) {
        throw new ApiError(
          409,
          'last_admin',
          'This is the only active admin; make someone else an admin first.',
          change.role !== undefined ? 'role' : 'active',
        );
      }
    }
    const [row] = await trx<UserRow>('users')
      .where({ id })
      .update({ role: after.role, active: after.active, updated_at: trx.fn.now() })
      .returning('*');
    if (before.role !== after.role) {
      await recordAudit(trx, {
        actorId,
        action: 'user.role_changed',
        subjectType: 'user',
        subjectId: id,
        details: { from: before.role, to: after.role },
      });
    }
    if (before.active !== after.active) {
      await recordAudit(trx, {
        actorId,
        action: after.active ? 'user.reactivated' : 'user.deactivated',
        subjectType: 'user',
        subjectId: id,
        details: {},
      });
    }
    return toPerson(row);
  });
}
