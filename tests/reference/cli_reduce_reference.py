#!/usr/bin/python3
"""Reference for the `cli-reduce` case of `npm run bench`: balanced truncation to a given order with the
measured H-infinity error, computed with numpy/scipy the straightforward way, timed as a whole process
(interpreter start-up, imports and reading the Matrix Market files included), like the engine's command
line it is compared with.

Usage:
  /usr/bin/python3 tests/reference/cli_reduce_reference.py N DIR [--no-time]   writes DIR/{A,B,C}.mtx, times a run
  /usr/bin/python3 tests/reference/cli_reduce_reference.py --run DIR ORDER      the timed work itself

The work (what `cli.ts reduce --method balanced --order R` reports):
  * square-root balanced truncation (Laub, Heath, Paige & Ward 1987): two solve_continuous_lyapunov
    (Bartels-Stewart), Cholesky factors (eigen-factor if semidefinite), SVD, projection to order R;
  * the H-infinity norm of the error system G - Gr by the level-set iteration of Bruinsma & Steinbuch
    ("A fast algorithm to compute the H-infinity-norm of a transfer function matrix", Systems & Control
    Letters 14, 1990): a starting lower bound from a log-spaced sweep of sigma_max (modal form of each
    part), then Hamiltonian eigenvalue tests (scipy.linalg.eigvals) until no imaginary eigenvalue is left.
The model is the seeded one of bench_reference.py (invented data).
"""
import json
import os
import resource
import subprocess
import sys
import time


def generate(n, out):
    import numpy as np
    import scipy.io

    sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
    from bench_reference import stable_model

    a, b, c = stable_model(n, 7000 + n)
    for name, m in (("A", a), ("B", b), ("C", c)):
        scipy.io.mmwrite(os.path.join(out, f"{name}.mtx"), m, precision=17)


def square_root_factor(x):
    import numpy as np

    x = (x + x.T) / 2
    try:
        return np.linalg.cholesky(x)
    except np.linalg.LinAlgError:
        w, v = np.linalg.eigh(x)
        keep = w > len(w) * np.finfo(float).eps * w.max()
        return v[:, keep] * np.sqrt(w[keep])


def sigma_max_modal(parts, w):
    """sigma_max(sum_k C_k (jw - A_k)^-1 B_k) on a modal form of each part."""
    import numpy as np

    out = []
    for wk in w:
        g = sum(cv @ (vb / (1j * wk - lam)[:, None]) for lam, cv, vb in parts)
        out.append(np.linalg.svd(g, compute_uv=False)[0])
    return np.array(out)


def run(directory, order):
    import numpy as np
    import scipy.io
    import scipy.linalg as sl

    a = np.asarray(scipy.io.mmread(os.path.join(directory, "A.mtx")))
    b = np.asarray(scipy.io.mmread(os.path.join(directory, "B.mtx")))
    c = np.asarray(scipy.io.mmread(os.path.join(directory, "C.mtx")))
    p = sl.solve_continuous_lyapunov(a, -b @ b.T)
    q = sl.solve_continuous_lyapunov(a.T, -c.T @ c)
    lp, lq = square_root_factor(p), square_root_factor(q)
    u, s, vt = np.linalg.svd(lq.T @ lp, full_matrices=False)
    isq = 1 / np.sqrt(s[:order])
    t = lp @ vt[:order].T * isq
    w_ = lq @ u[:, :order] * isq
    ar, br, cr = w_.T @ a @ t, w_.T @ b, c @ t
    # Error system E = G - Gr: A_e = diag(A, Ar), B_e = [B; Br], C_e = [C, -Cr], D_e = 0.
    ae = sl.block_diag(a, ar)
    be = np.vstack([b, br])
    ce = np.hstack([c, -cr])
    parts = []
    for aa, bb, cc in ((a, b, c), (ar, br, -cr)):
        lam, v = np.linalg.eig(aa)
        parts.append((lam, cc @ v, np.linalg.solve(v, bb)))
    lam_all = np.concatenate([parts[0][0], parts[1][0]])
    mags = np.abs(lam_all)
    grid = np.concatenate([[0.0], np.logspace(np.log10(mags.min() / 10), np.log10(mags.max() * 10), 200)])
    sig = sigma_max_modal(parts, grid)
    lower = sig.max()
    eps = 1e-9
    solves = 0
    for _ in range(30):
        gamma = (1 + 2 * eps) * lower
        ham = np.block([[ae, be @ be.T / gamma], [-ce.T @ ce / gamma, -ae.T]])
        ev = sl.eigvals(ham)
        solves += 1
        radius = np.abs(ev).max()
        imag = np.sort(ev.imag[np.abs(ev.real) <= 1e-3 * (np.abs(ev) + 1e-8 * radius)])
        if len(imag) == 0:
            break
        mids = np.abs(0.5 * (imag[:-1] + imag[1:]))
        if len(mids) == 0:
            break
        vals = sigma_max_modal(parts, mids)
        if vals.max() <= gamma:
            break
        lower = vals.max()
    return {"hsv": s.tolist(), "hInfinityError": float(lower), "hamiltonianSolves": solves}


def main():
    args = [x for x in sys.argv[1:] if not x.startswith("--")]
    if "--run" in sys.argv:
        result = run(args[0], int(args[1]))
        print(json.dumps(result))
        return
    n, out = int(args[0]), args[1]
    generate(n, out)
    seconds = None
    peak = None
    if "--no-time" not in sys.argv:
        runs = []
        while True:
            t0 = time.perf_counter()
            r = subprocess.run([sys.executable, os.path.abspath(__file__), "--run", out, "20"], capture_output=True, text=True, check=True)
            runs.append(time.perf_counter() - t0)
            if sum(runs) > 10.0 or (len(runs) >= 3 and sum(runs) >= 1.0) or len(runs) >= 50:
                break
        seconds = min(runs)
        result = json.loads(r.stdout.strip().splitlines()[-1])
        with open(os.path.join(out, "ref_cli_reduce.json"), "w") as f:
            json.dump(result, f)
        peak = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
    print(json.dumps({"case": "cli-reduce", "n": n, "seconds": seconds, "peakRssKb": peak,
                      "method": "BT (2x solve_continuous_lyapunov) + H-inf error (sweep + Hamiltonian eigvals)"}))


if __name__ == "__main__":
    main()
