// Keeps tests/browser/route-guards.ts complete: every exported data-changing method of every route
// handler under app/api must be listed there as guarded (and so tested for refusals) or as public, with
// its reason. A handler added without a refusal test fails here.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { GUARDED_ROUTES, PUBLIC_MUTATIONS } from '../../browser/route-guards';

const APP = path.resolve(__dirname, '..', '..', '..', 'app');
const MUTATING = ['POST', 'PUT', 'PATCH', 'DELETE'];

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    if (statSync(full).isDirectory()) return routeFiles(full);
    return name === 'route.ts' ? [full] : [];
  });
}

function exportedMethods(source: string): string[] {
  const found = new Set<string>();
  for (const m of source.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE)\b/g)) found.add(m[1]);
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(',')) {
      const name = part.trim().split(/\s+as\s+/).pop()?.trim();
      if (name && /^(GET|POST|PUT|PATCH|DELETE)$/.test(name)) found.add(name);
    }
  }
  return [...found];
}

describe('route handlers that change data', () => {
  const handlers = routeFiles(path.join(APP, 'api')).flatMap((file) =>
    exportedMethods(readFileSync(file, 'utf8'))
      .filter((method) => MUTATING.includes(method))
      .map((method) => ({ method, file: path.relative(APP, file).split(path.sep).join('/') })),
  );

  it('exist (the scan finds the admin routes)', () => {
    expect(handlers).toContainEqual({ method: 'PATCH', file: 'api/admin/people/[id]/route.ts' });
  });

  it.each(handlers.map((h) => [`${h.method} ${h.file}`, h] as const))('%s is covered by a refusal test or listed as public', (_label, h) => {
    const guarded = GUARDED_ROUTES.some((g) => g.method === h.method && g.file === h.file);
    const open = PUBLIC_MUTATIONS.some((p) => p.method === h.method && p.file === h.file);
    expect(guarded || open, `${h.method} app/${h.file} is in neither GUARDED_ROUTES nor PUBLIC_MUTATIONS`).toBe(true);
  });

  it('lists no route that no longer exists', () => {
    for (const listed of [...GUARDED_ROUTES, ...PUBLIC_MUTATIONS]) {
      expect(handlers, `${listed.method} app/${listed.file}`).toContainEqual({ method: listed.method, file: listed.file });
    }
  });
});
