#!/usr/bin/python3
"""Reference values for the power-law depleting source of package numeric.

Source function (Falta, Rao & Basu 2005, J. Contam. Hydrol. 78:259-280):
the source mass M drains by the water flux Q through the source face,
dM/dt = -Q Cs, with Cs/C0 = (M/M0)^Gamma. With m = M/M0 and k = Q C0/M0,

    dm/dt = -k m^Gamma,  m(0) = 1.

1. history: m(t) and Cs/C0 integrated numerically with mpmath.odefun (Taylor
   series, 30 digits) and, as a second check, scipy.integrate.solve_ivp
   (DOP853, rtol 1e-13); both are asserted against the closed form
   m = [1 - (1 - Gamma) k t]^(1/(1 - Gamma)) (Gamma != 1), exp(-k t)
   (Gamma = 1), before exhaustion. After exhaustion (Gamma < 1) m = 0.
2. column: the 1D column with a first-type inlet held at Cs(t)/C0, i.e. the
   Duhamel convolution of the first-type Ogata-Banks impulse response
   (Ogata & Banks 1961, USGS Prof. Paper 411-A; with retardation and
   first-order decay Mu of the retarded equation, D' = Dx/R, v' = V/R)

       K(x, tau) = x / (2 sqrt(pi D' tau^3)) exp(-(x - v' tau)^2/(4 D' tau) - Mu tau)

   with the history: C(x, t) = int_0^t Cs(t - tau)/C0 K(x, tau) dtau, by
   mpmath.quad at 30 digits (split at the exhaustion age and the kernel
   peak). Sanity checks asserted here: a constant history gives the closed
   Ogata-Banks form with decay; Gamma = 1 gives exp(-k t) times the closed
   form with Mu - k; Gamma = 0 gives the closed form minus itself delayed by
   1/k (a source of duration 1/k).
3. plane: the same convolution with the kernel of a vertical rectangular
   source (width W centred on y = 0, from the water table to depth Z, no
   flux through the water table by an image), K times
   Fy = [erf((y + W/2)/(2 sqrt(Dy' tau))) - erf((y - W/2)/(2 sqrt(Dy' tau)))]/2 and
   Fz = [erf((z + Z)/(2 sqrt(Dz' tau))) - erf((z - Z)/(2 sqrt(Dz' tau)))]/2
   (the time integral of Wexler 1992, USGS TWRI 3-B7); the constant-source
   values are written too, so the Go test can check this kernel against
   analytic.Exact3DAt.

Run with /usr/bin/python3 (Debian python3-mpmath, python3-scipy); writes
numeric_powerlaw.json next to this script.
"""
import json
import os

import mpmath as mp
from scipy.integrate import solve_ivp

mp.mp.dps = 30

HIST_CASES = [
    {"gamma": 0.0, "k": 0.02},
    {"gamma": 0.5, "k": 0.02},
    {"gamma": 1.0, "k": 0.02},
    {"gamma": 1.5, "k": 0.02},
    {"gamma": 2.5, "k": 0.02},
]
HIST_TIMES = [0, 1, 5, 12.5, 25, 40, 49, 60, 99, 150, 400]

COLUMN = {"V": 1.0, "Dx": 0.5, "R": 1.5, "Mu": 0.01}
COLUMN_CASES = [
    {"gamma": 0.5, "k": 0.05},
    {"gamma": 2.0, "k": 0.1},
    {"gamma": 0.0, "k": 0.1},
    {"gamma": 1.0, "k": 0.05},
]
COLUMN_X = [1, 2, 5, 8]
COLUMN_T = [4, 10, 16, 30, 60]

PLANE = {"V": 0.5, "Dx": 2.0, "Dy": 0.4, "Dz": 0.1, "R": 1.0, "Mu": 0.001, "W": 10.0, "Z": 4.0}
PLANE_CASES = [
    {"gamma": 0.5, "k": 0.01},
    {"gamma": 2.0, "k": 0.02},
]
PLANE_POINTS = [[20, 0, 2], [30, 4, 2], [40, 0, 0]]
PLANE_T = [50, 100, 250]


def mf(x):
    return mp.mpf(x)


def exhausted(g, k):
    if g < 1:
        return 1 / ((1 - mf(g)) * k)
    return mp.inf


def closed_m(g, k, t):
    g, k, t = mf(g), mf(k), mf(t)
    if g == 1:
        return mp.exp(-k * t)
    u = 1 - (1 - g) * k * t
    if u <= 0:
        return mf(0)
    return u ** (1 / (1 - g))


def closed_cs(g, k, t):
    m = closed_m(g, k, t)
    if m == 0:
        return mf(0)
    return m ** mf(g)


def history():
    out = []
    for c in HIST_CASES:
        g, k = mf(c["gamma"]), mf(c["k"])
        f = mp.odefun(lambda t, m: -k * m ** g, 0, mf(1))
        tex = exhausted(c["gamma"], c["k"])
        live = [t for t in HIST_TIMES if t < tex]
        sol = solve_ivp(lambda t, m: [-c["k"] * max(m[0], 0.0) ** c["gamma"]], (0, max(live)), [1.0],
                        method="DOP853", rtol=1e-13, atol=1e-15, t_eval=live)
        ms, cs = [], []
        for i, t in enumerate(HIST_TIMES):
            if t < tex:
                m = f(mf(t))
                assert abs(m - closed_m(g, k, t)) < mf(10) ** -25, (c, t)
                assert abs(float(m) - sol.y[0][i]) < 1e-11, (c, t, sol.y[0][i])
                ms.append(m)
                cs.append(m ** g)
            else:
                ms.append(mf(0))
                cs.append(mf(0))
        out.append({"gamma": c["gamma"], "k": c["k"], "t": HIST_TIMES,
                    "m": [float(v) for v in ms], "cs": [float(v) for v in cs]})
    return out


