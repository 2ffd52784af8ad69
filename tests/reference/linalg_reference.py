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
  product  A, B, ta, tb -> {"C": rows}                         op(A) @ op(B)
  solve    A, B       -> {"X", "inv", "sign", "logabs", "cond1"} numpy.linalg.solve, inv, slogdet, cond(A, 1)
  freqresp A, B, C, w -> {"re": [...], "im": [...]}            C (jwI - A)^-1 B by numpy.linalg.solve per w
  spsolve  n, colPtr, rowIndex, values, b, shift? -> {"re", "im"} scipy.sparse.linalg.spsolve of A (or A - j*shift*I)
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
    if op == "product":
        a, b = mat(task["A"]), mat(task["B"])
        if task.get("ta"):
            a = a.T
        if task.get("tb"):
            b = b.T
        return {"C": (a @ b).tolist()}
    if op == "solve":
        a = mat(task["A"])
        sign, logabs = np.linalg.slogdet(a)
        return {
            "X": np.linalg.solve(a, mat(task["B"])).tolist(),
            "inv": np.linalg.inv(a).tolist(),
            "sign": float(sign),
            "logabs": float(logabs),
            "cond1": float(np.linalg.cond(a, 1)),
        }
    if op == "freqresp":
        a, b, c = mat(task["A"]), mat(task["B"]), mat(task["C"])
        n = a.shape[0]
        g = [c @ np.linalg.solve(1j * w * np.eye(n) - a, b) for w in task["w"]]
        return {"re": [x.real.tolist() for x in g], "im": [x.imag.tolist() for x in g]}
    if op == "spsolve":
        import scipy.sparse as sp
        import scipy.sparse.linalg as spl

        n = task["n"]
        m = sp.csc_matrix((task["values"], task["rowIndex"], task["colPtr"]), shape=(n, n))
        if task.get("shift") is not None:
            m = m.astype(complex) - 1j * task["shift"] * sp.identity(n, format="csc")
        x = spl.spsolve(m, np.array(task["b"]))
        return {"re": np.real(x).tolist(), "im": np.imag(x).tolist()}
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
