#!/usr/bin/python3
"""Reference time responses of sparse models for tests/unit/engine/sparse-simulate.test.ts, computed with
Debian's SciPy (scipy.integrate.solve_ivp, scipy.sparse, SuperLU), independently of the engine's code.

Usage: /usr/bin/python3 tests/reference/sparse_time_reference.py REQUEST.json RESPONSE.json

REQUEST is {"dir": folder holding A.mtx, B.mtx, C.mtx and optionally E.mtx (scipy.io.mmread), "u": the
constant input held from t = 0 (a step from rest), "t_end", "times": output times, "runs": [{"method":
"BDF" | "RK45", "rel_tol", "abs_tol"}, ...]}.

The model E x' = A x + B u is integrated as x' = E^-1 (A x + B u) (solve_ivp has no mass matrix): E^-1 by
one SuperLU factorization of E (scipy.sparse.linalg.splu). BDF gets the constant Jacobian: A itself as a
scipy.sparse CSC matrix without E, so that its Newton matrices are factored by SuperLU; E^-1 A as a dense
array with E (small models only). Each run is made without t_eval and with dense_output=True, so that
sol.t holds every accepted step (steps = len(sol.t) - 1) and the outputs at "times" come from the solver's
own interpolant.

The response is {"runs": [{"method", "rel_tol", "abs_tol", "status", "steps", "nfev", "njev", "nlu",
"y": [[...] per time, p outputs each]}, ...]}.
"""
import json
import sys

import numpy as np
import scipy.integrate
import scipy.io
import scipy.sparse as sp
import scipy.sparse.linalg as spla


def load(folder, name):
    try:
        return scipy.io.mmread(f"{folder}/{name}.mtx")
    except FileNotFoundError:
        return None


def main():
    with open(sys.argv[1]) as f:
        req = json.load(f)
    folder = req["dir"]
    a = sp.csc_matrix(load(folder, "A"))
    e = load(folder, "E")
    b = np.asarray(load(folder, "B"), dtype=float)
    c = np.asarray(load(folder, "C"), dtype=float)
    bu = b @ np.asarray(req["u"], dtype=float)
    n = a.shape[0]
    if e is None:
        def fun(_t, x):
            return a @ x + bu
        jac = a
    else:
        lu = spla.splu(sp.csc_matrix(e))

        def fun(_t, x):
            return lu.solve(a @ x + bu)
        jac = lu.solve(a.toarray())
    times = np.asarray(req["times"], dtype=float)
    out = []
    for run in req["runs"]:
        method = run["method"]
        kwargs = {"jac": jac} if method == "BDF" else {}
        sol = scipy.integrate.solve_ivp(fun, (0.0, req["t_end"]), np.zeros(n), method=method, rtol=run["rel_tol"],
                                        atol=run["abs_tol"], dense_output=True, **kwargs)
        y = (c @ sol.sol(times)).T if sol.status == 0 else np.zeros((len(times), c.shape[0]))
        out.append({
            "method": method, "rel_tol": run["rel_tol"], "abs_tol": run["abs_tol"], "status": int(sol.status),
            "steps": int(len(sol.t) - 1), "nfev": int(sol.nfev), "njev": int(sol.njev), "nlu": int(sol.nlu),
            "y": y.tolist(),
        })
    with open(sys.argv[2], "w") as f:
        json.dump({"runs": out}, f)


if __name__ == "__main__":
    main()
