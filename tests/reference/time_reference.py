#!/usr/bin/python3
"""Reference values for the time-response tests and benchmark (Debian python3-numpy / python3-scipy).

Reads one JSON request on stdin, writes one JSON answer on stdout. A matrix is a list of rows, or
{"file": path, "shape": [rows, cols]} naming raw row-major float64 data (the benchmark's n = 1000 models).
Requests:

  {"op": "expm", "matrices": [[[..]], ...]}
      -> {"expm": [...]}                     scipy.linalg.expm of each (Al-Mohy & Higham 2009)
  {"op": "c2d", "A","B","C","D", "ts"}
      -> {"Ad","Bd","Cd","Dd"}               scipy.signal.cont2discrete(method="zoh")
  {"op": "step_closed_form", "A","B","C", "t": [..], "u": [..]}
      -> {"y": [[..] per t]}                 y(t) = C A^-1 (e^{At} - I) B u for a step from rest,
                                             e^{At} by scipy.linalg.expm, A^-1 by numpy.linalg.solve
  {"op": "zoh_recursion", "A","B","C","D", "ts", "steps", "u": [..]}
      -> {"y": [...], "seconds": {"expm": s, "recursion": s}}
                                             expm of the augmented matrix [[A, B],[0, 0]]·ts (Van Loan 1978)
                                             then x_{k+1} = Phi x_k + Gamma u: the benchmark's reference
  {"op": "sampled_zoh", "A","B","C","D", "sample_t": [..], "sample_u": [[..]], "t": [..], "initial_state": [..]}
      -> {"y": [[..] per t]}                 exact response to u held between samples (zero before the
                                             first): expm of [[A, B],[0, 0]]*dt on every sub-interval
  {"op": "impulse", "A","B","C", "t": [..], "w": [..]}
      -> {"y": [[..] per t]}                 y(t) = C e^{At} B w, e^{At} by scipy.linalg.expm
  bench CASE N DIR [--no-time]          (command line, not stdin) the benchmark's reference: see bench()
  {"op": "solve_ivp", "A","B","C", "u": [..], "t_end", "t_eval": [..], "method": "RK45"|"BDF",
   "rel_tol", "abs_tol"}
      -> {"y", "nfev", "njev", "nlu", "seconds"} scipy.integrate.solve_ivp with the constant Jacobian A
  {"op": "step_counts", "A","B","u": [..], "t_end", "methods": ["RK45","BDF","Radau"], "rel_tols": [..],
   "abs_tol" or "abs_tol_factor", "initial_state" (optional, zeros by default)}
      -> {"counts": {method: [{"rel_tol", "abs_tol", "steps", "nfev", "nlu", "status"} per rel_tol]}}
                                             accepted steps of scipy.integrate.solve_ivp from initial_state (no
                                             t_eval, so sol.t holds every step: steps = len(sol.t) - 1),
                                             with the constant Jacobian A for BDF and Radau; abs_tol is
                                             fixed, or rel_tol * abs_tol_factor
"""
import json
import os
import resource
import sys
import time

import numpy as np
import scipy.integrate
import scipy.linalg
import scipy.signal


def arr(x):
    """A matrix given inline as rows, or as {"file": path, "shape": [r, c]} of raw float64 (row-major),
    which the benchmark uses for n = 1000 models."""
    if isinstance(x, dict):
        return np.fromfile(x["file"], dtype=np.float64).reshape(x["shape"])
    return np.asarray(x, dtype=float)


def bench_model(n, seed):
    """The benchmark's stiff model: A = T diag-blocks T^-1 with decay rates log-spaced over 0.5 ... 500
    rad/s (stiffness ratio 1000), every eighth pole pair complex, T = I + 0.3 R / sqrt(n) with R uniform
    in [-1, 1] (dense and mildly non-normal); one input, one output. Invented data."""
    rng = np.random.default_rng(seed)
    lam = np.zeros((n, n))
    i = 0
    while i < n:
        rate = 0.5 * 1000.0 ** (i / (n - 1))
        lam[i, i] = -rate
        if i % 8 == 0 and i + 1 < n:
            w = rate * (0.5 + 0.5 * rng.random())
            lam[i + 1, i + 1] = -rate
            lam[i, i + 1] = w
            lam[i + 1, i] = -w
            i += 1
        i += 1
    t = np.eye(n) + 0.3 * (2 * rng.random((n, n)) - 1) / np.sqrt(n)
    a = t @ lam @ np.linalg.inv(t)
    b = 2 * rng.random((n, 1)) - 1
    c = 2 * rng.random((1, n)) - 1
    return a, b, c


BENCH = {
    # case: (t_end, output points, solver settings)
    "exact-step": (10.0, 2000, None),
    "explicit-stiff": (4.0, 201, "RK45"),
    "stiff-stiff": (4.0, 201, "BDF"),
    "stiff-steps": (4.0, 201, "BDF"),
}

