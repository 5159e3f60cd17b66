#!/usr/bin/python3
"""Reference values for a source depleting by its mass (power-law source
function), for packages analytic and plume.

Source function (Falta, Rao & Basu 2005, J. Contam. Hydrol. 78:259-280):
the source's dissolvable mass M drains by the water flux Q through the
source face, dM/dt = -Q Cs, with Cs/C0 = (M/M0)^Gamma.  With m = M/M0 and
the depletion rate k = Q C0/M0,

    dm/dt = -k m^Gamma,  m(0) = 1,

whose closed form is m = [1 - (1 - Gamma) k s]^(1/(1 - Gamma)) (Gamma != 1;
0 once the bracket reaches 0, which happens at s = 1/((1 - Gamma) k) for
Gamma < 1) and m = exp(-k s) for Gamma = 1.

Run by hand with the Debian interpreter (python3-mpmath, python3-scipy):

    /usr/bin/python3 testdata/reference/gen_source_mass.py [history|column|plane|all]

It writes source_mass.json beside itself (each part replaces its own
section and keeps the others).  The Go tests read the committed file; CI
never regenerates it.

1. history: the mass balance integrated numerically, independently of the
   closed form: mpmath.odefun (Taylor series) at 22 digits, and as a
   second check scipy.integrate.solve_ivp (DOP853, rtol 1e-13); the
   written m and Cs/C0 are odefun's.  Also the time at which Cs/C0 falls
   to a fraction f, the mass balance integrated in m by mpmath.quad,
   s = int_{f^(1/Gamma)}^1 dm/(k m^Gamma) (in the variable y = -ln m,
   where the integrand exp(-(1 - Gamma) y)/k is smooth; checked on the
   odefun solution where that covers it), and the exhaustion time
   (Gamma < 1) as the time to drain all of the mass, s(0) = int_0^1
   dm/(k m^Gamma), likewise; and the time to drain to a remaining mass
   M/M0 deep into the depletion, likewise ("drained").  Each
   value records its agreement with the closed form ("closed_relerr").
   Gamma = 1 also against exp(-k s) (the exponential depletion).
2. column: the 1D column (first-type inlet, Ogata & Banks 1961, USGS Prof.
   Paper 411-A; third-type inlet, van Genuchten & Alves 1982, USDA Tech.
   Bull. 1661) with the source concentration Cs(s)/C0 at the inlet, as
   the Duhamel integral of the column's pulse response over the ages tau
   of the water, weighted by Cs(t - tau)/C0:
       C/C0 = int_0^t K(x, tau) Cs(t - tau)/C0 dtau,
   K the time derivative of the constant-source solution (decay Mu in
   the retarded equation), by mpmath.quad (tanh-sinh) at 40 digits on
   subintervals around the travel time, the exhaustion age and the
   emission times near 0; checked by Gauss-Legendre on the same
   subintervals (agreement 1e-15 or better, in practice 1e-16).
3. plane: the exact 3D value of a vertical rectangular source (width W
   centred on y = 0, from the no-flux water table to depth Z), the same
   integral with K times the transverse factors
   Fy = [erf((y + W/2)/(2 sqrt(Dy' tau))) - erf((y - W/2)/(2 sqrt(Dy' tau)))]/2
   and Fz (the image-source form, averaged over a well screen from the
   antiderivative of erf), primes meaning divided by R (the time integral
   of Wexler 1992, USGS TWRI 3-B7); and the Domenico value as DomenicoAt
   defines it for such a source (Domenico 1987, J. Hydrol. 91:49-58, with
   the source concentration at the emission time t - R x/V, common
   practice), written from the formula at 40 digits.
"""

import json
import os
import sys
import time

import mpmath as mp

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import gen_analytic as ga  # noqa: E402  (helpers: kernels, strip factors, quadrature)

try:
    from scipy.integrate import solve_ivp
    import scipy
except ImportError:  # the scipy check is a second check only
    solve_ivp = None
    scipy = None

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "source_mass.json")
DPS = 40
# Two quadratures (tanh-sinh and Gauss-Legendre) of the column and plane
# integrals must agree to this, five digits beyond the Go tests' 1e-10.
AGREE = mp.mpf('1e-15')
# The history's Taylor-series integration (odefun) costs steeply more with
# the working precision; 22 digits leave seven to spare over the Go
# tests' 1e-13.
HIST_DPS = 22
HIST_AGREE = mp.mpf('1e-19')
INF = float('inf')


