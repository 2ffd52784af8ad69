#!/usr/bin/python3
"""Reference for the order slider's figures (lib/engine-tasks/order-figures.ts), from Debian's NumPy/SciPy.

Usage: /usr/bin/python3 tests/reference/order_figures_reference.py REQUEST.json RESPONSE.json

REQUEST is {"A", "B", "C", "orders": [r, ...]} for a stable model. RESPONSE holds
  "hsv":     Hankel singular values, descending: gramians by scipy.linalg.solve_continuous_lyapunov
             (Bartels-Stewart), square-root factors from numpy.linalg.cholesky after symmetrising, and the
             singular values of Lo^T Lc (Laub, Heath, Paige & Ward, IEEE TAC 32(2), 1987)
  "figures": per order r, from the balanced truncation formed here in the square-root form
             Ar = W^T A T with T = Lc V_r S_r^-1/2, W = Lo U_r S_r^-1/2 (Tombs & Postlethwaite 1987):
               "bound":     2 * sum(hsv[r:]) (Enns 1984; Glover 1984)
               "stiffness": max(-Re l) / min(-Re l) over the eigenvalues of Ar (numpy.linalg.eigvals)
               "euler":     min over the eigenvalues of -2 Re l / |l|^2 (forward Euler's stability disc,
                            Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, section IV.2)
"""
import json
import sys

import numpy as np
from scipy import linalg


def main(request_path, response_path):
    with open(request_path) as f:
        req = json.load(f)
    A = np.array(req["A"], dtype=float)
    B = np.array(req["B"], dtype=float)
    C = np.array(req["C"], dtype=float)
    P = linalg.solve_continuous_lyapunov(A, -B @ B.T)
    Q = linalg.solve_continuous_lyapunov(A.T, -C.T @ C)
    Lc = np.linalg.cholesky((P + P.T) / 2)
    Lo = np.linalg.cholesky((Q + Q.T) / 2)
    U, s, Vt = np.linalg.svd(Lo.T @ Lc)
    figures = {}
    for r in req["orders"]:
        S = np.diag(s[:r] ** -0.5)
        T = Lc @ Vt[:r].T @ S
        W = Lo @ U[:, :r] @ S
        Ar = W.T @ A @ T
        l = np.linalg.eigvals(Ar)
        rates = -l.real
        figures[str(r)] = {
            "bound": float(2 * s[r:].sum()),
            "stiffness": float(rates.max() / rates.min()),
            "euler": float(np.min(-2 * l.real / np.abs(l) ** 2)),
        }
    with open(response_path, "w") as f:
        json.dump({"hsv": s.tolist(), "figures": figures}, f)


if __name__ == "__main__":
    main(sys.argv[1], sys.argv[2])
