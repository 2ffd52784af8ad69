#!/usr/bin/python3
"""Reference for the sparse second-order conversion (tests/unit/engine/sparse-second-order.test.ts),
computed with Debian's SciPy from the second-order form itself, never from a first-order realization:

    G(jw) = (Cd + jw Cv) (K - w^2 M + jw D)^-1 F          (a q x q complex sparse solve, SuperLU)

and the eigenvalues of the quadratic eigenvalue problem (lambda^2 M + lambda D + K) x = 0 from
scipy.linalg.eig on the second companion pencil ([[-D, -K], [I, 0]], [[M, 0], [0, I]]) -- a different
linearisation from the one under test (Tisseur & Meerbergen, SIAM Review 43(2), 2001, eq. 3.6).

Usage: /usr/bin/python3 tests/reference/second_order_reference.py REQUEST.json RESPONSE.json
REQUEST: {"dir": folder with M.mtx, D.mtx, K.mtx (coordinate) and F.mtx, Cd.mtx, Cv.mtx (array),
"frequencies": [...]}. RESPONSE: {"re": [[[...]]], "im": ..., "eigenvalues": {"re": [...], "im": [...]}}.
"""
import json
import sys

import numpy as np
import scipy.io
import scipy.linalg as la
import scipy.sparse as sp
import scipy.sparse.linalg as spla


def main():
    request = json.load(open(sys.argv[1]))
    d = request["dir"]
    read = lambda name: scipy.io.mmread(f"{d}/{name}.mtx")
    M, D, K = (sp.csc_matrix(read(x)) for x in ("M", "D", "K"))
    F, Cd, Cv = (np.asarray(read(x), dtype=float) for x in ("F", "Cd", "Cv"))
    re, im = [], []
    for w in request["frequencies"]:
        lu = spla.splu(sp.csc_matrix(K - w * w * M + 1j * w * D, dtype=complex))
        X = lu.solve(F.astype(complex))
        G = (Cd + 1j * w * Cv) @ X
        re.append(G.real.tolist())
        im.append(G.imag.tolist())
    q = M.shape[0]
    I = np.eye(q)
    Z = np.zeros((q, q))
    lam = la.eig(np.block([[-D.toarray(), -K.toarray()], [I, Z]]), np.block([[M.toarray(), Z], [Z, I]]), right=False)
    json.dump({"re": re, "im": im, "eigenvalues": {"re": lam.real.tolist(), "im": lam.imag.tolist()}}, open(sys.argv[2], "w"))


main()
