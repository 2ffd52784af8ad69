#!/usr/bin/python3
"""Reference side of `npm run bench`: generates a seeded model, times numpy/scipy on it, saves both.

Usage: /usr/bin/python3 tests/reference/bench_reference.py CASE N DIR [--no-time]

Writes the inputs to DIR (A.npy, B.npy, C.npy, and w.npy for the frequency case) so the engine runs on
the very same matrices, writes the reference's results next to them (ref_*.npy) for the agreement
check, and prints one JSON line: {"case", "n", "seconds", "peakRssKb", "blas", "method"}.

Cases
  product       A @ A (BLAS dgemm)
  eigenvalues   numpy.linalg.eigvals (LAPACK dgeev, no vectors)
  balanced      balanced truncation end to end, square-root method (Laub, Heath, Paige & Ward 1987):
                two scipy.linalg.solve_continuous_lyapunov (Bartels-Stewart), Cholesky factors
                (symmetric eigen-factor if a gramian is numerically singular), SVD of Lq^T Lp, and the
                balanced realization W^T A T, W^T B, C T for the numerical minimal order
  gramians      both gramians by scipy.linalg.solve_continuous_lyapunov, their square-root factors as in
                `balanced`, and the Hankel singular values (singular values of Lq^T Lp)
  frequency     G(jw) = C (jwI - A)^-1 B at 1000 frequencies by the modal form (eigendecomposition once,
                then a diagonal solve per frequency): the quickest numpy route for a diagonalizable A
  analysis      the parts of a model analysis numpy/scipy have: poles (eigvals), modal form (eig), DC gain
                (solve), Hankel singular values as in `balanced`, H2 norm from the controllability factor

The model: A = Q (D + N) Q^T with Q a random orthogonal matrix, D block diagonal with decay rates
spread log-uniformly over three decades (one pole in five a lightly damped complex pair) and N a small
strictly upper triangular coupling; B, C Gaussian with 4 inputs and 4 outputs. Invented data.
BLAS/LAPACK threading is left as the environment sets it (OPENBLAS_* variables untouched).
"""
import json
import os
import resource
import sys
import time

import numpy as np
import scipy.linalg as sl

INPUTS = 4
OUTPUTS = 4


def blas_library():
    """The BLAS/LAPACK shared objects numpy has loaded (threadpoolctl when available, else /proc maps)."""
    try:
        import threadpoolctl  # noqa: F401

        info = threadpoolctl.threadpool_info()
        return "; ".join(f"{i.get('internal_api')} {i.get('version')} ({i.get('num_threads')} threads)" for i in info)
    except ImportError:
        pass
    libs = set()
    try:
        with open("/proc/self/maps") as f:
            for line in f:
                path = line.split()[-1] if len(line.split()) >= 6 else ""
                base = os.path.basename(path)
                if base.startswith("lib") and ("blas" in base or "lapack" in base):
                    libs.add(os.path.realpath(path))
    except OSError:
        return "unknown"
    return ", ".join(sorted(libs)) or "unknown"


def stable_model(n, seed):
    rng = np.random.default_rng(seed)
    q, _ = np.linalg.qr(rng.standard_normal((n, n)))
    t = np.zeros((n, n))
    i = 0
    while i < n:
        rate = 10.0 ** rng.uniform(0, 3)
        if i + 1 < n and rng.uniform() < 0.2:
            omega = rate * rng.uniform(2, 20)
            t[i : i + 2, i : i + 2] = [[-rate, omega], [-omega, -rate]]
            i += 2
        else:
            t[i, i] = -rate
            i += 1
    t += np.triu(rng.standard_normal((n, n)), 2) * (1.0 / np.sqrt(n))
    a = q @ t @ q.T
    b = rng.standard_normal((n, INPUTS))
    c = rng.standard_normal((OUTPUTS, n))
    return a, b, c


def square_root_factor(x):
    x = (x + x.T) / 2
    try:
        return np.linalg.cholesky(x)
    except np.linalg.LinAlgError:
        w, v = np.linalg.eigh(x)
        keep = w > len(w) * np.finfo(float).eps * w.max()
        return v[:, keep] * np.sqrt(w[keep])