# ---------------------------------------------------------------------------
# The source function
# ---------------------------------------------------------------------------

def exhaustion(g, k):
    g, k = mp.mpf(g), mp.mpf(k)
    return 1 / ((1 - g) * k) if g < 1 else mp.inf


def closed_m(g, k, s):
    g, k, s = mp.mpf(g), mp.mpf(k), mp.mpf(s)
    if s <= 0:
        return mp.mpf(1)
    if g == 1:
        return mp.exp(-k * s)
    u = 1 - (1 - g) * k * s
    if u <= 0:
        return mp.mpf(0)
    return u ** (1 / (1 - g))


def closed_cs(g, k, s):
    """Cs/C0 at time s since the start (0 before it and after exhaustion)."""
    if s < 0:
        return mp.mpf(0)
    g = mp.mpf(g)
    m = closed_m(g, k, s)
    if m == 0:
        return mp.mpf(0)
    if g == 0:
        return mp.mpf(1)
    return m ** g


def closed_time_below(g, k, f):
    g, k, f = mp.mpf(g), mp.mpf(k), mp.mpf(f)
    if g == 1:
        return -mp.log(f) / k
    if g == 0:
        return 1 / k
    return (1 - f ** ((1 - g) / g)) / ((1 - g) * k)


HIST_CASES = [
    # gamma, k (1/d), times (d) for odefun (k t up to about 3, where the
    # Taylor steps stay long), fractions f for the time below f C0 and
    # remaining masses m for the time to drain to m (by quadrature, as deep
    # into the depletion as wanted)
    (0.25, 0.01, [0, 1, 10, 50, 80], [0.9, 0.5, 0.1], [0.5, 0.01, 1e-6]),
    (0.5, 0.002, [0, 10, 100, 500, 900], [0.9, 0.5, 0.01], [0.5, 0.01, 1e-6]),
    (0.9, 0.05, [0, 1, 5, 20, 100, 190], [0.5, 0.1, 0.001], [0.5, 0.01, 1e-6]),
    (1.0, 0.003, [0, 10, 100, 1000], [0.5, 0.01, 1e-6], [0.5, 1e-3, 1e-9]),
    (1.1, 0.003, [0, 10, 100, 1000], [0.5, 0.01, 1e-4], [0.5, 1e-3, 1e-9]),
    (1.5, 0.01, [0, 1, 10, 100, 300], [0.5, 0.01, 1e-4], [0.5, 1e-3, 1e-9]),
    (2.0, 0.0005, [0, 100, 1000, 5000], [0.5, 0.1, 0.001], [0.5, 1e-3, 1e-9]),
    (4.0, 0.1, [0, 0.1, 1, 10, 30], [0.5, 0.01, 1e-5], [0.5, 1e-3, 1e-9]),
    (10.0, 0.02, [0, 1, 10, 100, 150], [0.5, 0.1, 0.01], [0.5, 0.1, 0.01]),
]


