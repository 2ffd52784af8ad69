#!/usr/bin/python3
"""Reference values for the sparse-path tests (tests/unit/engine/sparse-*.test.ts), computed with Debian's
SciPy (scipy.sparse, SuperLU, ARPACK, LAPACK), independently of the engine's code.

Usage: /usr/bin/python3 tests/reference/sparse_reference.py REQUEST.json RESPONSE.json

REQUEST is {"dir": folder holding A.mtx, B.mtx, C.mtx and optionally E.mtx (read by scipy.io.mmread),
"tasks": [...], "frequencies": [...], "order": r}. Tasks:
  "dense"     A (and E) as dense lists of rows (scipy.io.mmread, .toarray())
  "hsv"       Hankel singular values of E x' = A x + B u, y = C x from the dense gramians:
              scipy.linalg.solve_continuous_lyapunov (Bartels-Stewart) on (E^-1 A, E^-1 B) and
              ((E^-1 A)^T, C^T), i.e. P and E^T Q E, then sqrt of the eigenvalues of P (E^T Q E) through
              the singular values of Lo^T Lc with Cholesky-like factors from numpy.linalg.eigh; descending.
              Exact up to rounding, for small models.
  "lradi"     an independent low-rank ADI (Penzl 2000; Li & White 2002) with SuperLU (scipy.sparse.linalg
              .splu) on complex shifted matrices, shifts by Penzl's heuristic from ARPACK Ritz values
              (scipy.sparse.linalg.eigs on E^-1 A, largest magnitude, and with sigma=0, smallest), stopped at
              normalised residual 1e-10; then square-root balanced truncation to "order": returns
              "hsv" (singular values of Zo^T E Zc), "iterations" and the reduced model "Ar", "Br", "Cr"
  "response"  G(jw) = C (jw E - A)^-1 B at the "frequencies" (rad per time unit) by SuperLU, as {"re", "im"}
              p x m lists
The response has one key per task.
"""
import json
import sys

import numpy as np
import scipy.io
import scipy.sparse as sp
import scipy.sparse.linalg as spla
from scipy import linalg


def load(folder, name):
    try:
        m = scipy.io.mmread(f"{folder}/{name}.mtx")
    except FileNotFoundError:
        return None
    return m


def factor(X):
    w, V = np.linalg.eigh((X + X.T) / 2)
    w = np.clip(w, 0, None)
    return V * np.sqrt(w)


def hsv_dense(A, E, B, C):
    Ad = A.toarray()
    Ed = np.eye(Ad.shape[0]) if E is None else E.toarray()
    At = np.linalg.solve(Ed, Ad)
    Bt = np.linalg.solve(Ed, B)
    P = linalg.solve_continuous_lyapunov(At, -Bt @ Bt.T)
    Qt = linalg.solve_continuous_lyapunov(At.T, -C.T @ C)
    s = np.linalg.svd(factor(Qt).T @ factor(P), compute_uv=False)
    return sorted(s.tolist(), reverse=True)


def penzl(cands, l0):
    cands = [c for c in cands if c.real < 0]
    full = np.array(cands + [np.conj(c) for c in cands if c.imag != 0])

    def rat(p):
        ps = [p] if p.imag == 0 else [p, np.conj(p)]
        v = np.ones(len(full))
        for q in ps:
            v = v * np.abs(full - q) / np.abs(full + q)
        return v

    first = min(cands, key=lambda p: rat(p).max())
    chosen = [first]
    value = rat(first)
    count = 1 if first.imag == 0 else 2
    while count < l0:
        t = full[np.argmax(value)]
        p = complex(t.real, abs(t.imag))
        if any(abs(p - c) == 0 for c in chosen):
            break
        chosen.append(p)
        count += 1 if p.imag == 0 else 2
        value = value * rat(p)
    return chosen


