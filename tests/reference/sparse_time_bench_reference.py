#!/usr/bin/python3
"""Reference side of `npm run bench`'s sparse time-response case: the heat-conduction plate's step response
timed with scipy.integrate.solve_ivp.

Usage: /usr/bin/python3 tests/reference/sparse_time_bench_reference.py CASE N DIR [--no-time]

The model (N states, N a perfect square) is the plate of tests/reference/sparse_bench_reference.py (2-D
Dirichlet Laplacian, 5-point stencil, convection 10*d/dy; two inputs, two outputs). Writes A.mtx, B.npy and
C.npy into DIR, times the case's scipy code (best of at least three runs and one second of runs, stopping
once they pass 10 s: the rule of scripts/bench.ts), saves its outputs, and prints one JSON line {"case", "n",
"seconds", "peakRssKb", "blas", "method", "steps", "nfev", "nlu"}.

Cases
  sparse-stiff-step  unit step on both inputs from rest over [0, T_END], outputs at POINTS uniform times:
                     solve_ivp(method='BDF', jac=A as scipy.sparse CSC, so that its Newton matrices
                     I - c*A are factored by SuperLU), rtol REL_TOL, atol ABS_TOL, dense_output=True and the
                     outputs from its interpolant (sol.t then holds every accepted step); saves ref_y.npy
                     (POINTS x 2) and ref_stats.json (steps, nfev, nlu)
"""
import json
import os
import sys

import numpy as np
import scipy.integrate
import scipy.io

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from sparse_bench_reference import plate  # noqa: E402
from bench_timing import best_time, print_result  # noqa: E402

T_END = 0.3
POINTS = 201
REL_TOL = 1e-6
ABS_TOL = 1e-12  # the states are of order 1e-6 (B = 1/n on a quarter of the plate)


def step_response(a, b, c, times):
    bu = b @ np.ones(b.shape[1])
    sol = scipy.integrate.solve_ivp(lambda _t, x: a @ x + bu, (0.0, T_END), np.zeros(a.shape[0]), method="BDF",
                                    jac=a, rtol=REL_TOL, atol=ABS_TOL, dense_output=True)
    if sol.status != 0:
        sys.exit(f"sparse_time_bench_reference.py: solve_ivp failed: {sol.message}")
    return (c @ sol.sol(times)).T, sol


def main():
    args = [x for x in sys.argv[1:] if not x.startswith("--")]
    timed = "--no-time" not in sys.argv
    case, n, out = args[0], int(args[1]), args[2]
    if case != "sparse-stiff-step":
        sys.exit(f"sparse_time_bench_reference.py: unknown case {case!r}")
    a, b, c = plate(n)
    scipy.io.mmwrite(os.path.join(out, "A.mtx"), a)
    np.save(os.path.join(out, "B.npy"), b)
    np.save(os.path.join(out, "C.npy"), c)
    times = np.linspace(0.0, T_END, POINTS)
    seconds = None
    extra = {}
    if timed:
        seconds, (y, sol) = best_time(lambda: step_response(a, b, c, times))
        np.save(os.path.join(out, "ref_y.npy"), np.ascontiguousarray(y))
        extra = {"steps": int(len(sol.t) - 1), "nfev": int(sol.nfev), "nlu": int(sol.nlu)}
        with open(os.path.join(out, "ref_stats.json"), "w") as f:
            json.dump(extra, f)
    print_result(
        case,
        n,
        seconds,
        "scipy.sparse SuperLU",
        "solve_ivp BDF (variable order 1-5), sparse jac, rtol 1e-6, atol 1e-12, 201 outputs by dense output",
        **extra,
    )

if __name__ == "__main__":
    main()
