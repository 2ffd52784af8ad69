#!/usr/bin/python3
"""Reference values for the sparse eigenvalue and dominant-pole tests (tests/unit/engine/sparse-eigs.test.ts and
sparse-modal.test.ts), computed with Debian's SciPy (ARPACK through scipy.sparse.linalg.eigs, LAPACK through
scipy.linalg.eig), independently of the engine's code.

Usage: /usr/bin/python3 tests/reference/sparse_eigs_reference.py REQUEST.json RESPONSE.json

REQUEST is {"dir": folder holding A.mtx, B.mtx, C.mtx and optionally E.mtx, "tasks": [...], ...}. Tasks:
  "eigs"       the "k" eigenvalues of A x = lambda E x nearest sigma = "sigma" [re, im], by
               scipy.sparse.linalg.eigs(A, k, M=E, sigma=sigma) (ARPACK shift-invert, SuperLU); a complex
               sigma runs on the complex copies of A and E (ARPACK's complex driver), since the real driver
               needs a real shift. Returns [[re, im], ...].
  "dominance"  the dense generalized eigendecomposition of (A, E) with left and right vectors
               (scipy.linalg.eig(A, E, left=True, right=True)); each pole's residue
               R = (C x)(y^H B) / (y^H E x), its 2-norm, and its dominance ||R|| / |Re lambda| (twice that for
               a complex pair, which is listed once with Im >= 0), sorted most dominant first. Returns
               [{"re", "im", "residueNorm", "dominance"}, ...] (the first "k").
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
        return scipy.io.mmread(f"{folder}/{name}.mtx")
    except FileNotFoundError:
        return None


def main():
    with open(sys.argv[1]) as f:
        req = json.load(f)
    folder = req["dir"]
    A = sp.csc_matrix(load(folder, "A"))
    E = load(folder, "E")
    E = sp.identity(A.shape[0], format="csc") if E is None else sp.csc_matrix(E)
    B = np.asarray(load(folder, "B"))
    C = np.asarray(load(folder, "C"))
    out = {}
    if "eigs" in req["tasks"]:
        s = complex(req["sigma"][0], req["sigma"][1])
        if s.imag == 0:
            vals = spla.eigs(A, k=req["k"], M=E, sigma=s.real, return_eigenvectors=False, tol=1e-14)
        else:
            vals = spla.eigs(A.astype(complex), k=req["k"], M=E.astype(complex), sigma=s, return_eigenvectors=False, tol=1e-14)
        out["eigs"] = [[float(v.real), float(v.imag)] for v in vals]
    if "dominance" in req["tasks"]:
        w, vl, vr = linalg.eig(A.toarray(), E.toarray(), left=True, right=True)
        Ed = E.toarray()
        rows = []
        for i in range(len(w)):
            lam = w[i]
            if lam.imag < 0:
                continue
            x = vr[:, i]
            y = vl[:, i]
            d = y.conj() @ Ed @ x
            R = np.outer(C @ x, y.conj() @ B) / d
            rn = float(np.linalg.norm(R, 2))
            pair = lam.imag > 0
            rows.append({"re": float(lam.real), "im": float(lam.imag), "residueNorm": rn,
                         "dominance": (2 if pair else 1) * rn / abs(lam.real)})
        rows.sort(key=lambda r: -r["dominance"])
        out["dominance"] = rows[: req.get("k", len(rows))]
    with open(sys.argv[2], "w") as f:
        json.dump(out, f)


if __name__ == "__main__":
    main()
