// `npm run load:pull`: a load check of the pull API (not a timed test). Sends bounded concurrent requests on
// loopback for a fixed time and prints throughput, latency percentiles and error counts, in three phases:
//   1. paced at the target rate (200 requests/s), to see whether p99 stays under 50 ms there: an open-loop
//      generator here (one request every 5 ms on a schedule, at most `--connections` in flight over
//      keep-alive sockets), whose latency runs from each request's scheduled time to its last byte, so
//      time spent waiting for a free connection counts too (no coordinated omission);
//   2. unpaced (autocannon, closed loop: each connection sends its next request when the last returns), to
//      see how far the app goes on this machine;
//   3. paced and unpaced against /api/health (one trivial query), the reference for the same app on the
//      same machine at the same moment: on a shared machine the ratio says more than the absolute figure.
// autocannon's own pacing (`overallRate`) is not used for phase 1: it gives each connection a budget per
// second that it spends as fast as it can at the start of each second, so "200 requests/s" arrives as a
// burst at full speed followed by silence, and it back-fills latencies with a 1 ms expected interval.
// The requests alternate between the two calls a controller build makes: the pins list and a model's JSON
// export (with its matrices and checksum), each through the project-token check and the use record.
//
// Run against a built app (`next build && next start`), not `next dev`. The fixture (a reduced model with
// an approved version, a project pinning it, a token) is written into DATABASE_URL, which must be the
// database that app serves; or pass --token, --project and --model for an existing project.
//
//   DATABASE_URL=… npx tsx scripts/load-pull.ts --url http://127.0.0.1:3100 [--seconds 20] [--connections 10]
//                  [--warmup 10]
import http from 'node:http';
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

interface PacedResult {
  sent: number;
  completed: number;
  seconds: number;
  latencies: number[];
  errors: number;
  non2xx: number;
}

/**
 * Open-loop load: request k is due at start + k/rate; it goes out on a keep-alive socket as soon as one of
 * `connections` is free, and its latency is measured from its due time to the end of its response.
 */
async function paced(url: string, paths: string[], headers: Record<string, string>, rate: number, seconds: number, connections: number): Promise<PacedResult> {
  const agent = new http.Agent({ keepAlive: true, maxSockets: connections });
  const total = Math.round(rate * seconds);
  const latencies: number[] = [];
  let errors = 0;
  let non2xx = 0;
  let completed = 0;
  const start = performance.now() + 20;
  const pending: Promise<void>[] = [];
  const one = (k: number, due: number) =>
    new Promise<void>((resolve) => {
      const req = http.get(`${url}${paths[k % paths.length]}`, { agent, headers, timeout: 10_000 }, (res) => {
        res.on('data', () => {});
        res.on('end', () => {
          latencies.push(performance.now() - due);
          if (res.statusCode === undefined || res.statusCode < 200 || res.statusCode >= 300) non2xx++;
          completed++;
          resolve();
        });
      });
      req.on('timeout', () => req.destroy(new Error('timeout')));
      req.on('error', () => {
        errors++;
        resolve();
      });
    });
  for (let k = 0; k < total; k++) {
    const due = start + (k * 1000) / rate;
    const wait = due - performance.now();
    if (wait > 1) await new Promise((r) => setTimeout(r, wait - 0.5));
    pending.push(one(k, due));
  }
  await Promise.all(pending);
  const elapsed = (performance.now() - start) / 1000;
  agent.destroy();
  return { sent: total, completed, seconds: elapsed, latencies, errors, non2xx };
}

function percentile(sorted: number[], q: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.ceil(q * sorted.length) - 1)];
}

function reportPaced(label: string, r: PacedResult): { ok: boolean; rate: number; p99: number } {
  const sorted = [...r.latencies].sort((a, b) => a - b);
  const ms = (v: number) => v.toFixed(1);
  const p99 = percentile(sorted, 0.99);
  console.log(
    [
      `${label}:`,
      `  throughput ${(r.completed / r.seconds).toFixed(1)} req/s (${r.completed} of ${r.sent} responses in ${r.seconds.toFixed(1)} s)`,
      `  latency    p50 ${ms(percentile(sorted, 0.5))} ms, p90 ${ms(percentile(sorted, 0.9))} ms, p99 ${ms(p99)} ms, max ${ms(sorted[sorted.length - 1] ?? NaN)} ms (from each request's scheduled time)`,
      `  errors     ${r.errors} connection errors or timeouts, ${r.non2xx} non-2xx responses`,
    ].join('\n'),
  );
  return { ok: r.errors + r.non2xx === 0 && r.completed === r.sent, rate: r.completed / r.seconds, p99 };
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
  // Warm-up, not measured: a freshly started server loads its route bundles, fills the connection pool and
  // gets its hot paths optimised by V8 over its first few thousand requests (measured: p50 three times
  // higher over the first 20 s after a start with a 2 s warm-up). `--warmup 0` skips it.
  const warmup = bounded('warmup', 10, 0, 120);
  if (warmup > 0) await autocannon({ ...options, duration: warmup });

  const pacedRun = reportPaced(
    `paced at ${TARGET_RATE} req/s (open loop, one request every ${(1000 / TARGET_RATE).toFixed(0)} ms, at most ${connections} in flight)`,
    await paced(url, options.requests.map((r) => r.path), options.headers, TARGET_RATE, seconds, connections),
  );
  // The same pacing against the health check (one trivial query): on a shared machine, what the server
  // framework and the machine allow at this rate at this moment, to read the pull figure against.
  const pacedHealth = reportPaced(
    `reference: GET /api/health paced at ${TARGET_RATE} req/s (same generator)`,
    await paced(url, ['/api/health'], {}, TARGET_RATE, seconds, connections),
  );
  const open = report('unpaced (as fast as it answers)', await autocannon(options));
  const health = report('reference: GET /api/health unpaced', await autocannon({ url: `${url}/api/health`, connections, duration: seconds, timeout: 10 }));

  const meetsTarget = pacedRun.ok && pacedRun.rate >= TARGET_RATE * 0.97 && pacedRun.p99 < TARGET_P99_MS;
  console.log(
    `target ${TARGET_RATE} req/s sustained with p99 < ${TARGET_P99_MS} ms: ${meetsTarget ? 'met' : 'NOT met'} ` +
      `(sustained ${pacedRun.rate.toFixed(1)} req/s, p99 ${pacedRun.p99.toFixed(1)} ms); unpaced ${open.rate.toFixed(1)} req/s, p99 ${open.p99} ms`,
  );
  console.log(`pull API throughput / health-check throughput: ${(open.rate / health.rate).toFixed(2)}`);
  console.log(`paced p99, pull API / health check: ${pacedRun.p99.toFixed(1)} ms / ${pacedHealth.p99.toFixed(1)} ms`);
  if (!pacedRun.ok || !pacedHealth.ok || !open.ok || !health.ok) {
    console.error('some requests failed (see the error counts above)');
    process.exitCode = 1;
  }
}

main().catch(async (err) => {
  console.error(err instanceof Error ? err.message : err);
  await closeDb();
  process.exitCode = 1;
});
