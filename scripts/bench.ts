/**
 * `npm run bench`: the engine against the numpy/scipy reference, case by case, in one run.
 *
 *   npm run bench                      all cases at their full sizes, native and portable backends
 *   npm run bench -- --quick           small sizes only
 *   npm run bench -- --only=ID,…       some cases (IDs: see scripts/bench/*-cases.ts)
 *   npm run bench -- --backends=native one backend only (native, portable, or both: the default)
 *   npm run bench -- --large           also the large sizes (balanced truncation at n = 4000, the sparse plate at 250,000)
 *   npm run bench -- --sizes=N,…       only these sizes of the chosen cases
 *
 * The engine runs once per backend (MODESHELF_LINALG in the child), the portable one up to each case's
 * `maxPortableSize`. The issue's requirements are checked at the end (REQUIREMENTS below).
 * For each case and size: the reference script generates the seeded model, times itself and saves its
 * results; then a fresh Node process runs our engine on the same .npy inputs (so the peak memory it
 * reports is the case's own) and checks agreement with the reference. Prints one table with both times,
 * the ratio ours/reference, both peak resident set sizes, and the agreement figure.
 * See scripts/bench/types.ts for the case protocol.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir, cpus } from 'node:os';
import path from 'node:path';
import type { BenchCase } from './bench/types';
import { linalgThreads } from '../reduction/linalg/parallel';

/** The targets the benchmark checks (native backend): ratio ours/reference, or absolute seconds and memory. */
const REQUIREMENTS: { id: string; n: number; maxRatio?: number; maxSeconds?: number; maxPeakMiB?: number }[] = [
  { id: 'balanced', n: 1000, maxRatio: 1.0 },
  { id: 'eigenvalues', n: 500, maxRatio: 1.2 },
  { id: 'eigenvalues', n: 2000, maxRatio: 1.2 },
  { id: 'frequency', n: 1000, maxRatio: 1.5 },
  { id: 'cli-reduce', n: 1000, maxRatio: 1.5 },
  { id: 'analysis', n: 2000, maxSeconds: 30, maxPeakMiB: 1024 },
  { id: 'sparse-balanced', n: 22500, maxRatio: 1.0 },
  { id: 'sparse-sweep', n: 22500, maxRatio: 1.0 },
  { id: 'sparse-balanced', n: 90000, maxRatio: 1.0, maxPeakMiB: 3072 },
  { id: 'sparse-balanced', n: 250000, maxSeconds: 300, maxPeakMiB: 8192 },
];

const ROOT = path.resolve(__dirname, '..');
const BENCH_DIR = path.join(ROOT, 'scripts', 'bench');
const PYTHON = '/usr/bin/python3';

async function loadCases(): Promise<BenchCase[]> {
  const files = readdirSync(BENCH_DIR).filter((f) => f.endsWith('-cases.ts')).sort();
  const all: BenchCase[] = [];
  for (const f of files) {
    const mod = (await import(path.join(BENCH_DIR, f))) as { cases?: BenchCase[]; default?: { cases?: BenchCase[] } };
    const list = mod.cases ?? mod.default?.cases;
    if (!Array.isArray(list)) throw new Error(`${f}: expected an exported array \`cases\``);
    all.push(...list);
  }
  return all;
}

function lastJsonLine(text: string, what: string): Record<string, unknown> {
  const lines = text.trim().split('\n');
  for (let i = lines.length - 1; i >= 0; i--) {
    const l = lines[i].trim();
    if (l.startsWith('{')) return JSON.parse(l) as Record<string, unknown>;
  }
  throw new Error(`${what}: no JSON result line in its output:\n${text.slice(-2000)}`);
}

function referenceCommand(c: BenchCase, n: number, dir: string, timed = true): { command: string; args: string[] } {
  if (c.reference) {
    // Every reference script takes --no-time (the warm-up only needs its input files).
    const r = c.reference(n, dir);
    return timed ? r : { ...r, args: [...r.args, '--no-time'] };
  }
  const args = [path.join(ROOT, 'tests', 'reference', 'bench_reference.py'), c.id, String(n), dir];
  if (!timed) args.push('--no-time');
  return { command: PYTHON, args };
}

function runReference(c: BenchCase, n: number, dir: string, timed = true): Record<string, unknown> {
  const { command, args } = referenceCommand(c, n, dir, timed);
  const r = spawnSync(command, args, { encoding: 'utf8', maxBuffer: 1 << 26 });
  if (r.status !== 0) throw new Error(`reference for ${c.id} n=${n} failed (${command}): ${r.stderr || r.error}`);
  return lastJsonLine(r.stdout, `reference ${c.id}`);
}

/** In the child process: warm up, time, check, print one JSON line. */
async function child(id: string, n: number, dir: string, variant: string): Promise<void> {
  const c = (await loadCases()).find((x) => x.id === id);
  if (!c) throw new Error(`unknown case ${id}`);
  const warmDir = mkdtempSync(path.join(tmpdir(), 'bench-warm-'));
  try {
    const w = c.warmupSize ?? 60;
    runReference(c, w, warmDir, false);
    c.run(c.prepare(warmDir, w), variant);
  } finally {
    rmSync(warmDir, { recursive: true, force: true });
  }
  const input = c.prepare(dir, n);
  const times: number[] = [];
  let output: unknown;
  do {
    const t0 = performance.now();
    output = c.run(input, variant);
    times.push((performance.now() - t0) / 1000);
    // At least three runs and one second of runs (short cases are noisy), stopping once they pass 10 s;
    // the reference scripts follow the same rule.
  } while (times.reduce((a, b) => a + b, 0) < 10 && (times.length < 3 || times.reduce((a, b) => a + b, 0) < 1) && times.length < 50);
  const agreement = c.check(dir, input, output);
  const rss = process.resourceUsage().maxRSS;
  process.stdout.write(`${JSON.stringify({ seconds: Math.min(...times), peakRssKb: rss, agreement })}\n`);
}