def balanced(a, b, c):
    p = sl.solve_continuous_lyapunov(a, -b @ b.T)
    q = sl.solve_continuous_lyapunov(a.T, -c.T @ c)
    lp, lq = square_root_factor(p), square_root_factor(q)
    u, s, vt = np.linalg.svd(lq.T @ lp, full_matrices=False)
    k = int(np.sum(s > 1e-12 * s[0]))
    isq = 1 / np.sqrt(s[:k])
    t = lp @ vt[:k].T * isq
    w = lq @ u[:, :k] * isq
    return s, (w.T @ a @ t, w.T @ b, c @ t)


def frequency(a, b, c, w):
    lam, v = np.linalg.eig(a)
    cv = c @ v
    vb = np.linalg.solve(v, b)
    return np.stack([cv @ (vb / (1j * wk - lam)[:, None]) for wk in w])


def main():
    args = [x for x in sys.argv[1:] if not x.startswith("--")]
    timed = "--no-time" not in sys.argv
    if len(args) != 3:
        sys.exit("usage: bench_reference.py CASE N DIR [--no-time]")
    case, n, out = args[0], int(args[1]), args[2]
    seed = {"eigenvalues": 1, "balanced": 2, "frequency": 3, "product": 4, "analysis": 5, "gramians": 6}.get(case)
    if seed is None:
        sys.exit(f"bench_reference.py: unknown case {case!r}")
    a, b, c = stable_model(n, 1000 * seed + n)
    np.save(os.path.join(out, "A.npy"), a)
    np.save(os.path.join(out, "B.npy"), b)
    np.save(os.path.join(out, "C.npy"), c)
    w = np.logspace(-2, 4, 1000)
    if case == "frequency":
        np.save(os.path.join(out, "w.npy"), w)
    seconds = None
    if timed:
        # Best of at least three runs and one second of runs, stopping once they pass 10 s (the rule of scripts/bench.ts).
        runs = []
        while True:
            t0 = time.perf_counter()
            if case == "product":
                prod = a @ a
            elif case == "eigenvalues":
                lam = np.linalg.eigvals(a)
            elif case == "balanced":
                hsv, _ = balanced(a, b, c)
            elif case == "gramians":
                p = sl.solve_continuous_lyapunov(a, -b @ b.T)
                q = sl.solve_continuous_lyapunov(a.T, -c.T @ c)
                hsv = np.linalg.svd(square_root_factor(q).T @ square_root_factor(p), compute_uv=False)
            elif case == "analysis":
                poles = np.linalg.eigvals(a)
                lam, v = np.linalg.eig(a)
                dc = -c @ np.linalg.solve(a, b)
                hsv, _ = balanced(a, b, c)
                p = sl.solve_continuous_lyapunov(a, -b @ b.T)
                h2 = np.sqrt(np.trace(c @ p @ c.T))
            else:
                g = frequency(a, b, c, w)
            runs.append(time.perf_counter() - t0)
            if sum(runs) > 10.0 or (len(runs) >= 3 and sum(runs) >= 1.0) or len(runs) >= 50:
                break
        seconds = min(runs)
        if case == "product":
            np.save(os.path.join(out, "ref_prod.npy"), prod)
        elif case == "eigenvalues":
            np.save(os.path.join(out, "ref_eig.npy"), np.stack([lam.real, lam.imag], axis=1))
        elif case in ("balanced", "analysis", "gramians"):
            np.save(os.path.join(out, "ref_hsv.npy"), hsv)
        else:
            # Every 50th frequency, as (re, im) of the p x m matrices.
            sample = g[::50]
            np.save(os.path.join(out, "ref_freq.npy"), np.stack([sample.real, sample.imag], axis=1))
    print(
        json.dumps(
            {
                "case": case,
                "n": n,
                "seconds": seconds,
                "peakRssKb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
                "blas": blas_library(),
                "method": {
                    "product": "numpy matmul (dgemm)",
                    "eigenvalues": "numpy.linalg.eigvals (dgeev)",
                    "balanced": "2x solve_continuous_lyapunov + cholesky + svd + projection",
                    "gramians": "2x solve_continuous_lyapunov + cholesky + singular values",
                    "frequency": "eigendecomposition, diagonal solve per frequency",
                    "analysis": "eigvals + eig + solve + balanced + solve_continuous_lyapunov",
                }[case],
            }
        )
    )


if __name__ == "__main__":
    main()
