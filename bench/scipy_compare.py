"""Runs scipy.integrate.solve_ivp (BDF, Radau, LSODA) on the engine benchmark problems.

Input: a JSON file written by bench/engine-cases.ts (problem definitions, tolerances and the
reference solution). Output on stdout: JSON {case name: [{method, ms, maxRelError, status}]}.
Fairness: the same rtol and atol as the TypeScript runs, analytic Jacobians (sparse CSC for
the mass-action networks with BDF and Radau; LSODA only accepts a dense Jacobian), output
only at the end time, median wall time of several runs after one warm-up run.
"""
import json
import sys
import time

import numpy as np
import scipy.sparse as sp
from scipy.integrate import solve_ivp


def robertson():
    def f(t, y):
        a = -0.04 * y[0] + 1e4 * y[1] * y[2]
        c = 3e7 * y[1] * y[1]
        return np.array([a, -a - c, c])

    def jac(t, y):
        return np.array([
            [-0.04, 1e4 * y[2], 1e4 * y[1]],
            [0.04, -1e4 * y[2] - 6e7 * y[1], -1e4 * y[1]],
            [0.0, 6e7 * y[1], 0.0],
        ])

    return f, jac, jac


def hires():
    def f(t, y):
        r = np.empty(8)
        r[0] = -1.71 * y[0] + 0.43 * y[1] + 8.32 * y[2] + 0.0007
        r[1] = 1.71 * y[0] - 8.75 * y[1]
        r[2] = -10.03 * y[2] + 0.43 * y[3] + 0.035 * y[4]
        r[3] = 8.32 * y[1] + 1.71 * y[2] - 1.12 * y[3]
        r[4] = -1.745 * y[4] + 0.43 * y[5] + 0.43 * y[6]
        r[5] = -280 * y[5] * y[7] + 0.69 * y[3] + 1.71 * y[4] - 0.43 * y[5] + 0.69 * y[6]
        r[6] = 280 * y[5] * y[7] - 1.81 * y[6]
        r[7] = -r[6]
        return r

    def jac(t, y):
        J = np.zeros((8, 8))
        J[0, 0:3] = [-1.71, 0.43, 8.32]
        J[1, 0:2] = [1.71, -8.75]
        J[2, 2:5] = [-10.03, 0.43, 0.035]
        J[3, 1:4] = [8.32, 1.71, -1.12]
        J[4, 4:7] = [-1.745, 0.43, 0.43]
        J[5, 3:8] = [0.69, 1.71, -0.43 - 280 * y[7], 0.69, -280 * y[5]]
        J[6, 5:8] = [280 * y[7], -1.81, 280 * y[5]]
        J[7, 5:8] = [-280 * y[7], 1.81, -280 * y[5]]
        return J

    return f, jac, jac


def network(net):
    """Mass-action network: v = kf*prod(c[reactants]) - kr*prod(c[products]), dc/dt = S v."""
    n = net["n"]
    rx = net["reactions"]
    m = len(rx)
    one = n  # index of an appended constant 1.0 used to pad slots

    def slots(side):
        idx = np.full((m, 3), one, dtype=np.int64)
        for r, x in enumerate(rx):
            q = 0
            for s, coef in x[side]:
                for _ in range(coef):
                    idx[r, q] = s
                    q += 1
        return idx

    R = slots("reactants")
    P = slots("products")
    kf = np.array([x["kf"] for x in rx])
    kr = np.array([x["kr"] for x in rx])
    rows, cols, vals = [], [], []
    for r, x in enumerate(rx):
        net_coef = {}
        for s, c in x["reactants"]:
            net_coef[s] = net_coef.get(s, 0) - c
        for s, c in x["products"]:
            net_coef[s] = net_coef.get(s, 0) + c
        for s, c in net_coef.items():
            if c != 0:
                rows.append(s)
                cols.append(r)
                vals.append(c)
    S = sp.csr_matrix((vals, (rows, cols)), shape=(n, m))
    ext = np.ones(n + 1)

    def f(t, y):
        ext[:n] = y
        v = kf * ext[R].prod(axis=1) - kr * ext[P].prod(axis=1)
        return S @ v

    # d v_r / d c_s: for each slot q of a side, coefficient times the product of the other slots
    def dv_entries(idx, k, e):
        g = e[idx]
        out_r, out_c, out_v = [], [], []
        for q in range(3):
            others = np.prod(np.delete(g, q, axis=1), axis=1)
            mask = idx[:, q] != one
            out_r.append(np.nonzero(mask)[0])
            out_c.append(idx[mask, q])
            out_v.append((k * others)[mask])
        return np.concatenate(out_r), np.concatenate(out_c), np.concatenate(out_v)

    def jac_sparse(t, y):
        ext[:n] = y
        r1, c1, v1 = dv_entries(R, kf, ext)
        r2, c2, v2 = dv_entries(P, kr, ext)
        Jv = sp.csr_matrix((np.concatenate([v1, -v2]), (np.concatenate([r1, r2]), np.concatenate([c1, c2]))), shape=(m, n))
        return (S @ Jv).tocsc()

    def jac_dense(t, y):
        return jac_sparse(t, y).toarray()

    return f, jac_sparse, jac_dense


def max_rel_error(y, ref, atol):
    ref = np.asarray(ref)
    mask = np.abs(ref) > atol
    if not mask.any():
        return 0.0
    return float(np.max(np.abs(y[mask] - ref[mask]) / np.abs(ref[mask])))


def main():
    problems = json.load(open(sys.argv[1]))
    out = {}
    for p in problems:
        if p["kind"] == "robertson":
            f, jac_s, jac_d = robertson()
        elif p["kind"] == "hires":
            f, jac_s, jac_d = hires()
        else:
            f, jac_s, jac_d = network(p["network"])
        res = []
        for method in ("BDF", "Radau", "LSODA"):
            jac = jac_d if method == "LSODA" else jac_s
            times = []
            status = "ok"
            err = float("nan")
            budget = 60.0  # s per method and case
            spent = 0.0
            runs = 5 if len(p["y0"]) <= 200 else 1
            for k in range(runs + 1):
                t0 = time.perf_counter()
                sol = solve_ivp(f, (0.0, p["tEnd"]), np.array(p["y0"], dtype=float), method=method, rtol=p["rtol"], atol=p["atol"], jac=jac)
                dt = time.perf_counter() - t0
                spent += dt
                if not sol.success:
                    status = "failed: " + sol.message
                    break
                if k > 0:
                    times.append(dt * 1000)
                err = max_rel_error(sol.y[:, -1], p["reference"], p["atol"])
                if spent > budget and len(times) >= 1:
                    break
            ms = float(np.median(times)) if times else float("nan")
            res.append({"method": method, "ms": ms, "maxRelError": err, "status": status})
        out[p["name"]] = res
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