# The relative tolerances of the step-count case (absolute = relative * 1e-3), issue 15.
STEP_REL_TOLS = [1e-3, 1e-4, 1e-5, 1e-6, 1e-7, 1e-8]


def stiff_steps(a, b, t_end, out, timed):
    """The "stiff-steps" case: accepted steps of solve_ivp BDF and Radau (jac=A; no t_eval, so sol.t holds
    every step) at each tolerance of STEP_REL_TOLS, written to ref_stats.json; the time is the BDF runs over
    all tolerances (best of three, fewer when they pass 10 s in all)."""
    n = a.shape[0]
    bu = b[:, 0]

    def run(method, rel_tol):
        return scipy.integrate.solve_ivp(lambda _t, x: a @ x + bu, (0.0, t_end), np.zeros(n), method=method,
                                         rtol=rel_tol, atol=rel_tol * 1e-3, jac=a)

    if not timed:
        return None
    runs = []
    while True:
        t0 = time.perf_counter()
        bdf = [run("BDF", rel_tol) for rel_tol in STEP_REL_TOLS]
        runs.append(time.perf_counter() - t0)
        if sum(runs) > 10.0 or (len(runs) >= 3 and sum(runs) >= 1.0) or len(runs) >= 50:
            break
    radau = [run("Radau", rel_tol) for rel_tol in STEP_REL_TOLS]
    stats = {"rel_tols": STEP_REL_TOLS,
             "BDF": [int(len(s.t) - 1) for s in bdf], "Radau": [int(len(s.t) - 1) for s in radau],
             "BDFnlu": [int(s.nlu) for s in bdf], "Radaunlu": [int(s.nlu) for s in radau]}
    with open(os.path.join(out, "ref_stats.json"), "w") as f:
        json.dump(stats, f)
    return min(runs)


def bench(case, n, out, timed):
    """`time_reference.py bench CASE N DIR [--no-time]` for scripts/bench/time-cases.ts: writes A, B, C
    (and t) as .npy, times the scipy reference (best of three, fewer when the runs pass 10 s in all, as on our side), saves its outputs as
    ref_y.npy and its counters as ref_stats.json, and prints one JSON line with "seconds"."""
    t_end, points, method = BENCH[case]
    a, b, c = bench_model(n, 7000 + n)
    t = np.linspace(0.0, t_end, points)
    for name, m in (("A", a), ("B", b), ("C", c), ("t", t)):
        np.save(os.path.join(out, name + ".npy"), m)
    seconds = None
    stats = {}
    if case == "stiff-steps":
        seconds = stiff_steps(a, b, t_end, out, timed)
        timed = False
    if timed:
        runs = []
        while True:
            t0 = time.perf_counter()
            if method is None:
                # Van Loan (1978): expm of [[A, B], [0, 0]] h gives Phi and Gamma; then the recursion.
                h = t[1] - t[0]
                M = np.zeros((n + 1, n + 1))
                M[:n, :n] = a * h
                M[:n, n:] = b * h
                E = scipy.linalg.expm(M)
                phi = np.ascontiguousarray(E[:n, :n])
                g = E[:n, n]
                x = np.zeros(n)
                y = np.empty((points, 1))
                y[0] = c @ x
                for k in range(1, points):
                    x = phi @ x + g
                    y[k] = c @ x
            else:
                bu = b[:, 0]
                sol = scipy.integrate.solve_ivp(lambda _t, x: a @ x + bu, (0.0, t_end), np.zeros(n), method=method,
                                                t_eval=t, rtol=1e-6, atol=1e-9, jac=(a if method == "BDF" else None))
                y = (c @ sol.y).T
                stats = {"rhsEvaluations": int(sol.nfev), "jacobians": int(sol.njev), "factorizations": int(sol.nlu)}
            runs.append(time.perf_counter() - t0)
            if sum(runs) > 10.0 or (len(runs) >= 3 and sum(runs) >= 1.0) or len(runs) >= 50:
                break
        seconds = min(runs)
        np.save(os.path.join(out, "ref_y.npy"), np.ascontiguousarray(y))
        with open(os.path.join(out, "ref_stats.json"), "w") as f:
            json.dump(stats, f)
    print(json.dumps({"case": case, "n": n, "seconds": seconds,
                      "peakRssKb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
                      "method": "scipy.linalg.expm + numpy recursion" if method is None
                      else "scipy.integrate.solve_ivp BDF and Radau, step counts" if case == "stiff-steps"
                      else "scipy.integrate.solve_ivp " + method}))