function pad(s: string, w: number, right = false): string {
  return right ? s.padStart(w) : s.padEnd(w);
}

function mib(kb: unknown): string {
  return typeof kb === 'number' ? `${(kb / 1024).toFixed(0)} MiB` : '—';
}

async function main(): Promise<void> {
  const argv = process.argv.slice(2);
  if (argv[0] === '--child') {
    await child(argv[1], Number(argv[2]), argv[3], argv[4] ?? '');
    return;
  }
  const quick = argv.includes('--quick');
  const large = argv.includes('--large');
  const backendArg = argv.find((a) => a.startsWith('--backends='))?.slice(11) ?? 'native,portable';
  const backends = backendArg.split(',').filter((b) => b === 'native' || b === 'portable');
  if (backends.length === 0) throw new Error(`--backends must list native and/or portable, got ${backendArg}`);
  const only = argv.find((a) => a.startsWith('--only='))?.slice(7).split(',');
  const onlySizes = argv.find((a) => a.startsWith('--sizes='))?.slice(8).split(',').map(Number);
  const cases = (await loadCases()).filter((c) => !only || only.includes(c.id));
  if (cases.length === 0) throw new Error(`no case matches --only=${only}`);

  const scriptPath = path.resolve(process.argv[1]);
  const rows: string[][] = [];
  const header = ['case', 'n', 'backend', 'ours (s)', 'reference (s)', 'ratio', 'ours peak', 'ref peak', 'agreement'];
  const widths = [12, 5, 24, 9, 14, 7, 10, 9, 0];
  const print = (r: string[]) =>
    console.log(r.map((x, i) => (widths[i] ? pad(x, widths[i], i === 1 || (i >= 3 && i <= 7)) : x)).join('  '));
  const measured: { id: string; n: number; backend: string; seconds: number; ratio: number; peakMiB: number }[] = [];
  console.log(`Modeshelf engine benchmark${quick ? ' (quick sizes)' : ''}: Node ${process.version}, ${cpus().length} cores, engine threads ${linalgThreads()}, backends ${backends.join(' and ')}`);
  let blas = '';
  print(header);
  for (const c of cases) {
    const sizes = (quick ? c.quickSizes : [...c.sizes, ...(large ? (c.largeSizes ?? []) : [])]).filter((n) => !onlySizes || onlySizes.includes(n));
    for (const n of sizes) {
      const dir = mkdtempSync(path.join(tmpdir(), `bench-${c.id}-`));
      try {
        const ref = runReference(c, n, dir);
        if (typeof ref.blas === 'string') blas = ref.blas;
        for (const [backend, variant] of backends.flatMap((b) => (c.variants ?? ['']).map((v) => [b, v] as const))) {
          if (backend === 'portable' && n > (c.maxPortableSize ?? Infinity)) continue;
          if (c.supports && !c.supports(backend, variant)) continue;
          const r = spawnSync(process.execPath, [...process.execArgv, scriptPath, '--child', c.id, String(n), dir, variant], {
            encoding: 'utf8',
            maxBuffer: 1 << 26,
            env: { ...process.env, MODESHELF_LINALG: backend },
          });
          const label = variant ? `${backend}/${variant}` : backend;
          if (r.status !== 0) throw new Error(`engine run for ${c.id} n=${n} (${label}) failed:\n${r.stderr}`);
          const ours = lastJsonLine(r.stdout, `engine ${c.id}`);
          const os = ours.seconds as number;
          const rs = ref.seconds as number;
          const ratio = os / rs;
          measured.push({ id: c.id, n, backend: label, seconds: os, ratio, peakMiB: (ours.peakRssKb as number) / 1024 });
          const shownRatio = c.likeForLike === false ? 'n/a' : ratio.toFixed(2);
          const row = [c.id, String(n), label, os.toFixed(3), rs.toFixed(3), shownRatio, mib(ours.peakRssKb), mib(ref.peakRssKb), String(ours.agreement)];
          rows.push(row);
          print(row);
        }
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    }
  }
  console.log('');
  console.log('ratio = ours / reference (below 1: the engine is faster; n/a: the reference does other work, see the case). Peak = maximum resident set size of the process.');
  console.log(`reference BLAS/LAPACK: ${blas || 'unknown'}`);
  for (const c of cases) console.log(`  ${c.id}: ${c.title}`);
  for (const req of REQUIREMENTS) {
    const m = measured.find((x) => x.id === req.id && x.n === req.n && x.backend === 'native');
    if (!m) continue;
    const parts: string[] = [];
    let ok = true;
    if (req.maxRatio !== undefined) {
      parts.push(`${m.ratio.toFixed(2)}× (≤ ${req.maxRatio}×)`);
      ok &&= m.ratio <= req.maxRatio;
    }
    if (req.maxSeconds !== undefined) {
      parts.push(`${m.seconds.toFixed(1)} s (< ${req.maxSeconds} s)`);
      ok &&= m.seconds < req.maxSeconds;
    }
    if (req.maxPeakMiB !== undefined) {
      parts.push(`${m.peakMiB.toFixed(0)} MiB (< ${req.maxPeakMiB} MiB)`);
      ok &&= m.peakMiB < req.maxPeakMiB;
    }
    console.log(`requirement ${req.id} n=${req.n} (native): ${ok ? 'met' : 'NOT met'} at ${parts.join(', ')}`);
    if (!ok) process.exitCode = 1;
  }
}

main().catch((e: unknown) => {
  console.error(e instanceof Error ? e.message : e);
  process.exit(1);
});
