#!/usr/bin/python3
"""Reference values for the IRKA tests (tests/unit/engine/irka*.test.ts), computed with Debian's NumPy and
SciPy (LAPACK through numpy.linalg / scipy.linalg), independently of the engine's code.

Usage: /usr/bin/python3 tests/reference/irka_reference.py REQUEST.json RESPONSE.json

REQUEST is {"cases": [...]}; each case has a "name", the full model "A", "B", "C" (and optionally "D" and a
descriptor matrix "E") as lists of rows, and the tasks it asks for:

  "reduced": {"A", "B", "C", "D"}   with "conditions": true
      The first-order H2-optimality conditions at the reduced model's own poles (Gugercin, Antoulas &
      Beattie, "H2 model reduction for large-scale linear dynamical systems", SIAM J. Matrix Anal. Appl.
      30(2), 2008; tangential form for p x m models, Van Dooren, Gallivan & Absil, Appl. Math. Lett. 21(12),
      2008): with Ar = X diag(l) X^-1 (numpy.linalg.eig), b_i^T = row i of X^-1 Br, c_i = Cr x_i and
      s_i = -l_i, the relative mismatches
        right    |H(s_i) b_i - Hr(s_i) b_i| / |H(s_i) b_i|
        left     |c_i^T H(s_i) - c_i^T Hr(s_i)| / |c_i^T H(s_i)|
        hermite  |c_i^T H'(s_i) b_i - c_i^T Hr'(s_i) b_i| / |c_i^T H'(s_i) b_i|
      with H(s) = C (sE - A)^-1 B + D and H'(s) = -C (sE - A)^-1 E (sE - A)^-1 B by scipy.linalg.solve.
      Returned as "conditions": [{"pole": [re, im], "right", "left", "hermite"}].

  "points": [{"s": [re, im], "b": [[re, im], ...], "c": [[re, im], ...]}] with "reduced"
      The same three mismatches at given points and directions (the interpolation a projection enforces):
      "pointConditions": [{"right", "left", "hermite"}].

  "irka": {"shifts": [[re, im], ...] (the full conjugate-closed list), "tolerance", "maxIterations"}
      Algorithm 4.1 of Gugercin, Antoulas & Beattie 2008 for one input and one output, as printed: complex
      V = [(s_i E - A)^-1 B], W = [(s_i E - A)^-T C^T], Ar = (W^T E V)^-1 W^T A V, s_i <- -eig(Ar), until
      max_i |s_new - s_old| / |s_new| (shifts sorted by real then imaginary part) is at most the tolerance.
      Returned as "irka": {"shifts": [[re, im], ...] sorted, "iterations", "converged"}.
"""
import json
import sys

import numpy as np
from scipy import linalg


def mat(rows, shape=None):
    a = np.array(rows, dtype=float)
    if shape is not None and a.size == 0:
        a = np.zeros(shape)
    return a


def transfer(A, B, C, D, E, s):
    n = A.shape[0]
    M = s * E - A
    X = linalg.solve(M, B.astype(complex)) if n > 0 else np.zeros((0, B.shape[1]), dtype=complex)
    return C @ X + D, M


def derivative(A, B, C, E, s):
    n = A.shape[0]
    if n == 0:
        return np.zeros((C.shape[0], B.shape[1]), dtype=complex)
    M = s * E - A
    X = linalg.solve(M, B.astype(complex))
    Y = linalg.solve(M, E @ X)
    return -C @ Y


def rel(a, b):
    den = np.linalg.norm(a)
    return float(np.linalg.norm(a - b) / den) if den > 0 else float(np.linalg.norm(a - b))


def mismatches(full, red, s, b, c):
    A, B, C, D, E = full
    Ar, Br, Cr, Dr, Er = red
    H, _ = transfer(A, B, C, D, E, s)
    Hr, _ = transfer(Ar, Br, Cr, Dr, Er, s)
    dH = derivative(A, B, C, E, s)
    dHr = derivative(Ar, Br, Cr, Er, s)
    return {
        "right": rel(H @ b, Hr @ b),
        "left": rel(c @ H, c @ Hr),
        "hermite": rel(np.array([c @ dH @ b]), np.array([c @ dHr @ b])),
    }


def conditions(full, red):
    Ar, Br, Cr = red[0], red[1], red[2]
    lam, X = np.linalg.eig(Ar)
    Bt = np.linalg.solve(X, Br.astype(complex))
    Ct = Cr @ X
    out = []
    for i, l in enumerate(lam):
        m = mismatches(full, red, -l, Bt[i, :], Ct[:, i])
        m["pole"] = [float(l.real), float(l.imag)]
        out.append(m)
    return out


def irka_siso(A, B, C, E, shifts, tol, maxit):
    s = np.array(shifts, dtype=complex)
    b = B[:, 0].astype(complex)
    c = C[0, :].astype(complex)

    def key(v):
        return np.array(sorted(v, key=lambda z: (float("%.9g" % z.real), z.imag)))

    converged = False
    it = 0
    while it < maxit:
        V = np.column_stack([linalg.solve(si * E - A, b) for si in s])
        W = np.column_stack([linalg.solve((si * E - A).T, c) for si in s])
        Ar = np.linalg.solve(W.T @ E @ V, W.T @ A @ V)
        new = -np.linalg.eigvals(Ar)
        it += 1
        a, bnew = key(s), key(new)
        change = np.max(np.abs(bnew - a) / np.abs(bnew))
        s = new
        if change <= tol:
            converged = True
            break
    return {"shifts": [[float(z.real), float(z.imag)] for z in key(s)], "iterations": it, "converged": converged}


def main():
    req = json.load(open(sys.argv[1]))
    out = []
    for case in req["cases"]:
        A = mat(case["A"])
        n = A.shape[0]
        B = mat(case["B"])
        C = mat(case["C"])
        D = mat(case["D"]) if "D" in case else np.zeros((C.shape[0], B.shape[1]))
        E = mat(case["E"]) if "E" in case else np.eye(n)
        full = (A, B, C, D, E)
        ans = {"name": case["name"]}
        if "reduced" in case:
            r = case["reduced"]
            Ar = mat(r["A"])
            k = Ar.shape[0]
            Br = mat(r["B"], (k, B.shape[1]))
            Cr = mat(r["C"], (C.shape[0], k))
            Dr = mat(r["D"]) if "D" in r else np.zeros_like(D)
            red = (Ar, Br, Cr, Dr, np.eye(k))
            if case.get("conditions"):
                ans["conditions"] = conditions(full, red)
            if "points" in case:
                pc = []
                for p in case["points"]:
                    s = complex(p["s"][0], p["s"][1])
                    b = np.array([complex(x, y) for x, y in p["b"]])
                    c = np.array([complex(x, y) for x, y in p["c"]])
                    pc.append(mismatches(full, red, s, b, c))
                ans["pointConditions"] = pc
        if "irka" in case:
            q = case["irka"]
            shifts = [complex(x, y) for x, y in q["shifts"]]
            ans["irka"] = irka_siso(A, B, C, E, shifts, q["tolerance"], q["maxIterations"])
        out.append(ans)
    json.dump(out, open(sys.argv[2], "w"))


if __name__ == "__main__":
    main()
