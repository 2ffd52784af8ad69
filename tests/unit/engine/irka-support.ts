/**
 * Shared helpers for the IRKA tests: the NumPy/SciPy reference (Debian's /usr/bin/python3 on
 * tests/reference/irka_reference.py) and small utilities on shifts and responses.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { type Matrix, toRows } from '../../../reduction/linalg/matrix';
import type { StateSpaceModel } from '../../../reduction/model';
import type { InterpolationPoint, Shift } from '../../../reduction/irka';
import { frequencyResponse } from '../../../reduction/frequency';

export interface IrkaReferenceCase {
  readonly name: string;
  readonly model: StateSpaceModel & { readonly E?: Matrix };
  readonly reduced?: StateSpaceModel;
  /** Ask for the first-order conditions at the reduced model's own poles. */
  readonly conditions?: boolean;
  /** Ask for the three mismatches at these points and directions. */
  readonly points?: readonly InterpolationPoint[];
  /** Ask for numpy's IRKA (one input and output) from these shifts (the full conjugate-closed list). */
  readonly irka?: { shifts: [number, number][]; tolerance: number; maxIterations: number };
}

export interface Mismatch {
  right: number;
  left: number;
  hermite: number;
}

export interface IrkaReferenceAnswer {
  name: string;
  conditions?: (Mismatch & { pole: [number, number] })[];
  pointConditions?: Mismatch[];
  irka?: { shifts: [number, number][]; iterations: number; converged: boolean };
}

const SCRIPT = path.resolve(__dirname, '../../reference/irka_reference.py');

const complexList = (v: { re: ArrayLike<number>; im: ArrayLike<number> }) => Array.from(v.re, (x, i) => [x, v.im[i]]);

/** Runs tests/reference/irka_reference.py on the cases (see the script for what each task computes). */
export function irkaReference(cases: readonly IrkaReferenceCase[]): IrkaReferenceAnswer[] {
  const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-irka-'));
  try {
    const req = path.join(dir, 'request.json'), res = path.join(dir, 'response.json');
    const body = cases.map((c) => ({
      name: c.name,
      A: toRows(c.model.A),
      B: toRows(c.model.B),
      C: toRows(c.model.C),
      D: toRows(c.model.D),
      ...(c.model.E ? { E: toRows(c.model.E) } : {}),
      ...(c.reduced ? { reduced: { A: toRows(c.reduced.A), B: toRows(c.reduced.B), C: toRows(c.reduced.C), D: toRows(c.reduced.D) } } : {}),
      ...(c.conditions ? { conditions: true } : {}),
      ...(c.points ? { points: c.points.map((p) => ({ s: [p.re, p.im], b: complexList(p.b), c: complexList(p.c) })) } : {}),
      ...(c.irka ? { irka: c.irka } : {}),
    }));
    writeFileSync(req, JSON.stringify({ cases: body }));
    execFileSync('/usr/bin/python3', [SCRIPT, req, res], { stdio: ['ignore', 'ignore', 'inherit'], env: { ...process.env, OMP_NUM_THREADS: '1', OPENBLAS_NUM_THREADS: '1' } });
    return JSON.parse(readFileSync(res, 'utf8'));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** The full conjugate-closed list of shifts, sorted by real then imaginary part. */
export function expandedShifts(points: readonly Shift[]): [number, number][] {
  const out: [number, number][] = [];
  for (const p of points) {
    out.push([p.re, p.im]);
    if (p.im > 0) out.push([p.re, -p.im]);
  }
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}

/** max over ω of ‖G1(iω) − G2(iω)‖_F / ‖G1(iω)‖_F. */
export function responseGap(a: StateSpaceModel, b: StateSpaceModel, w: Float64Array): number {
  const ga = frequencyResponse(a, w).response, gb = frequencyResponse(b, w).response;
  let worst = 0;
  for (let k = 0; k < w.length; k++) {
    let num = 0, den = 0;
    for (let i = 0; i < ga[k].re.data.length; i++) {
      num += (ga[k].re.data[i] - gb[k].re.data[i]) ** 2 + (ga[k].im.data[i] - gb[k].im.data[i]) ** 2;
      den += ga[k].re.data[i] ** 2 + ga[k].im.data[i] ** 2;
    }
    worst = Math.max(worst, Math.sqrt(num / den));
  }
  return worst;
}