def main():
    if len(sys.argv) > 1 and sys.argv[1] == "bench":
        args = [x for x in sys.argv[2:] if not x.startswith("--")]
        bench(args[0], int(args[1]), args[2], "--no-time" not in sys.argv)
        return
    req = json.load(sys.stdin)
    op = req["op"]
    if op == "expm":
        out = {"expm": [scipy.linalg.expm(arr(m)).tolist() for m in req["matrices"]]}
    elif op == "c2d":
        Ad, Bd, Cd, Dd, _ = scipy.signal.cont2discrete(
            (arr(req["A"]), arr(req["B"]), arr(req["C"]), arr(req["D"])), req["ts"], method="zoh")
        out = {"Ad": Ad.tolist(), "Bd": Bd.tolist(), "Cd": Cd.tolist(), "Dd": Dd.tolist()}
    elif op == "step_closed_form":
        A, B, C, u = arr(req["A"]), arr(req["B"]), arr(req["C"]), arr(req["u"])
        n = A.shape[0]
        Bu = B @ u
        ys = []
        for t in req["t"]:
            E = scipy.linalg.expm(A * t)
            ys.append((C @ np.linalg.solve(A, (E - np.eye(n)) @ Bu)).tolist())
        out = {"y": ys}
    elif op == "zoh_recursion":
        A, B, C, D, u = arr(req["A"]), arr(req["B"]), arr(req["C"]), arr(req["D"]), arr(req["u"])
        n, m = B.shape
        ts = req["ts"]
        t0 = time.perf_counter()
        M = np.zeros((n + m, n + m))
        M[:n, :n] = A * ts
        M[:n, n:] = B * ts
        E = scipy.linalg.expm(M)
        Phi = np.ascontiguousarray(E[:n, :n])
        g = E[:n, n:] @ u
        t1 = time.perf_counter()
        x = np.zeros(n)
        Du = D @ u
        ys = np.empty((req["steps"] + 1, C.shape[0]))
        ys[0] = C @ x + Du
        for k in range(req["steps"]):
            x = Phi @ x + g
            ys[k + 1] = C @ x + Du
        t2 = time.perf_counter()
        out = {"y": ys.tolist() if req.get("return_y", True) else None,
               "seconds": {"expm": t1 - t0, "recursion": t2 - t1}}
    elif op == "sampled_zoh":
        A, B, C, D = arr(req["A"]), arr(req["B"]), arr(req["C"]), arr(req["D"])
        n, m = B.shape
        st, su = list(req["sample_t"]), arr(req["sample_u"])

        def u_at(t):
            k = -1
            for i, ti in enumerate(st):
                if ti <= t:
                    k = i
            return np.zeros(m) if k < 0 else su[k]

        def advance(x, u, dt):
            M = np.zeros((n + m, n + m))
            M[:n, :n] = A * dt
            M[:n, n:] = B * dt
            E = scipy.linalg.expm(M)
            return E[:n, :n] @ x + E[:n, n:] @ u

        x = arr(req["initial_state"])
        t = 0.0
        ys = []
        for tout in req["t"]:
            stops = sorted(s for s in st if t < s < tout) + [tout]
            for s in stops:
                if s > t:
                    x = advance(x, u_at(t), s - t)
                    t = s
            ys.append((C @ x + D @ u_at(tout)).tolist())
        out = {"y": ys}
    elif op == "impulse":
        A, B, C, w = arr(req["A"]), arr(req["B"]), arr(req["C"]), arr(req["w"])
        out = {"y": [(C @ scipy.linalg.expm(A * t) @ B @ w).tolist() for t in req["t"]]}
    elif op == "solve_ivp":
        A, B, C, u = arr(req["A"]), arr(req["B"]), arr(req["C"]), arr(req["u"])
        b = B @ u
        n = A.shape[0]
        t0 = time.perf_counter()
        sol = scipy.integrate.solve_ivp(lambda t, x: A @ x + b, (0.0, req["t_end"]), np.zeros(n),
                                        method=req["method"], t_eval=req["t_eval"], rtol=req["rel_tol"],
                                        atol=req["abs_tol"], jac=(A if req["method"] == "BDF" else None))
        seconds = time.perf_counter() - t0
        y = (C @ sol.y).T
        out = {"y": y.tolist() if req.get("return_y", True) else None, "nfev": int(sol.nfev),
               "njev": int(sol.njev), "nlu": int(sol.nlu), "seconds": seconds,
               "status": int(sol.status)}
    elif op == "step_counts":
        A, B, u = arr(req["A"]), arr(req["B"]), arr(req["u"])
        b = B @ u
        n = A.shape[0]
        counts = {}
        for method in req["methods"]:
            rows = []
            for rel_tol in req["rel_tols"]:
                abs_tol = req["abs_tol"] if "abs_tol" in req else rel_tol * req["abs_tol_factor"]
                initial_state = np.asarray(req.get("initial_state", np.zeros(n)), dtype=float)
                sol = scipy.integrate.solve_ivp(lambda t, x: A @ x + b, (0.0, req["t_end"]), initial_state,
                                                method=method, rtol=rel_tol, atol=abs_tol,
                                                jac=(A if method in ("BDF", "Radau") else None))
                rows.append({"rel_tol": rel_tol, "abs_tol": abs_tol, "steps": int(len(sol.t) - 1), "nfev": int(sol.nfev),
                             "nlu": int(sol.nlu), "status": int(sol.status)})
            counts[method] = rows
        out = {"counts": counts}
    else:
        raise SystemExit("unknown op " + op)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
