#!/usr/bin/python3
"""Reference values for frequency-limited balanced truncation (Debian python3-numpy / python3-scipy).

Reads one JSON request on stdin, writes one JSON answer on stdout.

  {"op": "logm", "M": [[..]]}
      -> {"logm": [[..]]}                    scipy.linalg.logm (real part; the input has a real logarithm)
  {"op": "gramians", "A", "B", "C", "band": [w1, w2]}
      -> {"S", "P", "Q", "P_band", "Q_band", "P_quad", "sigma"}
         S = S(w2) - S(w1) with S(w) = Re((j/2pi) logm((A + jwI)(A - jwI)^-1)), Gawronski & Juang (1990),
         computed here with the paper's own form (not the engine's -A - jwI form);
         P, Q by scipy.linalg.solve_continuous_lyapunov; P_band = S P + P S^T, Q_band = S^T Q + Q S;
         P_quad = (1/2pi) * integral over w1 <= |v| <= w2 of (jvI - A)^-1 B B^T (jvI - A)^-H dv by
         scipy.integrate.quad_vec (an independent check of the closed form);
         sigma = sqrt of the eigenvalues of P_band Q_band, descending (the frequency-limited Hankel
         singular values).
"""
import json
import sys

import numpy as np
import scipy.integrate
import scipy.linalg


def S_of(A, w):
    n = A.shape[0]
    if w == 0:
        return np.zeros((n, n))
    I = np.eye(n)
    X = (A + 1j * w * I) @ np.linalg.inv(A - 1j * w * I)
    return np.real((1j / (2 * np.pi)) * scipy.linalg.logm(X))


def main():
    req = json.load(sys.stdin)
    op = req["op"]
    if op == "logm":
        out = {"logm": np.real(scipy.linalg.logm(np.asarray(req["M"], dtype=float))).tolist()}
    elif op == "gramians":
        A = np.asarray(req["A"], dtype=float)
        B = np.asarray(req["B"], dtype=float)
        C = np.asarray(req["C"], dtype=float)
        w1, w2 = req["band"]
        n = A.shape[0]
        S = S_of(A, w2) - S_of(A, w1)
        P = scipy.linalg.solve_continuous_lyapunov(A, -B @ B.T)
        Q = scipy.linalg.solve_continuous_lyapunov(A.T, -C.T @ C)
        Pb = S @ P + P @ S.T
        Qb = S.T @ Q + Q @ S
        I = np.eye(n)

        def integrand(v):
            H = np.linalg.solve(1j * v * I - A, B)
            return np.real(H @ H.conj().T)

        # Both signs of v give the same real part (the integrand at -v is the conjugate), hence 2/(2pi).
        Pq, _ = scipy.integrate.quad_vec(integrand, w1, w2, epsabs=1e-13, epsrel=1e-11)
        Pq = Pq / np.pi
        ev = np.linalg.eigvals(Pb @ Qb)
        sigma = np.sort(np.sqrt(np.abs(np.real(ev))))[::-1]
        out = {"S": S.tolist(), "P": P.tolist(), "Q": Q.tolist(), "P_band": Pb.tolist(), "Q_band": Qb.tolist(),
               "P_quad": Pq.tolist(), "sigma": sigma.tolist()}
    else:
        raise SystemExit("unknown op " + op)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
