/**
 * The command line end to end against a numpy/scipy script doing the same work
 * (tests/reference/cli_reduce_reference.py): `cli.ts reduce --method balanced --order 20` with its measured
 * H∞ error, timed as a whole process on both sides (start-up and reading the Matrix Market files included).
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { BenchCase } from './types';

const ROOT = path.resolve(__dirname, '..', '..');

interface CliReduceOutput {
  hInfinityError: number;
  hankelSingularValues: number[];
  hInfinityErrorCertificate?: { hamiltonianSolves: number; hamiltonianOrder: number };
  engine: { backend: string; seconds: number; peakMemoryMiB: number };
}

const cliReduceCase: BenchCase<string, CliReduceOutput> = {
  id: 'cli-reduce',
  title: 'cli.ts reduce --method balanced --order 20 with its H∞ error (whole process, files read)',
  sizes: [1000],
  quickSizes: [200],
  warmupSize: 40,
  maxPortableSize: 1000,
  reference: (n, dir) => ({ command: '/usr/bin/python3', args: [path.join(ROOT, 'tests', 'reference', 'cli_reduce_reference.py'), String(n), dir] }),
  prepare: (dir) => dir,
  run(dir) {
    const files = ['A', 'B', 'C'].map((m) => path.join(dir, `${m}.mtx`));
    const r = spawnSync(process.execPath, ['--import', 'tsx', path.join(ROOT, 'reduction', 'cli.ts'), 'reduce', ...files, '--method', 'balanced', '--order', '20'], {
      cwd: ROOT,
      encoding: 'utf8',
      maxBuffer: 1 << 26,
      env: process.env,
    });
    if (r.status !== 0) throw new Error(`cli.ts reduce failed: ${r.stderr}`);
    return JSON.parse(r.stdout) as CliReduceOutput;
  },
  check(dir, _input, out) {
    const ref = JSON.parse(readFileSync(path.join(dir, 'ref_cli_reduce.json'), 'utf8')) as { hsv: number[]; hInfinityError: number; hamiltonianSolves: number };
    let worst = 0;
    for (let i = 0; i < 20; i++) worst = Math.max(worst, Math.abs(out.hankelSingularValues[i] - ref.hsv[i]) / ref.hsv[i]);
    const dh = Math.abs(out.hInfinityError - ref.hInfinityError) / ref.hInfinityError;
    const c = out.hInfinityErrorCertificate;
    return (
      `H∞ error rel diff ${dh.toExponential(1)}; σ1..20 rel diff ${worst.toExponential(1)}; ` +
      `Hamiltonian solves ${c ? `${c.hamiltonianSolves} of order ${c.hamiltonianOrder}` : '?'} (reference ${ref.hamiltonianSolves} of order ${2 * (out.hankelSingularValues.length + 20)})`
    );
  },
};

export const cases: BenchCase[] = [cliReduceCase] as BenchCase[];
