// What the review routes accept: the version id in the path, the one text each transition needs (note,
// comment or reason) and a comment's body, and the roles that may comment or start a next draft.
import { z } from 'zod';
import type { Role } from '@/lib/roles';
import { REVIEW_TEXT_MAX } from '@/lib/review/state-machine';

/** The signed-in person acting on a version. */
export interface Actor {
  id: string;
  name: string;
  role: Role;
}

const text = (what: string) =>
  z
    .string({ error: `${what} is required.` })
    .trim()
    .min(1, `${what} is required.`)
    .max(REVIEW_TEXT_MAX, `${what} must be at most ${REVIEW_TEXT_MAX} characters.`);

/** Request bodies of the four transitions and of a comment; each names the one text it needs. */
export const transitionBodySchemas = {
  submit: z.object({ note: text('A note for the reviewer') }).strict(),
  approve: z.object({ comment: text('A comment for the author') }).strict(),
  revise: z.object({ comment: text('A comment for the author') }).strict(),
  retire: z.object({ reason: text('A reason for retiring') }).strict(),
} as const;
export const commentBodySchema = z.object({ body: text('A comment') }).strict();

export const versionIdSchema = z.object({ id: z.uuid({ error: 'The reduced model version id must be a UUID.' }) });

export const COMMENT_ROLES: readonly Role[] = ['engineer', 'reviewer', 'admin'];
export const NEXT_DRAFT_ROLES: readonly Role[] = ['engineer'];
