/**
 * The command line's sparse path (issue 13): routing (--path, the crossover, --E), the keys it adds, its
 * refusals. Sources beside each check: the library call it wraps (reduction/sparse/balanced.ts, tested in
 * sparse-balanced.test.ts), the dense path on the same 400-state model, and scipy.sparse.linalg.splu
 * (Debian python3-scipy, tests/reference/sparse_reference.py task "response") for the DC gain.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { sparseBalancedReduction } from '@/reduction/sparse/balanced';
import { frequencyResponse, logFrequencyGrid } from '@/reduction/frequency';
import { fromRows, zeros } from '@/reduction/linalg/matrix';
import { solve } from '@/reduction/linalg/index';
import { cscFromCoo, type CscMatrix } from '@/reduction/sparse/model';
import { writeSparseMatrixMarket } from '@/reduction/sparse/matrix-market';
import { writeMatrixMarket } from '@/reduction/io/matrix-market';
import type { StateSpaceModel } from '@/reduction/model';
import { plateModel, relDiff, sparseReference, writeModel } from './sparse-support';

const ROOT = path.resolve(__dirname, '../../..');

/** max over ω of ‖G1(iω) − G2(iω)‖_F / ‖G1(iω)‖_F. */
function responseGap(a: StateSpaceModel, b: StateSpaceModel, w: Float64Array): number {
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

function cli(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  return cliWith({}, ...args);
}

function cliWith(env: Record<string, string>, ...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(path.join(ROOT, 'node_modules/.bin/tsx'), ['reduction/cli.ts', ...args], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ...env } });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('command line: the sparse path', () => {
  const model = plateModel(20, { convection: 100, descriptor: true });
  const dir = writeModel(model);
  const files = ['A.mtx', 'B.mtx', 'C.mtx'].map((f) => path.join(dir, f));

  it('reduce --path sparse --E: engine.path sparse, estimated keys, the bound covering the measured error', () => {
    const r = cli('reduce', ...files, '--E', path.join(dir, 'E.mtx'), '--method', 'balanced', '--order', '5', '--error-points', '30');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.engine.path).toBe('sparse');
    expect(out.hsvComplete).toBe(false);
    expect(out.descriptor).toBe(true);
    expect(out.estimated).toEqual(['hankelSingularValues', 'errorBound', 'hInfinityError']);
    expect(out.gramianResidual.controllability.residual).toBeLessThanOrEqual(1e-10);
    expect(out.gramianResidual.observability.converged).toBe(true);
    expect(out.A).toHaveLength(5);
    expect(out.hInfinityError).toBeLessThanOrEqual(out.errorBound * (1 + 1e-6));
    expect(out.hInfinityError).toBeGreaterThan(0);
    // The same reduction through the library.
    const lib = sparseBalancedReduction(model, { method: 'balanced', order: 5 });
    const printed: StateSpaceModel = { A: fromRows(out.A), B: fromRows(out.B), C: fromRows(out.C), D: fromRows(out.D) };
    expect(responseGap(lib.model, printed, logFrequencyGrid(1, 1e4, 10))).toBeLessThan(1e-9);
  });

  it('--path auto keeps a 400-state model without E on the dense path; --path sparse takes it to the sparse one', () => {
    const plain = writeModel(plateModel(20));
    const f = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(plain, x));
    const auto = JSON.parse(cli('reduce', ...f, '--method', 'residualization', '--order', '4').stdout);
    expect(auto.engine.path).toBe('dense');
    expect(auto.hsvComplete).toBeUndefined();
    const sparse = JSON.parse(cli('reduce', ...f, '--method', 'residualization', '--order', '4', '--path', 'sparse').stdout);
    expect(sparse.engine.path).toBe('sparse');
    expect(Math.abs(sparse.hankelSingularValues[0] - auto.hankelSingularValues[0]) / auto.hankelSingularValues[0]).toBeLessThan(1e-9);
    // Both keep the DC gain: the residualized models' −C A⁻¹ B agree.
    const dc = (o: { A: number[][]; B: number[][]; C: number[][] }) => {
      const m = { A: fromRows(o.A), B: fromRows(o.B), C: fromRows(o.C), D: zeros(1, 1) };
      return frequencyResponse(m, [0]).response[0].re.data[0];
    };
    expect(relDiff(dc(sparse), dc(auto))).toBeLessThan(1e-8);
  });

  it('reduce --method frequency-limited on the sparse path: the dense path’s reduced model and band errors on the same 400-state model', () => {
    // The dense path runs Gawronski & Juang's method on the whole model (reduction/frequency-limited.ts,
    // tested against the closed-form band gramians); the sparse path runs it on a balanced intermediate
    // model whose distance from the full one is about 1e-12·σ₁, so the two reduced models must agree.
    const plain = writeModel(plateModel(20, { convection: 100 }));
    const f = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(plain, x));
    const args = ['--method', 'frequency-limited', '--band', '10,300', '--order', '3'];
    const dense = cli('reduce', ...f, ...args, '--path', 'dense');
    const sparse = cli('reduce', ...f, ...args, '--path', 'sparse');
    expect(dense.status, dense.stderr).toBe(0);
    expect(sparse.status, sparse.stderr).toBe(0);
    const d = JSON.parse(dense.stdout), s = JSON.parse(sparse.stdout);
    expect(s.engine.path).toBe('sparse');
    expect(s.errorBound).toBeNull();
    expect(s.estimated).toContain('inBandError');
    expect(s.intermediateOrder).toBeGreaterThan(3);
    const model = (o: { A: number[][]; B: number[][]; C: number[][]; D: number[][] }): StateSpaceModel => ({ A: fromRows(o.A), B: fromRows(o.B), C: fromRows(o.C), D: fromRows(o.D) });
    expect(responseGap(model(d), model(s), logFrequencyGrid(1, 1e4, 30))).toBeLessThan(1e-6);
    for (let i = 0; i < 4; i++) expect(relDiff(s.frequencyLimitedSingularValues[i], d.frequencyLimitedSingularValues[i])).toBeLessThan(1e-6);
    // The measured errors: the sparse path samples 40 points per grid, the dense path 200, so its maxima are
    // the larger ones up to the sampling; both describe the same reduced model.
    expect(relDiff(s.inBandError, d.inBandError)).toBeLessThan(0.05);
    expect(s.inBandError).toBeLessThan(s.outOfBandError);
  });

  it('--path auto takes a coordinate model above the crossover (1024 > 1000 states) to the sparse path; the environment moves the crossover', () => {
    const big = writeModel(plateModel(32));
    const f = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(big, x));
    const out = JSON.parse(cli('reduce', ...f, '--method', 'balanced', '--order', '3').stdout);
    expect(out.engine.path).toBe('sparse');
    expect(out.states).toBe(1024);
    const small = writeModel(plateModel(20));
    const g = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(small, x));
    const moved = JSON.parse(cliWith({ MODESHELF_SPARSE_CROSSOVER: '300' }, 'analyze', ...g).stdout);
    expect(moved.engine.path).toBe('sparse');
  });

  it('reduce --tolerance: the smallest order whose estimated bound meets T·‖G‖∞, the same order as the dense path (n = 400)', () => {
    const plain = writeModel(plateModel(20, { inputs: 2, outputs: 2 }));
    const f = ['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(plain, x));
    const T = 1e-4;
    const sparse = JSON.parse(cli('reduce', ...f, '--method', 'balanced', '--tolerance', String(T), '--path', 'sparse').stdout);
    const dense = JSON.parse(cli('reduce', ...f, '--method', 'balanced', '--tolerance', String(T), '--path', 'dense').stdout);
    expect(sparse.engine.path).toBe('sparse');
    expect(sparse.orderRule).toBe('tolerance');
    expect(sparse.estimated).toContain('referenceNorm');
    const tail = (r: number) => 2 * sparse.hankelSingularValues.slice(r).reduce((a: number, b: number) => a + b, 0);
    expect(sparse.errorBound).toBeLessThanOrEqual(T * sparse.referenceNorm);
    expect(tail(sparse.order - 1)).toBeGreaterThan(T * sparse.referenceNorm);
    expect(sparse.hInfinityError).toBeLessThanOrEqual(sparse.errorBound * (1 + 1e-6));
    // The dense path certifies ‖G‖∞ (Hamiltonian bisection); the sweep's lower bound is close to it here.
    expect(sparse.referenceNorm).toBeLessThanOrEqual(dense.referenceNorm * (1 + 1e-9));
    expect(relDiff(sparse.referenceNorm, dense.referenceNorm)).toBeLessThan(1e-3);
    expect(sparse.order).toBe(dense.order);
  });

  it('analyze on the sparse path: decay rates against the Laplacian closed form (LeVeque 2007), N = 40', () => {
    const N = 40, h = 1 / (N + 1);
    const lam = (j: number, k: number) => (4 / (h * h)) * (Math.sin((j * Math.PI) / (2 * (N + 1))) ** 2 + Math.sin((k * Math.PI) / (2 * (N + 1))) ** 2);
    const d = writeModel(plateModel(N));
    const out = JSON.parse(cli('analyze', ...['A.mtx', 'B.mtx', 'C.mtx'].map((x) => path.join(d, x))).stdout);
    expect(out.engine.path).toBe('sparse');
    expect(relDiff(out.slowestDecayRate, lam(1, 1))).toBeLessThan(1e-9);
    expect(out.fastestDecayRate).toBeLessThanOrEqual(lam(N, N) * (1 + 1e-12));
    expect(relDiff(out.fastestDecayRate, lam(N, N))).toBeLessThan(2e-2);
    expect(relDiff(out.stiffnessRatio, lam(N, N) / lam(1, 1))).toBeLessThan(2e-2);
  });

  it('analyze on the sparse path: DC gain matches scipy, H2 and Hankel singular values listed as estimated', () => {
    const r = cli('analyze', ...files, '--E', path.join(dir, 'E.mtx'));
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.engine.path).toBe('sparse');
    expect(out.polesComplete).toBe(false);
    expect(out.hsvComplete).toBe(false);
    for (const k of ['slowestDecayRate', 'fastestDecayRate', 'stiffnessRatio', 'hankelSingularValues', 'h2Norm', 'hInfinityNorm']) expect(out.estimated).toContain(k);
    expect(out.estimated).not.toContain('zeroFrequencyGain');
    const ref = sparseReference(dir, ['response'], { frequencies: [0] }).response[0]; // scipy splu: C (0·E − A)⁻¹ B
    expect(relDiff(out.zeroFrequencyGain[0][0], ref.re[0][0])).toBeLessThan(1e-10);
  });

  it('refuses a factorization over --memory-budget before making it, naming the estimate and the budget', () => {
    const r = cli('reduce', ...files, '--E', path.join(dir, 'E.mtx'), '--method', 'balanced', '--order', '3', '--memory-budget', '0.01');
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/needs an estimated [\d.]+ MiB \(UMFPACK's symbolic analysis\), over the memory budget of 0\.01 MiB/);
    expect(r.stderr).toContain('field: memory-budget, code: too_large');
    // Within a budget the same command succeeds.
    expect(cli('reduce', ...files, '--E', path.join(dir, 'E.mtx'), '--method', 'balanced', '--order', '3', '--memory-budget', '512').status).toBe(0);
  });

  it('refuses --E on the dense path and methods the sparse path does not offer, exit 2 naming the option', () => {
    const e = cli('reduce', ...files, '--E', path.join(dir, 'E.mtx'), '--path', 'dense', '--method', 'balanced', '--order', '3');
    expect(e.status).toBe(2);
    expect(e.stderr).toContain('field: E');
    const m = cli('reduce', ...files, '--path', 'sparse', '--method', 'truncation', '--order', '3');
    expect(m.status).toBe(2);
    expect(m.stderr).toContain('field: method');
    const noBand = cli('reduce', ...files, '--path', 'sparse', '--method', 'frequency-limited', '--order', '3');
    expect(noBand.status).toBe(2);
    expect(noBand.stderr).toContain('field: band');
    const bad = cli('reduce', ...files, '--path', 'sometimes', '--method', 'balanced', '--order', '3');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toContain('field: path');
  });
});

