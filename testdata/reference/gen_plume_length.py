#!/usr/bin/python3
"""Reference steady-state plume lengths for plume/maps_test.go.

The steady-state concentration on the centreline of a continuous vertical
rectangular source (width W centred on y = 0, from the water table to depth
Z, the water table a no-flux boundary by an image source) is the time
integral of the point-source kernel to infinity (Wexler 1992, USGS TWRI
3-B7; the same time integral as Ogata & Banks 1961 in 1D):

  C/C0 = int_0^inf x/(2 sqrt(pi D' tau^3)) exp(-mu tau - (x - v' tau)^2/(4 D' tau)) Fy(tau) Fz(tau) dtau
  Fy = [erf((y + W/2)/(2 sqrt(Dy' tau))) - erf((y - W/2)/(2 sqrt(Dy' tau)))]/2
  Fz = [erf((Z + z)/(2 sqrt(Dz' tau))) + erf((Z - z)/(2 sqrt(Dz' tau)))]/2

with v' = v/R and D' = D/R. This script integrates it with scipy.integrate.quad
and finds the distance x where C/C0 equals the screening ratio with
scipy.optimize.brentq: a root found directly, independently of the Go code.

Run with Debian's python3-scipy:  /usr/bin/python3 testdata/reference/gen_plume_length.py
Writes testdata/reference/plume_length.json.
"""
import json
import math
import os

from scipy import integrate, optimize, special


def steady(x, y, z, v, R, ax, ay, az, mu, W, Z):
    vp = v / R
    dx, dy, dz = ax * v / R, ay * v / R, az * v / R

    def f(tau):
        if tau <= 0:
            return 0.0
        e = -mu * tau - (x - vp * tau) ** 2 / (4 * dx * tau)
        if e < -745:
            return 0.0
        k = x / (2 * math.sqrt(math.pi * dx * tau ** 3)) * math.exp(e)
        sy, sz = 2 * math.sqrt(dy * tau), 2 * math.sqrt(dz * tau)
        fy = (special.erf((y + W / 2) / sy) - special.erf((y - W / 2) / sy)) / 2
        fz = (special.erf((Z + z) / sz) + special.erf((Z - z) / sz)) / 2
        return k * fy * fz

    tr = x / vp
    total = 0.0
    for a, b in ((0, 0.5 * tr), (0.5 * tr, tr), (tr, 2 * tr), (2 * tr, 10 * tr), (10 * tr, 100 * tr)):
        val, _ = integrate.quad(f, a, b, epsabs=0, epsrel=1e-13, limit=2000)
        total += val
    val, _ = integrate.quad(f, 100 * tr, math.inf, epsabs=0, epsrel=1e-13, limit=2000)
    return total + val


def main():
    ln2 = math.log(2)
    v_demo = 8.6 * 0.004 / 0.28           # Darcy: K i / n_e (invented demo values)
    r_demo = 1 + 1.75 * 59 * 0.001 / 0.28  # benzene Koc 59 L/kg from the reference table
    cases = [
        # name, v, R, (aL, aT, aV), half-life (None: no decay), W, Z, z, C0, level
        ("demo benzene at the water table", v_demo, r_demo, (10, 1, 0.1), 720, 15, 3, 0, 12, 0.005),
        ("demo benzene at 2 m depth", v_demo, r_demo, (10, 1, 0.1), 720, 15, 3, 2, 12, 0.005),
        ("no decay, dilution only", 0.3, 1.4, (10, 1, 0.1), None, 15, 3, 0, 12, 0.05),
        ("sharp plume, high Peclet", 1.0, 1.0, (1, 0.1, 0.01), 100, 10, 5, 0, 1, 0.001),
    ]
    out = []
    for name, v, R, (ax, ay, az), hl, W, Z, z, c0, level in cases:
        mu = 0 if hl is None else ln2 / hl
        g = lambda x: steady(x, 0, z, v, R, ax, ay, az, mu, W, Z) - level / c0
        hi = 1.0
        while g(hi) > 0:
            hi *= 2
        L = optimize.brentq(g, hi / 2 if hi > 1 else 1e-6, hi, xtol=1e-12, rtol=1e-12)
        out.append({"name": name, "seepage_velocity": v, "retardation": R,
                    "dispersivity": [ax, ay, az], "half_life": hl, "width": W, "depth": Z,
                    "z": z, "concentration": c0, "screening_level": level,
                    "plume_length": L,
                    "steady_at_half_length": steady(L / 2, 0, z, v, R, ax, ay, az, mu, W, Z) * c0})
    doc = {"source": "scipy.integrate.quad + scipy.optimize.brentq on the steady-state time integral (Wexler 1992, USGS TWRI 3-B7); generator testdata/reference/gen_plume_length.py",
           "cases": out}
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "plume_length.json")
    with open(path, "w") as fh:
        json.dump(doc, fh, indent=1)
        fh.write("\n")
    for c in out:
        print(c["name"], c["plume_length"], c["steady_at_half_length"])


main()
