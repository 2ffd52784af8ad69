// `npm run load:pull`: a load check of the pull API (not a timed test). Sends bounded concurrent requests on
// loopback with autocannon for a fixed time and prints throughput, latency percentiles and error counts, in
// two phases:
//   1. paced at the target rate (200 requests/s), to see whether p99 stays under 50 ms there;
//   2. unpaced, to see how far the app goes on this machine;
//   3. unpaced against /api/health (one trivial query), the reference for the same app on the same machine
//      at the same moment: on a shared machine the ratio says more than the absolute figure.
// The requests alternate between the two calls a controller build makes: the pins list and a model's JSON
// export (with its matrices and checksum), each through the project-token check and the use record.
//
// Run against a built app (`next build && next start`), not `next dev`. The fixture (a reduced model with
// an approved version, a project pinning it, a token) is written into DATABASE_URL, which must be the
// database that app serves; or pass --token, --project and --model for an existing project.
//
//   DATABASE_URL=… npx tsx scripts/load-pull.ts --url http://127.0.0.1:3100 [--seconds 20] [--connections 10]
import os from 'node:os';
import { closeDb } from '../lib/db';

interface Histogram {
  average: number;
  p50: number;
  p90: number;
  p99: number;
  max: number;
}
interface AutocannonResult {
  requests: Histogram & { total: number; sent: number };
  latency: Histogram;
  errors: number;
  timeouts: number;
  non2xx: number;
  duration: number;
}
type Autocannon = (opts: Record<string, unknown>) => Promise<AutocannonResult>;
// autocannon ships no type declarations; the fields used here are those of its README ("Results").
// eslint-disable-next-line @typescript-eslint/no-require-imports
const autocannon: Autocannon = require('autocannon');

const TARGET_RATE = 200; // requests/s (issue 7)
const TARGET_P99_MS = 50;

function argument(name: string, fallback?: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : fallback;
}

function bounded(name: string, fallback: number, min: number, max: number): number {
  const value = Number(argument(name, String(fallback)));
  if (!Number.isFinite(value) || value < min || value > max) {
    throw new Error(`--${name} must be a number from ${min} to ${max}`);
  }
  return value;
}

async function makeFixture(): Promise<{ token: string; project: string; model: string }> {
  if (!process.env.DATABASE_URL) {
    throw new Error('Set DATABASE_URL to the database the app under load serves (the fixture is written there), or pass --token, --project and --model.');
  }
  // Loaded only here, so a run against an existing project needs no test helpers.
  const { addVersion, makeProjectShelf, stiffTestModel, uniqueSlug } = await import('../tests/integration/fixtures/projects');
  const { makeUser } = await import('../tests/integration/helpers');
  const { createProject } = await import('../lib/projects');
  const { createPin } = await import('../lib/pins');
  const { createProjectToken } = await import('../lib/project-tokens');
  const shelf = await makeProjectShelf('load');
  await addVersion(shelf, { matrices: stiffTestModel(8, 2, 2, 5) });
  const row = await makeUser({ role: 'engineer', label: 'load' });
  const engineer = { id: row.id, email: row.email, name: row.name, role: row.role };
  const project = await createProject({ name: 'Load check controller', slug: uniqueSlug('load') }, engineer);
  await createPin(project.slug, { reducedModel: shelf.reducedModel.slug, mode: 'newest_approved' }, engineer);
  const { token } = await createProjectToken(project.slug, { name: 'load check', expiresInDays: 1 }, engineer);
  return { token, project: project.slug, model: shelf.reducedModel.slug };
}

function report(label: string, r: AutocannonResult): { ok: boolean; rate: number; p99: number } {
  const failures = r.errors + r.timeouts + r.non2xx;
  console.log(
    [
      `${label}:`,
      `  throughput ${r.requests.average.toFixed(1)} req/s (${r.requests.total} responses in ${r.duration.toFixed(1)} s)`,
      `  latency    p50 ${r.latency.p50} ms, p90 ${r.latency.p90} ms, p99 ${r.latency.p99} ms, max ${r.latency.max} ms`,
      `  errors     ${r.errors} connection errors, ${r.timeouts} timeouts, ${r.non2xx} non-2xx responses`,
    ].join('\n'),
  );
  return { ok: failures === 0, rate: r.requests.total / r.duration, p99: r.latency.p99 };
}

async function main(): Promise<void> {
  const url = (argument('url', process.env.MODESHELF_TEST_URL ?? 'http://127.0.0.1:3000') ?? '').replace(/\/+$/, '');
  if (!/^http:\/\/(127\.0\.0\.1|localhost|\[::1\])(:\d+)?$/.test(url)) throw new Error(`--url must be a loopback address, got ${url}`);
  const seconds = bounded('seconds', 20, 2, 120);
  const connections = bounded('connections', 10, 1, 50);

  const given = { token: argument('token'), project: argument('project'), model: argument('model') };
  const target = given.token && given.project && given.model ? (given as { token: string; project: string; model: string }) : await makeFixture();
  await closeDb();

  const base = `/api/v1/projects/${target.project}`;
  const options = {
    url,
    connections,
    duration: seconds,
    timeout: 10,
    headers: { authorization: `Bearer ${target.token}` },
    requests: [{ method: 'GET', path: `${base}/pins` }, { method: 'GET', path: `${base}/models/${target.model}` }],
  };
  console.log(`pull API load check against ${url}, ${connections} connections, ${seconds} s per phase, on ${os.cpus().length} cores`);
  // A short warm-up so the first phase does not measure route compilation and connection-pool start-up.
  await autocannon({ ...options, duration: 2 });

  const paced = report(`paced at ${TARGET_RATE} req/s`, await autocannon({ ...options, overallRate: TARGET_RATE }));
  const open = report('unpaced (as fast as it answers)', await autocannon(options));
  const health = report('reference: GET /api/health unpaced', await autocannon({ url: `${url}/api/health`, connections, duration: seconds, timeout: 10 }));

  const meetsTarget = paced.ok && paced.rate >= TARGET_RATE * 0.97 && paced.p99 < TARGET_P99_MS;
  console.log(
    `target ${TARGET_RATE} req/s sustained with p99 < ${TARGET_P99_MS} ms: ${meetsTarget ? 'met' : 'NOT met'} ` +
      `(sustained ${paced.rate.toFixed(1)} req/s, p99 ${paced.p99} ms); unpaced ${open.rate.toFixed(1)} req/s, p99 ${open.p99} ms`,
  );
  console.log(`pull API throughput / health-check throughput: ${(open.rate / health.rate).toFixed(2)}`);
  if (!paced.ok || !open.ok || !health.ok) {
    console.error('some requests failed (see the error counts above)');
    process.exitCode = 1;
  }
}

main().catch(async (err) => {
  console.error(err instanceof Error ? err.message : err);
  await closeDb();
  process.exitCode = 1;
});
