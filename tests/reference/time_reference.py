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
  {"op": "sampled_zoh", "A","B","C","D", "sample_t": [..], "sample_u": [[..]], "t": [..], "x0": [..]}
      -> {"y": [[..] per t]}                 exact response to u held between samples (zero before the
                                             first): expm of [[A, B],[0, 0]]*dt on every sub-interval
  {"op": "impulse", "A","B","C", "t": [..], "w": [..]}
      -> {"y": [[..] per t]}                 y(t) = C e^{At} B w, e^{At} by scipy.linalg.expm
  {"op": "solve_ivp", "A","B","C", "u": [..], "t_end", "t_eval": [..], "method": "RK45"|"BDF",
   "rtol", "atol"}
      -> {"y", "nfev", "njev", "nlu", "seconds"} scipy.integrate.solve_ivp with the constant Jacobian A
"""
import json
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


def main():
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

        x = arr(req["x0"])
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
                                        method=req["method"], t_eval=req["t_eval"], rtol=req["rtol"],
                                        atol=req["atol"], jac=(A if req["method"] == "BDF" else None))
        seconds = time.perf_counter() - t0
        y = (C @ sol.y).T
        out = {"y": y.tolist() if req.get("return_y", True) else None, "nfev": int(sol.nfev),
               "njev": int(sol.njev), "nlu": int(sol.nlu), "seconds": seconds,
               "status": int(sol.status)}
    else:
        raise SystemExit("unknown op " + op)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
