#!/usr/bin/python3
"""Reference side of `npm run bench`'s second-order frame cases, timed with scipy.sparse.

Usage: /usr/bin/python3 tests/reference/frame_bench_reference.py CASE N DIR [--no-time]

The model (N first-order states, N = 4 * s * s): a plane lattice frame of s x s free nodes on a unit grid,
two displacement degrees of freedom per node, bars of axial stiffness EA/L along the grid lines and both
diagonals of every cell (EA = 1e4 on the grid lines, 0.5e4 on the diagonals), the left column of nodes
joined by the same bars to a rigid wall; lumped masses of 1 per node; Rayleigh damping D = a M + b K with
a = 0.04 and b = 0.01 (damping ratio (a/w + b w)/2 of the undamped modes, Clough & Penzien, "Dynamics of
Structures", 2nd ed. 1993, section 12-5, from memory): at 40,000 states the lowest modes (0.67 to about
4 rad/s) get 2 to 3.3 % of critical damping, a usual figure for frames (common practice), and the highest
ones are overdamped, as Rayleigh damping makes them. A bar element's stiffness is EA/L [uu', -uu'; -uu',
uu'] for its unit direction u (the plane truss element of any finite-element text). Inputs: a horizontal
force at the free top-right corner and a vertical one at the middle of the free edge; outputs: the
displacements in the same directions at the same nodes (collocated).

Writes M.mtx, K.mtx, D.mtx (Matrix Market coordinate, scipy.io.mmwrite), F.npy (q x 2) and C.npy (2 x q)
into DIR. The timed work, the same for both cases, is what the cases' checks compare against: the full
model's transfer matrix G(jw) = C (K - w^2 M + jw D)^-1 F at 40 frequencies (logspace(-2, 2.5)), one
SuperLU factorization of the second-order dynamic stiffness per frequency (scipy.sparse.linalg.splu), saved
as ref_sweep.npy (40 x 2 x 2 complex) with w.npy. The engine's side reduces the model (balanced truncation,
IRKA) on its first-order descriptor form, so the two times are not like for like: the table says so.
"""
import os
import sys

import numpy as np
import scipy.io
import scipy.sparse as sp
import scipy.sparse.linalg as spla

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from bench_timing import best_time, print_result  # noqa: E402

ALPHA, BETA = 0.04, 1e-2


def frame(n):
    s = int(round((n / 4) ** 0.5))
    if 4 * s * s != n:
        sys.exit(f"frame_bench_reference.py: N must be 4 s^2, got {n}")
    q = 2 * s * s

    def node(i, j):  # i: column (x), j: row (y); the wall is column -1
        return i * s + j

    rows, cols, vals = [], [], []

    def bar(a, b, dx, dy, ea):
        # a, b: node numbers, or -1 for the wall; direction (dx, dy) from a to b
        length = np.hypot(dx, dy)
        u = np.array([dx, dy]) / length
        k = ea / length * np.outer(u, u)
        ends = [(a, 1.0), (b, -1.0)]
        for na, sa in ends:
            for nb, sb in ends:
                if na < 0 or nb < 0:
                    continue
                for r in range(2):
                    for c in range(2):
                        rows.append(2 * na + r)
                        cols.append(2 * nb + c)
                        vals.append(sa * sb * k[r, c])

    for i in range(-1, s):
        for j in range(s):
            here = node(i, j) if i >= 0 else -1
            if i + 1 < s:
                bar(here, node(i + 1, j), 1, 0, 1e4)
                if j + 1 < s:
                    bar(here, node(i + 1, j + 1), 1, 1, 0.5e4)
                if j - 1 >= 0:
                    bar(here, node(i + 1, j - 1), 1, -1, 0.5e4)
            if i >= 0 and j + 1 < s:
                bar(here, node(i, j + 1), 0, 1, 1e4)
    k = sp.coo_matrix((vals, (rows, cols)), shape=(q, q)).tocsc()
    k.sum_duplicates()
    m = sp.identity(q, format="csc")
    d = (ALPHA * m + BETA * k).tocsc()
    f = np.zeros((q, 2))
    f[2 * node(s - 1, s - 1), 0] = 1.0  # horizontal force, top-right corner
    f[2 * node(s - 1, s // 2) + 1, 1] = 1.0  # vertical force, middle of the free edge
    c = f.T.copy()
    return m, k, d, f, c


def sweep(m, k, d, f, c, freqs):
    out = np.zeros((len(freqs), c.shape[0], f.shape[1]), dtype=complex)
    for i, w in enumerate(freqs):
        lu = spla.splu((k - w * w * m + 1j * w * d).tocsc())
        out[i] = c @ lu.solve(f.astype(complex))
    return out


def main():
    args = [x for x in sys.argv[1:] if not x.startswith("--")]
    timed = "--no-time" not in sys.argv
    case, n, out = args[0], int(args[1]), args[2]
    if case not in ("frame-balanced", "frame-irka"):
        sys.exit(f"frame_bench_reference.py: unknown case {case!r}")
    m, k, d, f, c = frame(n)
    for name, mat in (("M", m), ("K", k), ("D", d)):
        scipy.io.mmwrite(os.path.join(out, f"{name}.mtx"), mat)
    np.save(os.path.join(out, "F.npy"), f)
    np.save(os.path.join(out, "C.npy"), c)
    freqs = np.logspace(-2, 2.5, 40)
    np.save(os.path.join(out, "w.npy"), freqs)
    seconds = None
    if timed:
        seconds, g = best_time(lambda: sweep(m, k, d, f, c, freqs))
        np.save(os.path.join(out, "ref_sweep.npy"), np.stack([g.real, g.imag], axis=-1))
    print_result(
        case,
        n,
        seconds,
        "scipy.sparse SuperLU",
        "splu of K - w^2 M + jw D per frequency (the check's full-model response; not like for like)",
    )

if __name__ == "__main__":
    main()
