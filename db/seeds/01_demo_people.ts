// Demo accounts: one per role, people of Quillmere Kilnworks, an invented firm that builds kilns and
// thermal test rigs. Inserted only when missing, so a password someone changed is left alone.
// The passwords are printed in README.md; they are for the demo only.
import type { Knex } from 'knex';
import bcrypt from 'bcryptjs';

export const DEMO_PEOPLE = [
  { email: 'maren.solberg@quillmere.example', name: 'Maren Solberg', role: 'admin', password: 'kiln-admin-demo' },
  { email: 'tobias.quint@quillmere.example', name: 'Tobias Quint', role: 'engineer', password: 'kiln-engineer-demo' },
  { email: 'priya.halden@quillmere.example', name: 'Priya Halden', role: 'reviewer', password: 'kiln-reviewer-demo' },
  { email: 'dara.lindqvist@quillmere.example', name: 'Dara Lindqvist', role: 'viewer', password: 'kiln-viewer-demo' },
] as const;

export async function seed(knex: Knex): Promise<void> {
  for (const person of DEMO_PEOPLE) {
    const exists = await knex('users').where({ email: person.email }).first('id');
    if (exists) continue;
    await knex('users').insert({
      email: person.email,
      name: person.name,
      role: person.role,
      active: true,
      password_hash: await bcrypt.hash(person.password, 10),
    });
  }
}