def lradi(A, E, R, shifts, transpose, tol=1e-10, maxit=300):
    n = A.shape[0]
    Es = sp.identity(n, format="csc") if E is None else E.tocsc()
    As = A.tocsc()
    if transpose:
        As, Es = As.T.tocsc(), Es.T.tocsc()
    W = R.copy()
    b2 = np.linalg.norm(W, 2) ** 2
    Z = []
    its = 0
    k = 0
    lus = {}
    while its < maxit:
        p = shifts[k % len(shifts)]
        k += 1
        if p not in lus:
            lus[p] = spla.splu((As + p * Es).tocsc().astype(complex if p.imag else float))
        V = lus[p].solve(W.astype(complex) if p.imag else W)
        if p.imag == 0:
            p = p.real
            W = W - 2 * p * (Es @ V)
            Z.append(np.sqrt(-2 * p) * V)
            its += 1
        else:
            g = 2 * np.sqrt(-p.real)
            d = p.real / p.imag
            Vr = V.real + d * V.imag
            W = W + g * g * (Es @ Vr)
            Z.append(g * Vr)
            Z.append(g * np.sqrt(d * d + 1) * V.imag)
            its += 2
        if np.linalg.norm(W, 2) ** 2 / b2 <= tol:
            break
    return np.hstack(Z), its


def main():
    req = json.load(open(sys.argv[1]))
    folder = req["dir"]
    A = load(folder, "A").tocsc()
    E = load(folder, "E")
    E = None if E is None else E.tocsc()
    B = np.atleast_2d(np.asarray(load(folder, "B"), dtype=float))
    C = np.atleast_2d(np.asarray(load(folder, "C"), dtype=float))
    n = A.shape[0]
    out = {}
    tasks = req["tasks"]
    if "dense" in tasks:
        out["A"] = A.toarray().tolist()
        out["E"] = None if E is None else E.toarray().tolist()
    if "hsv" in tasks:
        out["hsv"] = hsv_dense(A, E, B, C)
    if "lradi" in tasks:
        Es = sp.identity(n, format="csc") if E is None else E
        Elu = spla.splu(Es.tocsc())
        Alu = spla.splu(A.tocsc())
        op = spla.LinearOperator((n, n), matvec=lambda x: Elu.solve(A @ x), dtype=float)
        opi = spla.LinearOperator((n, n), matvec=lambda x: Alu.solve(Es @ x), dtype=float)
        rp = spla.eigs(op, k=min(20, n - 2), which="LM", return_eigenvectors=False, tol=1e-6)
        rm = spla.eigs(opi, k=min(10, n - 2), which="LM", return_eigenvectors=False, tol=1e-6)
        cands = []
        for c in list(rp) + [1 / x for x in rm]:
            c = complex(c)
            if abs(c.imag) <= 1e-10 * abs(c):
                c = complex(c.real, 0)
            if c.imag >= 0 and c.real < 0 and all(abs(c - d) > 1e-12 * abs(c) for d in cands):
                cands.append(c)
        shifts = penzl(cands, 16)
        Zc, itc = lradi(A, E, B, shifts, False)
        Zo, ito = lradi(A, E, C.T, shifts, True)
        U, s, Vt = np.linalg.svd(Zo.T @ (Es @ Zc), full_matrices=False)
        r = req["order"]
        S = np.diag(1 / np.sqrt(s[:r]))
        T = Zc @ Vt[:r].T @ S
        Wm = Zo @ U[:, :r] @ S
        out["lradi"] = {
            "hsv": s.tolist(),
            "iterations": [itc, ito],
            "Ar": (Wm.T @ (A @ T)).tolist(),
            "Br": (Wm.T @ B).tolist(),
            "Cr": (C @ T).tolist(),
        }
    if "response" in tasks:
        Es = sp.identity(n, format="csc") if E is None else E
        res = []
        for w in req["frequencies"]:
            lu = spla.splu((1j * w * Es - A).tocsc().astype(complex))
            G = C @ lu.solve(B.astype(complex))
            res.append({"re": G.real.tolist(), "im": G.imag.tolist()})
        out["response"] = res
    json.dump(out, open(sys.argv[2], "w"))


if __name__ == "__main__":
    main()
