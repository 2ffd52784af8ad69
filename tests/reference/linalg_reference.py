#!/usr/bin/python3
"""Reference values for the dense linear-algebra kernels, from Debian's numpy/scipy (LAPACK underneath).

Usage: /usr/bin/python3 tests/reference/linalg_reference.py INPUT.json OUTPUT.json

INPUT is a JSON list of tasks {"op": ..., "A": rows, ...}; OUTPUT is the list of results in the same
order. Matrices travel as lists of rows. Operations:
  eigvals  A          -> {"re": [...], "im": [...]}            numpy.linalg.eigvals (LAPACK dgeev)
  svdvals  A          -> {"s": [...]}                          scipy.linalg.svdvals (dgesdd)
  eigh     A          -> {"w": [...]}                          scipy.linalg.eigh values (dsyevr)
  lyap     A, Q       -> {"X": rows}                           solve_continuous_lyapunov(A, -Q)
  gramians A, B, C    -> {"P": rows, "Q": rows, "hsv": [...]}  both gramians and Hankel singular values
  sylvester A, B, C   -> {"X": rows}                           scipy.linalg.solve_sylvester (A X + X B = C)
  qr_rank  A          -> {"rank": r}                           numpy.linalg.matrix_rank
"""
import json
import sys

import numpy as np
import scipy.linalg as sl


def mat(rows):
    return np.array(rows, dtype=float)


def hankel_singular_values(p, q):
    """Square-root method (Laub, Heath, Paige & Ward 1987): svd(Lq^T Lp) with P = Lp Lp^T, Q = Lq Lq^T.
    Falls back to sqrt(eig(P Q)) when a gramian is numerically singular and Cholesky fails."""
    try:
        lp = np.linalg.cholesky((p + p.T) / 2)
        lq = np.linalg.cholesky((q + q.T) / 2)
        return sl.svdvals(lq.T @ lp)
    except np.linalg.LinAlgError:
        return np.sqrt(np.abs(np.sort(np.linalg.eigvals(p @ q).real)[::-1]))


def run(task):
    op = task["op"]
    if op == "eigvals":
        w = np.linalg.eigvals(mat(task["A"]))
        return {"re": w.real.tolist(), "im": w.imag.tolist()}
    if op == "svdvals":
        return {"s": sl.svdvals(mat(task["A"])).tolist()}
    if op == "eigh":
        return {"w": sl.eigh(mat(task["A"]), eigvals_only=True).tolist()}
    if op == "lyap":
        a, q = mat(task["A"]), mat(task["Q"])
        return {"X": sl.solve_continuous_lyapunov(a, -q).tolist()}
    if op == "gramians":
        a, b, c = mat(task["A"]), mat(task["B"]), mat(task["C"])
        p = sl.solve_continuous_lyapunov(a, -b @ b.T)
        q = sl.solve_continuous_lyapunov(a.T, -c.T @ c)
        return {"P": p.tolist(), "Q": q.tolist(), "hsv": hankel_singular_values(p, q).tolist()}
    if op == "sylvester":
        return {"X": sl.solve_sylvester(mat(task["A"]), mat(task["B"]), mat(task["C"])).tolist()}
    if op == "qr_rank":
        return {"rank": int(np.linalg.matrix_rank(mat(task["A"])))}
    raise ValueError(f"unknown op {op!r}")


def main():
    if len(sys.argv) != 3:
        sys.exit("usage: linalg_reference.py INPUT.json OUTPUT.json")
    with open(sys.argv[1]) as f:
        tasks = json.load(f)
    out = [run(t) for t in tasks]
    with open(sys.argv[2], "w") as f:
        json.dump(out, f)


if __name__ == "__main__":
    main()
