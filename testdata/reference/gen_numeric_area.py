#!/usr/bin/python3
"""Steady-state reference for the variable-area 1D solver (package numeric).

Solves the steady mass balance of a streamtube with cross-section A(x),
constant volumetric flow Q = V A(0), dispersion D(x) = Dm + (Dx - Dm) A(0)/A(x),
retardation R and first-order decay Mu:

    Q C' - (A D C')' + R Mu A C = 0  on [0, L]

with C(0) = 1 (first-type inlet) or Q C(0) - A(0) D(0) C'(0) = Q (third-type
inlet), and C'(L) = 0 at the outflow face (the numeric solver's free outflow
face carries no dispersive flux). Solved with scipy.integrate.solve_bvp
(collocation, tol 1e-10) as a first-order system in (C, F), F = A D C'.
Run with /usr/bin/python3 (Debian python3-scipy); writes
numeric_area_steady.json next to this script.
"""
import json
import os

import numpy as np
import scipy
from scipy.integrate import solve_bvp

CASES = [
    # radial flow from a line of injection: A = 2 pi (r0 + x) b, here up to a constant
    {"name": "radial", "area": "radial", "r0": 2.0, "V": 1.0, "Dx": 0.5, "Dm": 0.0,
     "R": 2.0, "Mu": 0.05, "L": 20.0, "inlet": "concentration"},
    # converging streamtube, A = 1/(1 + x/10); molecular diffusion part Dm
    {"name": "converging", "area": "converging", "a": 10.0, "V": 0.5, "Dx": 0.4, "Dm": 0.05,
     "R": 1.5, "Mu": 0.02, "L": 20.0, "inlet": "flux"},
]
XS = [0.5, 1, 2, 3, 5, 7.5, 10, 12.5, 15, 17.5, 19.5]


def area(case, x):
    if case["area"] == "radial":
        return case["r0"] + x
    return 1.0 / (1.0 + x / case["a"])


def solve(case):
    a0 = area(case, 0.0)
    q = case["V"] * a0
    dx, dm, r, mu = case["Dx"], case["Dm"], case["R"], case["Mu"]

    def disp(x):
        return dm + (dx - dm) * a0 / area(case, x)

    def rhs(x, y):
        c, f = y  # f = A D C'
        a = area(case, x)
        return np.vstack([f / (a * disp(x)), q * f / (a * disp(x)) + r * mu * a * c])

    def bc(ya, yb):
        if case["inlet"] == "concentration":
            left = ya[0] - 1.0
        else:
            left = q * ya[0] - ya[1] - q
        return np.array([left, yb[1]])

    x = np.linspace(0, case["L"], 2001)
    y = np.vstack([np.exp(-0.05 * x), np.zeros_like(x)])
    sol = solve_bvp(rhs, bc, x, y, tol=1e-10, max_nodes=10**6)
    assert sol.success, sol.message
    return [float(sol.sol(xx)[0]) for xx in XS]


def main():
    out = {"source": "scipy.integrate.solve_bvp %s, tol 1e-10; generator testdata/reference/gen_numeric_area.py" % scipy.__version__,
           "x": XS, "cases": []}
    for case in CASES:
        c = dict(case)
        c["C"] = solve(case)
        out["cases"].append(c)
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "numeric_area_steady.json")
    with open(path, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")


if __name__ == "__main__":
    main()
