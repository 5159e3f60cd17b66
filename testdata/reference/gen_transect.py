#!/usr/bin/python3
"""Reference mass discharges through transects at 30 digits (mpmath).

The exact solution for a planar source of width W and depth D held at C0
from t = 0 (water table a no-flux boundary, by an image source) is the time
integral

  C/C0 = int_0^t x / (2 sqrt(pi D' tau^3)) exp(-mu tau - (x - v' tau)^2 / (4 D' tau)) Fy Fz dtau

with D' = Dx/R, v' = v/R, Fy = (erf((y + W/2)/s_y) - erf((y - W/2)/s_y))/2,
s_y = 2 sqrt(Dy tau / R), and Fz likewise with the source reaching from -D to
D.  Over a transect perpendicular to the flow at distance x, from y1 to y2
and from depth z1 to z2, the y and z integrals of Fy and Fz are closed forms
(int erf(u) du = u erf(u) + exp(-u^2)/sqrt(pi)), so the advective mass
discharge n_e v int int C dy dz is one time integral, done here with
mpmath.quad at 55 digits (a 40-digit run must agree within 1e-6, a check
that the quadrature has converged).  A transect much wider and deeper than
the plume carries n_e v W D C_1D(x, t), C_1D the first-type Ogata-Banks
solution with decay: for those cases the closed form is the reference, and
the generator checks the integral agrees with it.

Run with Debian's python3-mpmath:  /usr/bin/python3 testdata/reference/gen_transect.py
Writes testdata/reference/transect_discharge.json.  Invented test inputs.
"""
import json
import mpmath as mp

mp.mp.dps = 40


def G(u):
    return u * mp.erf(u) + mp.exp(-u * u) / mp.sqrt(mp.pi)


def strip_integral(a1, a2, half, s):
    """int_{a1}^{a2} (erf((y+half)/s) - erf((y-half)/s))/2 dy."""
    return s / 2 * (G((a2 + half) / s) - G((a1 + half) / s) - G((a2 - half) / s) + G((a1 - half) / s))


def discharge(c, t):
    v, R, n = mp.mpf(c["v"]), mp.mpf(c["R"]), mp.mpf(c["porosity"])
    ax, ay, az = (mp.mpf(a) for a in c["alpha"])
    Dx, Dy, Dz = ax * v, ay * v, az * v
    mu = mp.log(2) / mp.mpf(c["half_life"]) if c["half_life"] else mp.mpf(0)
    x, W, D, C0 = mp.mpf(c["x"]), mp.mpf(c["width"]), mp.mpf(c["depth"]), mp.mpf(c["c0"])
    y1, y2, z1, z2 = (mp.mpf(q) for q in (c["y1"], c["y2"], c["z1"], c["z2"]))
    Dp, vp = Dx / R, v / R

    def kernel(tau):
        if tau == 0:
            return mp.mpf(0)
        kx = x / (2 * mp.sqrt(mp.pi * Dp * tau**3)) * mp.exp(-mu * tau - (x - vp * tau) ** 2 / (4 * Dp * tau))
        sy, sz = 2 * mp.sqrt(Dy * tau / R), 2 * mp.sqrt(Dz * tau / R)
        # the image source: the strip reaches from -D to D; the transect's
        # z integral is over [z1, z2] of (erf((z+D)/s) - erf((z-D)/s))/2
        return kx * strip_integral(y1, y2, W / 2, sy) * strip_integral(z1, z2, D, sz)

    tpeak = R * x / v
    pts = [0, tpeak / 100, tpeak / 10, tpeak / 2, tpeak, 2 * tpeak, 10 * tpeak, 100 * tpeak]
    if t == "steady":
        pts = pts + [mp.inf]
    else:
        T = mp.mpf(t)
        pts = sorted(set([p for p in pts if p < T] + [T * k for k in (mp.mpf("0.25"), mp.mpf("0.5"), mp.mpf("0.75"), mp.mpf("0.9"), mp.mpf("0.99"))] + [T]))
    integral = mp.quad(kernel, pts)
    # mg/L * m/d * m^2 = g/d
    return n * v * C0 * integral


def ogata_banks(c, t):
    """n_e v W D C0 C_1D(x, t): first-type inlet, decay of total mass."""
    v, R, n = mp.mpf(c["v"]), mp.mpf(c["R"]), mp.mpf(c["porosity"])
    D = mp.mpf(c["alpha"][0]) * v
    mu = mp.log(2) / mp.mpf(c["half_life"]) if c["half_life"] else mp.mpf(0)
    x, C0 = mp.mpf(c["x"]), mp.mpf(c["c0"])
    w = mp.sqrt(v * v + 4 * D * R * mu)
    if t == "steady":
        c1 = mp.exp((v - w) * x / (2 * D))
    else:
        t = mp.mpf(t)
        s = 2 * mp.sqrt(D * R * t)
        c1 = (mp.exp((v - w) * x / (2 * D)) * mp.erfc((R * x - w * t) / s)
              + mp.exp((v + w) * x / (2 * D)) * mp.erfc((R * x + w * t) / s)) / 2
    return n * v * mp.mpf(c["width"]) * mp.mpf(c["depth"]) * C0 * c1


base = {"v": "0.12", "R": "1.4", "porosity": "0.28", "alpha": ["10", "1", "0.1"],
        "half_life": "720", "width": "15", "depth": "3", "c0": "12"}
cases = []
for name, extra in [
    ("wide and deep, 100 m", {"x": "100", "y1": "-3000", "y2": "3000", "z1": "0", "z2": "3000"}),
    ("wide and deep, 400 m", {"x": "400", "y1": "-5000", "y2": "5000", "z1": "0", "z2": "5000"}),
    ("finite, centred, 100 m", {"x": "100", "y1": "-10", "y2": "10", "z1": "0", "z2": "4"}),
    ("finite, off axis, 150 m", {"x": "150", "y1": "5", "y2": "40", "z1": "1", "z2": "6"}),
    ("near the source, 12 m", {"x": "12", "y1": "-30", "y2": "20", "z1": "0", "z2": "5"}),
    ("near the source, edge only, 12 m", {"x": "12", "y1": "6", "y2": "30", "z1": "2", "z2": "9"}),
]:
    c = dict(base, **extra)
    for t in ["40", "365", "1825", "5000", "steady"]:
        ref = discharge(c, t)
        # The same integral at higher precision: the quadrature has converged.
        with mp.workdps(55):
            ref2 = discharge(c, t)
        assert abs(ref - ref2) <= mp.mpf("1e-6") * abs(ref2) + mp.mpf("1e-300"), (name, t, ref, ref2)
        entry = dict(c, name=name, time=t, mass_discharge=mp.nstr(ref2, 25))
        if name.startswith("wide"):
            # A transect much wider and deeper than the plume: the closed
            # form n_e v W D C_1D is the reference; the integral agrees.
            ob = ogata_banks(c, t)
            assert abs(ref2 - ob) <= mp.mpf("1e-12") * abs(ob) + mp.mpf("1e-300"), (name, t, ref2, ob)
            entry["mass_discharge"] = mp.nstr(ob, 25)
        cases.append(entry)

with open("testdata/reference/transect_discharge.json", "w") as f:
    json.dump({"source": "gen_transect.py (mpmath, 55 digits)", "cases": cases}, f, indent=1)
print(len(cases), "cases")
