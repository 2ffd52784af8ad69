// Slugs: the lower-case, hyphenated names in the shelf's addresses (/source-models/kiln-3-wall,
// /projects/kiln-3-zone-controller), made from a name once and kept.
import type { Knex } from 'knex';

/** Lower-case letters and digits in runs joined by single hyphens. */
export const SLUG_PATTERN = /^[a-z0-9]+(-[a-z0-9]+)*$/;

/** A slug from a name, at most 60 characters: "Kiln 3 — zone controller" → "kiln-3-zone-controller"; `fallback` when nothing is left. */
export function slugFromName(name: string, fallback: string): string {
  const slug = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/, '');
  return slug || fallback;
}

/** The name's slug, or the first of slug-2, slug-3, … that no row of `table` has yet (inside the caller's transaction). */
export async function uniqueSlug(trx: Knex.Transaction, table: string, name: string, fallback: string): Promise<string> {
  const base = slugFromName(name, fallback);
  const taken = new Set((await trx(table).where('slug', base).orWhere('slug', 'like', `${base}-%`).pluck('slug')) as string[]);
  if (!taken.has(base)) return base;
  for (let k = 2; ; k++) if (!taken.has(`${base}-${k}`)) return `${base}-${k}`;
}