def gen_history():
    out = []
    for g, k, times, fracs, masses in HIST_CASES:
        gm, km = mp.mpf(g), mp.mpf(k)
        tex = exhaustion(g, k)
        with mp.workdps(HIST_DPS):
            ode = mp.odefun(lambda s, m: -km * m ** gm, 0, mp.mpf(1))
            rows = []
            live = [s for s in times if s < tex]
            sol = None
            if solve_ivp is not None:
                sol = solve_ivp(lambda s, m: [-k * max(m[0], 0.0) ** g], (0, max(live)), [1.0],
                                method="DOP853", rtol=1e-13, atol=1e-16, t_eval=live)
            for i, s in enumerate(times):
                m = ode(mp.mpf(s))
                cs = m ** gm if g != 0 else mp.mpf(1)
                cm = closed_m(g, k, s)
                row = {"t": s, "m": ga.dstr(m), "cs": ga.dstr(cs),
                       "closed_relerr": mp.nstr(ga.relerr(cm, m), 3)}
                if g == 1:
                    row["exponential_relerr"] = mp.nstr(ga.relerr(mp.exp(-km * s), m), 3)
                if sol is not None:
                    row["solve_ivp_relerr"] = "%.3g" % abs(sol.y[0][i] / float(m) - 1)
                if ga.relerr(cm, m) > HIST_AGREE:
                    raise SystemExit("history: closed form and odefun disagree: %s" % row)
                rows.append(row)
            below = []
            for f in fracs:
                # the mass balance integrated in m: the time to drain from 1
                # to m_f = f^(1/Gamma), s = int_{m_f}^1 dm/(k m^Gamma)
                # in y = -ln m (dm = -m dy): s = int_0^{-ln m_f} m^(1-Gamma)/k dy
                yf = -mp.log(mp.mpf(f)) / gm
                s_f = mp.quad(lambda y: mp.exp(-(1 - gm) * y) / km, [0, yf])
                guess = closed_time_below(g, k, f)
                row = {"fraction": f, "time": ga.dstr(s_f),
                       "closed_relerr": mp.nstr(ga.relerr(guess, s_f), 3)}
                if s_f <= max(times):
                    # and on the odefun solution, where it is already
                    # computed: Cs = m^Gamma there equals f
                    row["odefun_relerr"] = mp.nstr(ga.relerr(ode(s_f) ** gm, mp.mpf(f)), 3)
                if ga.relerr(guess, s_f) > HIST_AGREE:
                    raise SystemExit("history: time below %g disagrees: %s" % (f, row))
                below.append(row)
            drained = []
            for mm in masses:
                # the time to drain to M/M0 = mm, int_{mm}^1 dm/(k m^Gamma), in y = -ln m
                s_m = mp.quad(lambda y: mp.exp(-(1 - gm) * y) / km, [0, -mp.log(mp.mpf(mm))])
                row = {"m": mm, "time": ga.dstr(s_m),
                       "closed_relerr": mp.nstr(ga.relerr(closed_m(g, k, s_m), mp.mpf(mm)), 3)}
                if ga.relerr(closed_m(g, k, s_m), mp.mpf(mm)) > mp.mpf('1e-18'):
                    raise SystemExit("history: time to drain disagrees: %s" % row)
                drained.append(row)
        case = {"gamma": g, "k": k, "values": rows, "time_below": below, "drained": drained}
        if g < 1:
            with mp.workdps(HIST_DPS):
                # the time to drain all of the mass, int_0^1 dm/(k m^Gamma),
                # in y = -ln m: int_0^inf exp(-(1-Gamma) y)/k dy
                s0 = mp.quad(lambda y: mp.exp(-(1 - gm) * y) / km, [0, mp.inf])
            case["exhausted"] = ga.dstr(s0)
            case["exhausted_closed_relerr"] = mp.nstr(ga.relerr(tex, s0), 3)
            if ga.relerr(tex, s0) > HIST_AGREE:
                raise SystemExit("history: exhaustion time disagrees: %s" % case)
        out.append(case)
        print("history gamma=%g k=%g" % (g, k), file=sys.stderr)
    return out


# ---------------------------------------------------------------------------
# Time integrals over the ages with the source history
# ---------------------------------------------------------------------------

def age_points(t, t0, tr, sig, Mu, k, tex):
    """Subinterval ends on (t0, t): the kernel's (ga.time_breakpoints),
    a ladder on the scale 1/k towards tau = t (emission times near 0, where
    the source concentration falls fastest) and one away from t0 (the age
    emitted when the mass ran out, where Cs/C0 vanishes like a power)."""
    pts = [p for p in ga.time_breakpoints(t, tr, sig, Mu, None)[1:-1]]
    sc = 1 / mp.mpf(k)
    pts += [t - sc * mp.mpf(4) ** j for j in range(-8, 30)]
    if t0 > 0:
        sc0 = min(tex, (t - t0)) / 4
        pts += [t0 + sc0 * mp.mpf(4) ** j for j in range(-12, 30)]
    return [t0] + sorted(set(p for p in pts if t0 < p < t)) + [t]