def erf_frac(a, s, h):
    """[erf((a + h)/s) - erf((a - h)/s)]/2."""
    return (mp.erf((a + h) / s) - mp.erf((a - h) / s)) / 2


def convolve(x, t, p, hist, lateral=None):
    """int_0^t hist(t - tau) K(x, tau) F(tau) dtau."""
    x, t = mf(x), mf(t)
    d, v, mu = mf(p["Dx"]) / mf(p["R"]), mf(p["V"]) / mf(p["R"]), mf(p["Mu"])

    def kern(tau):
        if tau <= 0:
            return mf(0)
        k = x / (2 * mp.sqrt(mp.pi * d * tau ** 3)) * mp.exp(-(x - v * tau) ** 2 / (4 * d * tau) - mu * tau)
        if lateral is not None:
            k *= lateral(tau)
        return k * hist(t - tau)

    pts = [mf(0)]
    peak = x / v
    if peak < t:
        pts.append(peak)
    cut = hist.cut(t) if hasattr(hist, "cut") else None
    if cut is not None and 0 < cut < t:
        pts.append(cut)
    pts.append(t)
    pts = sorted(set(pts))
    return mp.quad(kern, pts)


class Hist:
    def __init__(self, g, k):
        self.g, self.k = g, k
        self.tex = exhausted(g, k)

    def __call__(self, s):
        return closed_cs(self.g, self.k, s)

    def cut(self, t):
        # age tau = t - t_ex at which the source was exhausted
        return t - self.tex if self.tex != mp.inf else None


class Const:
    def __call__(self, s):
        return mf(1)


def ogata_banks(x, t, p, mu_shift=0):
    """Closed first-type Ogata-Banks with decay (retarded variables)."""
    x, t = mf(x), mf(t)
    if t <= 0:
        return mf(0)
    d, v = mf(p["Dx"]) / mf(p["R"]), mf(p["V"]) / mf(p["R"])
    mu = mf(p["Mu"]) - mf(mu_shift)
    w = mp.sqrt(v * v + 4 * mu * d)
    s = 2 * mp.sqrt(d * t)
    return (mp.exp((v - w) * x / (2 * d)) * mp.erfc((x - w * t) / s)
            + mp.exp((v + w) * x / (2 * d)) * mp.erfc((x + w * t) / s)) / 2


def column():
    p = COLUMN
    # sanity: a constant history is the closed form
    for x in COLUMN_X:
        for t in COLUMN_T:
            a, b = convolve(x, t, p, Const()), ogata_banks(x, t, p)
            assert abs(a - b) < mf(10) ** -25, (x, t, a, b)
    out = []
    for c in COLUMN_CASES:
        h = Hist(c["gamma"], c["k"])
        vals = []
        for x in COLUMN_X:
            row = []
            for t in COLUMN_T:
                v = convolve(x, t, p, h)
                if c["gamma"] == 1:
                    ref = mp.exp(-mf(c["k"]) * t) * ogata_banks(x, t, p, c["k"])
                    assert abs(v - ref) < mf(10) ** -25, (c, x, t, v, ref)
                if c["gamma"] == 0:
                    ref = ogata_banks(x, t, p) - ogata_banks(x, t - 1 / mf(c["k"]), p)
                    assert abs(v - ref) < mf(10) ** -25, (c, x, t, v, ref)
                row.append(float(v))
            vals.append(row)
        out.append({"gamma": c["gamma"], "k": c["k"], "c": vals})
    return {"params": p, "x": COLUMN_X, "t": COLUMN_T, "cases": out}


def plane():
    p = PLANE
    dy, dz = mf(p["Dy"]) / mf(p["R"]), mf(p["Dz"]) / mf(p["R"])
    b, zs = mf(p["W"]) / 2, mf(p["Z"])

    def lateral_at(y, z):
        y, z = mf(y), mf(z)
        return lambda tau: erf_frac(y, 2 * mp.sqrt(dy * tau), b) * erf_frac(z, 2 * mp.sqrt(dz * tau), zs)

    const = []
    for pt in PLANE_POINTS:
        const.append([float(convolve(pt[0], t, p, Const(), lateral_at(pt[1], pt[2]))) for t in PLANE_T])
    out = []
    for c in PLANE_CASES:
        h = Hist(c["gamma"], c["k"])
        vals = []
        for pt in PLANE_POINTS:
            vals.append([float(convolve(pt[0], t, p, h, lateral_at(pt[1], pt[2]))) for t in PLANE_T])
        out.append({"gamma": c["gamma"], "k": c["k"], "c": vals})
    return {"params": p, "points": PLANE_POINTS, "t": PLANE_T, "constant": const, "cases": out}


def main():
    ref = {
        "source": "testdata/reference/gen_numeric_powerlaw.py (mpmath %s at %d digits; scipy solve_ivp as a second check)" % (mp.__version__, mp.mp.dps),
        "history": history(),
        "column": column(),
        "plane": plane(),
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "numeric_powerlaw.json")
    with open(path, "w") as f:
        json.dump(ref, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
