#!/usr/bin/python3
"""Reference values for the engine tests, computed with Debian's NumPy and SciPy (LAPACK underneath).

Usage: /usr/bin/python3 tests/reference/reduction_reference.py REQUEST.json RESPONSE.json

REQUEST is {"cases": [{"name", "A", "B", "C", "D", "tasks": [...], "frequencies": [...], "reduced": {...}}]},
matrices as lists of rows. Tasks:
  "eig"   eigenvalues of A (numpy.linalg.eigvals, LAPACK dgeev), as [re, im] pairs
  "hsv"   Hankel singular values: gramians from scipy.linalg.solve_continuous_lyapunov (Bartels-Stewart),
          then the singular values of Lo^T Lc with P = Lc Lc^T, Q = Lo Lo^T from numpy.linalg.eigh (more
          accurate for the small values than sqrt(eig(P Q))), descending
  "response"    G(jw) = C (jwI - A)^-1 B + D at the "frequencies" (rad per time unit), by numpy.linalg.solve
                (LAPACK zgesv)
  "sv"          singular values of G(jw) at the "frequencies" (numpy.linalg.svd, LAPACK zgesdd)
  "h2"          sqrt(trace(C P C^T))
  "h_infinity"  sup_w sigma_max(G(jw)) by a dense log sweep refined with scipy.optimize.minimize_scalar
                around the best grid points: an estimate independent of the Hamiltonian method under test;
                {"value", "frequency"} (frequency null when the peak is at infinity)
  "error"       the same sweep on G - Gr, with Gr given as "reduced": {"A", "B", "C", "D"}
The response has one object per case with the keys of its tasks.
"""
import json
import sys

import numpy as np
from scipy import linalg, optimize


def matrix(rows, shape=None):
    if rows is None or len(rows) == 0:
        return np.zeros(shape if shape is not None else (0, 0))
    return np.array(rows, dtype=float)


def model_of(case):
    A = matrix(case["A"])
    n = A.shape[0]
    B = matrix(case["B"], (n, 0))
    C = matrix(case["C"], (0, n))
    D = matrix(case.get("D"), (C.shape[0], B.shape[1])) if case.get("D") is not None else np.zeros((C.shape[0], B.shape[1]))
    return A, B, C, D


def response(A, B, C, D, w):
    n = A.shape[0]
    if n == 0:
        return D.astype(complex)
    X = np.linalg.solve(1j * w * np.eye(n) - A, B.astype(complex))
    return C @ X + D


def sigma_max(A, B, C, D, w):
    return np.linalg.svd(response(A, B, C, D, w), compute_uv=False)[0]


def sigma_max_batch(A, B, C, D, ws):
    """sigma_max(G(jw)) for many w at once (batched LAPACK solves), in chunks to bound memory."""
    n = A.shape[0]
    out = np.empty(len(ws))
    for start in range(0, len(ws), 500):
        w = ws[start : start + 500]
        if n == 0:
            G = np.broadcast_to(D.astype(complex), (len(w),) + D.shape)
        else:
            M = 1j * w[:, None, None] * np.eye(n) - A
            X = np.linalg.solve(M, np.broadcast_to(B.astype(complex), (len(w),) + B.shape))
            G = C @ X + D
        out[start : start + 500] = np.linalg.svd(G, compute_uv=False)[:, 0]
    return out


def gramians(A, B, C):
    P = linalg.solve_continuous_lyapunov(A, -B @ B.T)
    Q = linalg.solve_continuous_lyapunov(A.T, -C.T @ C)
    return P, Q


def square_root_factor(X):
    """L with X = L L^T for symmetric positive semidefinite X (negative rounding-level eigenvalues dropped)."""
    lam, V = np.linalg.eigh(0.5 * (X + X.T))
    return V * np.sqrt(np.clip(lam, 0.0, None))


def h_infinity_sweep(A, B, C, D):
    """sup over w >= 0 of sigma_max, by a sweep plus local refinement (bounded Brent in log10 w)."""
    lam = np.linalg.eigvals(A) if A.shape[0] > 0 else np.array([])
    mags = np.abs(lam[np.abs(lam) > 0])
    lo = (mags.min() if mags.size else 1.0) / 1e3
    hi = (mags.max() if mags.size else 1.0) * 1e3
    grid = np.concatenate(([0.0], np.logspace(np.log10(lo), np.log10(hi), 6000)))
    values = sigma_max_batch(A, B, C, D, grid)
    best = max(values.max(), np.linalg.svd(D, compute_uv=False)[0] if D.size else 0.0)
    best_w = float(grid[values.argmax()]) if values.max() >= best else float("inf")
    for k in np.argsort(values)[::-1][:8]:
        if k == 0:
            continue
        a = np.log10(grid[max(k - 1, 1)])
        b = np.log10(grid[min(k + 1, len(grid) - 1)])
        r = optimize.minimize_scalar(
            lambda x: -sigma_max(A, B, C, D, 10.0**x), bounds=(a, b), method="bounded", options={"xatol": 1e-12}
        )
        if -r.fun > best:
            best = -r.fun
            best_w = float(10.0**r.x)
    return best, best_w


def run_case(case):
    A, B, C, D = model_of(case)
    out = {"name": case.get("name")}
    tasks = case.get("tasks", [])
    if "eig" in tasks:
        lam = np.linalg.eigvals(A)
        out["eig"] = [[float(z.real), float(z.imag)] for z in lam]
    if "hsv" in tasks or "h2" in tasks:
        P, Q = gramians(A, B, C)
        if "hsv" in tasks:
            s = np.linalg.svd(square_root_factor(Q).T @ square_root_factor(P), compute_uv=False)
            hsv = np.zeros(A.shape[0])
            hsv[: min(len(s), len(hsv))] = s[: len(hsv)]
            out["hsv"] = [float(x) for x in hsv]
        if "h2" in tasks:
            out["h2"] = float(np.sqrt(max(np.trace(C @ P @ C.T), 0.0)))
    if "response" in tasks:
        resp = [response(A, B, C, D, w) for w in case["frequencies"]]
        out["response"] = [{"re": g.real.tolist(), "im": g.imag.tolist()} for g in resp]
    if "sv" in tasks:
        out["sv"] = [np.linalg.svd(response(A, B, C, D, w), compute_uv=False).tolist() for w in case["frequencies"]]
    if "h_infinity" in tasks:
        value, w = h_infinity_sweep(A, B, C, D)
        out["h_infinity"] = {"value": float(value), "frequency": w if np.isfinite(w) else None}
    if "error" in tasks:
        Ar, Br, Cr, Dr = model_of(case["reduced"])
        Ae = linalg.block_diag(A, Ar)
        Be = np.vstack([B, Br])
        Ce = np.hstack([C, -Cr])
        value, w = h_infinity_sweep(Ae, Be, Ce, D - Dr)
        out["error"] = {"value": float(value), "frequency": w if np.isfinite(w) else None}
    return out


def main():
    with open(sys.argv[1]) as f:
        request = json.load(f)
    result = {"cases": [run_case(c) for c in request["cases"]]}
    with open(sys.argv[2], "w") as f:
        json.dump(result, f)


if __name__ == "__main__":
    main()
