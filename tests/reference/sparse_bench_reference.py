#!/usr/bin/python3
"""Reference side of `npm run bench`'s sparse cases: a heat-conduction plate timed with scipy.sparse.

Usage: /usr/bin/python3 tests/reference/sparse_bench_reference.py CASE N DIR [--no-time]

The model (N states, N a perfect square s*s): the 2-D Dirichlet Laplacian on the unit square, 5-point
stencil, h = 1/(s+1) (LeVeque, "Finite Difference Methods for Ordinary and Partial Differential
Equations", SIAM 2007, section 3.2, from memory), plus a convection term 10*d/dy by central differences
(nonsymmetric); two inputs (heat on the left quarter, on the bottom third) and two outputs (mean
temperatures of the right quarter and the top third). Writes A.mtx (Matrix Market coordinate, scipy.io.mmwrite),
B.npy and C.npy into DIR, times the case's scipy code (best of at least three runs and one second of
runs, stopping once they pass 10 s: the rule of scripts/bench.ts), saves its results, and prints one JSON
line {"case", "n", "seconds", "peakRssKb", "blas", "method", ...}.

Cases
  sparse-balanced  low-rank ADI for both gramians (Penzl 2000; Li & White 2002) with SuperLU, shifts by
                   Penzl's heuristic from ARPACK Ritz values, residual 1e-10 (tests/reference/
                   sparse_reference.py's `lradi`), then square-root balanced truncation to order 20;
                   saves ref_hsv.npy
  sparse-sweep     G(jw) = C (jwI - A)^-1 B at 60 frequencies (logspace(-1, 5)), one SuperLU factorization
                   per frequency (scipy.sparse.linalg.splu); saves ref_sweep.npy (60 x 2: re, im)
"""
import os
import sys
import warnings

import numpy as np
import scipy.io
import scipy.sparse as sp
import scipy.sparse.linalg as spla

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from sparse_reference import lradi, penzl  # noqa: E402
from bench_timing import best_time, print_result  # noqa: E402

ORDER = 20
CONVECTION = 10.0
# lradi casts real shifts' complex matrices to float on purpose (imaginary part exactly zero).
warnings.simplefilter("ignore", np.exceptions.ComplexWarning if hasattr(np, "exceptions") else np.ComplexWarning)


def plate(n, convection=CONVECTION):
    s = int(round(n ** 0.5))
    if s * s != n:
        sys.exit(f"sparse_bench_reference.py: N must be a perfect square, got {n}")
    h = 1.0 / (s + 1)
    e = np.ones(s - 1)
    t = sp.diags([e, -2 * np.ones(s), e], [-1, 0, 1]) / (h * h)
    # central-difference convection c*d/dy along the fast index (as tests/unit/engine/sparse-support.ts)
    tc = sp.diags([e * (1 / (h * h) + convection / (2 * h)), -2 * np.ones(s) / (h * h), e * (1 / (h * h) - convection / (2 * h))], [-1, 0, 1])
    eye = sp.identity(s)
    a = (sp.kron(eye, tc) + sp.kron(t, eye)).tocsc()
    x, y = np.divmod(np.arange(n), s)
    b = np.stack([np.where(x < s / 4, 1.0 / n, 0.0), np.where(y < s / 3, 2.0 / n, 0.0)], axis=1)
    c = np.stack([np.where(y > 3 * s / 4, 4.0 / n, 0.0), np.where(x > 2 * s / 3, 3.0 / n, 0.0)])
    return a, b, c


def balanced(a, b, c):
    n = a.shape[0]
    lu = spla.splu(a)
    op = spla.LinearOperator((n, n), matvec=lambda v: a @ v, dtype=float)
    opi = spla.LinearOperator((n, n), matvec=lambda v: lu.solve(v), dtype=float)
    rp = spla.eigs(op, k=20, which="LM", return_eigenvectors=False, tol=1e-6)
    rm = spla.eigs(opi, k=10, which="LM", return_eigenvectors=False, tol=1e-6)
    cands = []
    for z in list(rp) + [1 / v for v in rm]:
        z = complex(z)
        if abs(z.imag) <= 1e-10 * abs(z):
            z = complex(z.real, 0)
        if z.imag >= 0 and z.real < 0 and all(abs(z - d) > 1e-12 * abs(z) for d in cands):
            cands.append(z)
    shifts = penzl(cands, 16)
    zc, itc = lradi(a, None, b, shifts, False)
    zo, ito = lradi(a, None, c.T, shifts, True)
    u, s, vt = np.linalg.svd(zo.T @ zc, full_matrices=False)
    k = ORDER
    isq = np.diag(1 / np.sqrt(s[:k]))
    t = zc @ vt[:k].T @ isq
    w = zo @ u[:, :k] @ isq
    return s, (w.T @ (a @ t), w.T @ b, c @ t), (itc, ito)


def sweep(a, b, c, freqs):
    eye = sp.identity(a.shape[0], format="csc")
    out = np.zeros((len(freqs), 2))
    for i, w in enumerate(freqs):
        g = c @ spla.splu((1j * w * eye - a).tocsc()).solve(b.astype(complex))
        out[i] = [g[0, 0].real, g[0, 0].imag]  # the first input to the first output
    return out


def main():
    args = [x for x in sys.argv[1:] if not x.startswith("--")]
    timed = "--no-time" not in sys.argv
    case, n, out = args[0], int(args[1]), args[2]
    if case not in ("sparse-balanced", "sparse-sweep"):
        sys.exit(f"sparse_bench_reference.py: unknown case {case!r}")
    a, b, c = plate(n)
    scipy.io.mmwrite(os.path.join(out, "A.mtx"), a)
    np.save(os.path.join(out, "B.npy"), b)
    np.save(os.path.join(out, "C.npy"), c)
    freqs = np.logspace(-1, 5, 60)
    np.save(os.path.join(out, "w.npy"), freqs)
    seconds = None
    extra = {}
    if timed:
        if case == "sparse-balanced":
            seconds, (hsv, _, its) = best_time(lambda: balanced(a, b, c))
            np.save(os.path.join(out, "ref_hsv.npy"), hsv)
            extra = {"adiSteps": list(its)}
        else:
            seconds, g = best_time(lambda: sweep(a, b, c, freqs))
            np.save(os.path.join(out, "ref_sweep.npy"), g)
    method = {
        "sparse-balanced": "low-rank ADI (SuperLU, Penzl shifts) + square-root balanced truncation",
        "sparse-sweep": "splu of (jwI - A) per frequency",
    }[case]
    print_result(case, n, seconds, "scipy.sparse SuperLU", method, **extra)

if __name__ == "__main__":
    main()