def column_value(kind, x, t, V, D, R, Mu, g, k, method='tanh-sinh'):
    Vp, Dp = V / R, D / R
    tr = x / Vp
    sig = tr * mp.sqrt(2 * Dp / (Vp * x))
    tex = exhaustion(g, k)
    t0 = t - tex if t > tex else mp.mpf(0)
    pts = age_points(t, t0, tr, sig, Mu, k, tex)
    kern = ga.kernel_1d_first if kind == 1 else ga.kernel_1d_third
    f = lambda tau: kern(x, tau, Vp, Dp, Mu) * closed_cs(g, k, t - tau)
    return ga.integrate(f, pts, method=method)


def plane_value(x, y, z1, z2, t, V, Dx, Dy, Dz, R, Mu, W, Z, g, k, method='tanh-sinh'):
    Vp, Dxp, Dyp, Dzp = V / R, Dx / R, Dy / R, Dz / R
    tr = x / Vp
    sig = tr * mp.sqrt(2 * Dxp / (Vp * x))
    tex = exhaustion(g, k)
    t0 = t - tex if t > tex else mp.mpf(0)
    pts = age_points(t, t0, tr, sig, Mu, k, tex)[1:-1]
    ylo = max(abs(y) - W / 2, 0)
    zlo = max(z1 - Z, 0)
    for dist, Dp in ((ylo, Dyp), (zlo, Dzp), (abs(y) + W / 2, Dyp), (z1 + Z, Dzp), (z2 + Z, Dzp),
                     (abs(z2 - Z), Dzp)):
        if dist > 0:
            for m in (0.25, 1, 4):
                pts.append(m * dist ** 2 / (4 * Dp))
    pts = [t0] + sorted(set(p for p in pts if t0 < p < t)) + [t]
    f = lambda tau: (ga.kernel_1d_first(x, tau, Vp, Dxp, Mu) * ga.strip_factor(y, W / 2, Dyp, tau)
                     * ga.strip_avg(z1, z2, Z, Dzp, tau) * closed_cs(g, k, t - tau))
    return ga.integrate(f, pts, method=method)


def domenico_value(x, y, z1, z2, t, V, Dx, Dy, Dz, R, Mu, W, Z, g, k):
    """DomenicoAt's definition for a source depleting by its mass: the source
    concentration at the emission time e = t - R x/V (clipped to [0, the
    exhaustion time]) times the longitudinal factor L(t) of the source at
    full strength (after exhaustion the pulse L(t) - L(t - exhaustion)),
    times the transverse factors at the travel distance."""
    tex = exhaustion(g, k)
    e = min(max(t - R * x / V, 0), tex)
    L = ga.dom_long(x, t, V, Dx, R, Mu)
    if t > tex:
        L -= ga.dom_long(x, t - tex, V, Dx, R, Mu)
    ay, az = Dy / V, Dz / V
    return closed_cs(g, k, e) * L * ga.strip_factor(y, W / 2, ay * x, 1) * ga.strip_avg(z1, z2, Z, az * x, 1)


def gen_column():
    cases = []
    t0 = time.time()
    # (label, V, D, R, Mu, x) and histories (gamma, k) with times as multiples of the travel time
    setups = [
        ("moderate Peclet", 0.3, 1.5, 1.5, 0.0, 30.0),
        ("moderate Peclet decay", 0.3, 1.5, 1.5, float(mp.log(2) / 365), 50.0),
        ("high Peclet", 0.5, 0.05, 2.0, 1e-4, 100.0),
        ("low Peclet", 0.1, 5.0, 1.0, 0.0, 2.0),
    ]
    hists = [(0.5, None), (2.0, None), (0.25, None), (3.0, None), (1.5, 'fast')]
    for label, V, D, R, Mu, x in setups:
        tr = R * x / V
        for g, speed in hists:
            # depletion over a few travel times, or fast (k tr = 20)
            k = (20.0 if speed == 'fast' else 0.5) / tr
            for f in (0.5, 1.0, 2.0, 6.0):
                t = f * tr
                for kind in (1, 3):
                    args = [mp.mpf(a) for a in (x, t, V, D, R, Mu)]
                    with mp.workdps(DPS):
                        v1 = column_value(kind, *args, g, k)
                        v2 = column_value(kind, *args, g, k, method='gauss-legendre')
                    agree = ga.relerr(v1, v2)
                    if v1 < mp.mpf('1e-300'):
                        continue
                    lab = "%s %s gamma=%g k*tr=%g t=%g*tr" % (label, "first" if kind == 1 else "third",
                                                              g, k * tr, f)
                    if agree > AGREE:
                        print("QUAD DISAGREE", lab, v1, v2, file=sys.stderr)
                    cases.append({"label": lab, "inlet": "first" if kind == 1 else "third",
                                  "x": ga.fnum(x), "t": ga.fnum(t), "V": ga.fnum(V), "Dx": ga.fnum(D),
                                  "R": ga.fnum(R), "Mu": ga.fnum(Mu), "gamma": g, "k": ga.fnum(k),
                                  "value": ga.dstr(v1), "quadrature_agreement": mp.nstr(agree, 3),
                                  "independent_check": "ok" if agree <= AGREE else "FAILED"})
        print(label, len(cases), "%.0fs" % (time.time() - t0), file=sys.stderr, flush=True)
    return cases