describe('command line: a second-order model given as M, D, K', () => {
  // A fixed–fixed chain of N equal masses m joined by N + 1 equal springs k, Rayleigh damping D = αM + βK.
  // Undamped, ω_j = 2√(k/m)·sin(jπ/(2(N+1))) (the chain's closed form, any vibrations textbook, e.g.
  // Meirovitch, "Fundamentals of Vibrations", 2001, §8.9); with Rayleigh damping the modes stay those of the
  // undamped chain and mode j's poles are −(α + βω_j²)/2 ± iω_j√(1 − ζ_j²), ζ_j = (α/ω_j + βω_j)/2, so the
  // decay rates are (α + βω_j²)/2. A static unit force at mass j moves it by
  // j(N+1−j)/(k(N+1)) (the springs either side in parallel, each side's springs in series).
  const N = 60, m = 1, k = 1000, alpha = 0.5, beta = 0.004, at = 10;
  const decay = (j: number) => (alpha + beta * omega(j) ** 2) / 2;
  const omega = (j: number) => 2 * Math.sqrt(k / m) * Math.sin((j * Math.PI) / (2 * (N + 1)));
  const dir = mkdtempSync(path.join(tmpdir(), 'modeshelf-chain-'));
  const tri = (d: number, o: number): CscMatrix => {
    const r: number[] = [], c: number[] = [], v: number[] = [];
    for (let i = 0; i < N; i++) {
      r.push(i), c.push(i), v.push(d);
      if (i + 1 < N && o !== 0) r.push(i, i + 1), c.push(i + 1, i), v.push(o, o);
    }
    return cscFromCoo(N, r, c, v);
  };
  writeFileSync(path.join(dir, 'M.mtx'), writeSparseMatrixMarket(tri(m, 0)));
  writeFileSync(path.join(dir, 'K.mtx'), writeSparseMatrixMarket(tri(2 * k, -k)));
  writeFileSync(path.join(dir, 'D.mtx'), writeSparseMatrixMarket(tri(alpha * m + 2 * k * beta, -k * beta)));
  const F = zeros(N, 1);
  F.data[at - 1] = 1;
  const C = zeros(1, N);
  C.data[at - 1] = 1;
  writeFileSync(path.join(dir, 'F.mtx'), writeMatrixMarket(F));
  writeFileSync(path.join(dir, 'C.mtx'), writeMatrixMarket(C));
  const so = ['--mass', path.join(dir, 'M.mtx'), '--stiffness', path.join(dir, 'K.mtx'), '--damping', path.join(dir, 'D.mtx'), path.join(dir, 'F.mtx'), path.join(dir, 'C.mtx')];

  it('analyze: 2N states on the sparse path, decay rates (α + βω²)/2 of the closed form, the static deflection as DC gain', () => {
    const r = cli('analyze', ...so);
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.engine.path).toBe('sparse');
    expect(out.states).toBe(2 * N);
    expect(relDiff(out.slowestDecayRate, decay(1))).toBeLessThan(1e-8);
    expect(relDiff(out.fastestDecayRate, decay(N))).toBeLessThan(2e-2);
    expect(relDiff(out.zeroFrequencyGain[0][0], (at * (N + 1 - at)) / (k * (N + 1)))).toBeLessThan(1e-10);
  });

  it('sweep and reduce: the sparse sweep is the chain’s G(iω) = C(K − ω²M + iωD)⁻¹F, and balanced truncation keeps within its bound', () => {
    const w = [0.5, omega(1), 30];
    const s = cli('sweep', ...so, '--at', w.join(','));
    expect(s.status, s.stderr).toBe(0);
    const sweep = JSON.parse(s.stdout);
    expect(sweep.engine.path).toBe('sparse');
    // The same G(iω) from the second-order matrices by a dense complex solve of (K − ω²M + iωD) q = F.
    w.forEach((om, f) => {
      const re = zeros(2 * N, 2 * N);
      const rhs = zeros(2 * N, 1);
      for (let i = 0; i < N; i++) {
        // Real form of the complex system [[Re, −Im], [Im, Re]].
        const kd = 2 * k - om * om * m, cd = om * (alpha * m + 2 * k * beta);
        re.data[i * 2 * N + i] = kd;
        re.data[(N + i) * 2 * N + N + i] = kd;
        re.data[i * 2 * N + N + i] = -cd;
        re.data[(N + i) * 2 * N + i] = cd;
        if (i + 1 < N) {
          for (const [a, b] of [[i, i + 1], [i + 1, i]]) {
            re.data[a * 2 * N + b] = -k;
            re.data[(N + a) * 2 * N + N + b] = -k;
            re.data[a * 2 * N + N + b] = om * k * beta;
            re.data[(N + a) * 2 * N + b] = -om * k * beta;
          }
        }
      }
      rhs.data[at - 1] = 1;
      const q = solve(re, rhs);
      const g = { re: q.data[at - 1], im: q.data[N + at - 1] };
      const got = { re: sweep.response[f].re[0][0], im: sweep.response[f].im[0][0] };
      expect(Math.hypot(got.re - g.re, got.im - g.im) / Math.hypot(g.re, g.im)).toBeLessThan(1e-9);
    });
    const r = cli('reduce', ...so, '--method', 'balanced', '--order', '8', '--error-points', '40');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.engine.path).toBe('sparse');
    expect(out.A).toHaveLength(8);
    expect(out.hInfinityError).toBeLessThanOrEqual(out.errorBound * (1 + 1e-6));
  });

  it('refuses an incomplete second-order model, --E beside --mass and --path dense, naming the option', () => {
    const noK = cli('analyze', '--mass', path.join(dir, 'M.mtx'), path.join(dir, 'F.mtx'), path.join(dir, 'C.mtx'));
    expect(noK.status).toBe(2);
    expect(noK.stderr).toContain('field: stiffness');
    const withE = cli('analyze', ...so, '--E', path.join(dir, 'M.mtx'));
    expect(withE.status).toBe(2);
    expect(withE.stderr).toContain('field: E');
    const dense = cli('analyze', ...so, '--path', 'dense');
    expect(dense.status).toBe(2);
    expect(dense.stderr).toContain('field: path');
    const wrongC = cli('analyze', '--mass', path.join(dir, 'M.mtx'), '--stiffness', path.join(dir, 'K.mtx'), path.join(dir, 'F.mtx'), path.join(dir, 'F.mtx'));
    expect(wrongC.status).toBe(2);
    expect(wrongC.stderr).toContain('field: C');
  });
});