def gen_plane():
    cases = []
    t0 = time.time()
    names = ["x", "y", "top", "bottom", "t", "V", "Dx", "Dy", "Dz", "R", "Mu", "Width", "Depth"]
    V, aL, aT, aV = 0.1, 10.0, 1.0, 0.1
    R, Mu = 1.4, float(mp.log(2) / 720)
    W, Z = 15.0, 3.0
    pts = [(50.0, 0.0, 1.0, 1.0), (50.0, 4.0, 0.0, 3.0), (210.0, 6.0, 2.0, 2.0), (120.0, 20.0, 1.0, 8.0)]
    for g, k in ((0.5, 2e-4), (2.0, 1e-3), (1.5, 2e-2), (0.25, 1e-3)):
        for x, y, z1, z2 in pts:
            for t in (1825.0, 3650.0, 9125.0):
                args = [x, y, z1, z2, t, V, aL * V, aT * V, aV * V, R, Mu, W, Z]
                with mp.workdps(DPS):
                    ma = [mp.mpf(a) for a in args]
                    v1 = plane_value(*ma, g, k)
                    v2 = plane_value(*ma, g, k, method='gauss-legendre')
                    dv = domenico_value(*ma, g, k)
                agree = ga.relerr(v1, v2)
                if v1 < mp.mpf('1e-300'):
                    continue
                lab = "gamma=%g k=%g x=%g y=%g z=[%g,%g] t=%g" % (g, k, x, y, z1, z2, t)
                if agree > AGREE:
                    print("QUAD DISAGREE", lab, v1, v2, file=sys.stderr)
                row = {n: ga.fnum(a) for n, a in zip(names, args)}
                row.update({"label": lab, "gamma": g, "k": k, "exact": ga.dstr(v1), "domenico": ga.dstr(dv),
                            "quadrature_agreement": mp.nstr(agree, 3),
                            "independent_check": "ok" if agree <= AGREE else "FAILED"})
                cases.append(row)
                print(len(cases), lab, mp.nstr(v1, 6), "%.0fs" % (time.time() - t0), file=sys.stderr, flush=True)
    return cases


def main():
    mp.mp.dps = DPS
    what = sys.argv[1] if len(sys.argv) > 1 else "all"
    doc = {}
    if os.path.exists(OUT):
        with open(OUT) as fh:
            doc = json.load(fh)
    doc.update({
        "generator": "testdata/reference/gen_source_mass.py",
        "what": "A source depleting by its mass (power-law source function, Falta, Rao & Basu 2005, "
                "J. Contam. Hydrol. 78:259-280): the mass balance dm/dt = -k m^Gamma integrated "
                "numerically; the 1D column and the exact 3D value with that source history as "
                "time integrals of the pulse response; the Domenico value as DomenicoAt defines it",
        "mpmath_version": mp.__version__,
        "scipy_version": scipy.__version__ if scipy else None,
        "reference_digits": DPS,
    })
    if what in ("history", "all"):
        doc["history"] = gen_history()
    if what in ("column", "all"):
        doc["column"] = gen_column()
    if what in ("plane", "all"):
        doc["plane"] = gen_plane()
    with open(OUT, "w") as fh:
        json.dump(doc, fh, indent=1)
        fh.write("\n")
    print("wrote", OUT, file=sys.stderr)


if __name__ == "__main__":
    main()
