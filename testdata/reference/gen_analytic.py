#!/usr/bin/python3
"""Reference values for package analytic, computed with mpmath.

Run by hand with the Debian interpreter (python3-mpmath, python3-scipy):

    /usr/bin/python3 testdata/reference/gen_analytic.py [erfcx|1d|3d|puff|1dhist|3dx|all]

and commit the JSON files it writes beside itself:

    analytic_erfcx.json  Erfcx(x) and ExpErfc(a, b)
    analytic_1d.json     OgataBanks (first-type inlet) and OgataBanksFlux (third-type)
    analytic_3d.json     Exact3D (time integral) and Domenico (1987)
    analytic_puff.json   Puff3D, Puff2D, Puff1D (instantaneous releases)
    analytic_1d_history.json  OgataBanksAt with finite-duration and depleting sources
    analytic_3d_extremes.json Exact3DAt (and DomenicoAt) at the extremes: Peclet
                         1e-2 and 1e6, values down to 1e-30 and below, screens,
                         receptors inside and below the source, histories

Every input is a float64 (written with Python's round-trip repr, or "+Inf"),
and every reference value is the exact function of those float64 inputs,
evaluated at high precision and written as a decimal string with 25
significant digits.  The Go tests (analytic/reference_test.go) read the
committed files; CI never regenerates them.

Independent checks made here (the JSON records the outcome per case):
  * Erfcx: exp(x^2)*erfc(x) at 40 and at 80 digits; scipy.special.erfcx as
    a double-precision sanity check.
  * 1D: the closed forms (Ogata & Banks 1961; van Genuchten & Alves 1982 for
    decay and the third-type inlet) at two working precisions, against
    (a) numerical inversion of the Laplace-domain solution
        (mpmath.invertlaplace, Talbot) where that converges, and
    (b) the time integral of the impulse response (mpmath.quad with
        breakpoints around the travel time).
    Both of (a) and (b) are independent of the closed form; every kept case
    agrees with at least one of them to 1e-25 relative or better.
  * 3D exact: the time integral by tanh-sinh and by Gauss-Legendre on the
    same subintervals; the two agree to 1e-25 or better.  The same code with
    Width = Depth = 1e6 reproduces the 1D closed form (a case in the file).
  * Domenico, puffs: direct formula at 40 and 80 digits.

Each case also carries "cond", the relative condition number
sum_p |p d ln f / d p| over the float64 inputs p.  A float64 evaluation of
an ill-conditioned case (for instance exp(a)*erfc(b) with a = 1e6) cannot be
expected to beat a few eps*cond; the Go test loosens its tolerance to
8*eps*cond where that exceeds the base tolerance and reports how often.
"""

import json
import math
import os
import sys
import time

import mpmath as mp

try:
    import scipy
    import scipy.special as sps
except ImportError:  # the scipy check is only a sanity check
    scipy = None
    sps = None

HERE = os.path.dirname(os.path.abspath(__file__))
DPS = 40          # digits of the reference values
SIG = 25          # significant digits written
TINY_KEEP = mp.mpf('1e-300')   # keep cases with true value >= this
TINY_ZERO = mp.mpf('1e-320')   # below this a float64 result must be 0 (or tiny)
AGREE = mp.mpf('1e-25')        # agreement required between independent methods

INF = float('inf')


def fnum(v):
    """A float64 input as JSON: round-trip repr, or a string for +-Inf."""
    v = float(v)
    if math.isinf(v):
        return "+Inf" if v > 0 else "-Inf"
    return v


def dstr(v):
    """A high-precision value as a decimal string."""
    return mp.nstr(v, SIG, min_fixed=1, max_fixed=0, strip_zeros=False)


def relerr(a, b):
    """|a/b - 1|, formed at 30 digits more than the working precision so that
    agreement beyond the working digits shows as a number, not as 0."""
    if a is None or b is None:
        return mp.inf
    with mp.workdps(mp.mp.dps + 30):
        if b == 0:
            return mp.mpf(0) if a == 0 else mp.inf
        return abs(a / b - 1)


def at_dps(dps, fn, *args):
    with mp.workdps(dps):
        return fn(*[mp.mpf(a) if isinstance(a, float) else a for a in args])


def two_precisions(fn, args, dps1=DPS + 20, dps2=2 * DPS + 40):
    """Evaluate fn(*args) at two working precisions; return the better value
    and the relative difference (a measure of cancellation)."""
    v1 = at_dps(dps1, fn, *args)
    v2 = at_dps(dps2, fn, *args)
    with mp.workdps(dps2):
        d = relerr(v1, v2)
    return v2, d


def condition(fn, args, names):
    """sum |p d ln f/dp| by central differences at high precision, over the
    float64 inputs in `names` (indices into args)."""
    with mp.workdps(3 * DPS):
        base = [mp.mpf(a) for a in args]
        f0 = fn(*base)
        if f0 == 0:
            return mp.mpf(0)
        h = mp.mpf('1e-30')
        c = mp.mpf(0)
        for i in names:
            if base[i] == 0 or mp.isinf(base[i]):
                continue
            up = list(base)
            dn = list(base)
            up[i] = base[i] * (1 + h)
            dn[i] = base[i] * (1 - h)
            c += abs((fn(*up) - fn(*dn)) / (2 * h * f0))
        return c


def write(name, doc):
    path = os.path.join(HERE, name)
    with open(path, "w") as fh:
        json.dump(doc, fh, indent=1)
        fh.write("\n")
    print("wrote", path, file=sys.stderr)


def header(what):
    return {
        "generator": "testdata/reference/gen_analytic.py",
        "what": what,
        "mpmath_version": mp.__version__,
        "scipy_version": scipy.__version__ if scipy else None,
        "reference_digits": DPS,
        "written_digits": SIG,
    }


# ---------------------------------------------------------------------------
# Erfcx and ExpErfc
# ---------------------------------------------------------------------------

def erfcx_mp(x):
    # mpmath's erfc is accurate to the working precision for all real x
    # (an asymptotic series for large x), so exp(x^2)*erfc(x) needs no care
    # beyond enough digits.  Beyond x = 1e8 (mpmath's erfc cannot take
    # x = 1e300) the asymptotic series
    # 1/(x sqrt(pi)) sum_k (-1)^k (2k-1)!!/(2x^2)^k, whose terms fall by 1e-16
    # or more each, is used instead; erfcx_series checks it against
    # exp*erfc from 1e3 to 1e8.
    if x > 1e8:
        return erfcx_series(x)
    return mp.exp(x * x) * mp.erfc(x)


def erfcx_series(x):
    s = mp.mpf(0)
    term = 1 / (x * mp.sqrt(mp.pi))
    k = 0
    while k == 0 or abs(term) > mp.eps * abs(s):
        s += term
        k += 1
        term *= -(2 * k - 1) / (2 * x * x)
    return s


def experfc_mp(a, b):
    return mp.exp(a) * mp.erfc(b)


def solve_b_for_target(a, target):
    """b > 0 with exp(a)*erfc(b) = target."""
    with mp.workdps(60):
        a = mp.mpf(a)
        lt = mp.log(mp.mpf(target))
        g = mp.sqrt(max(a - lt, mp.mpf(1)))
        return float(mp.findroot(lambda b: a + mp.log(mp.erfc(b)) - lt, g))


def gen_erfcx():
    cases = []
    xs = [(-26.0, "most negative documented"), (-26.5, "near overflow"), (-20.0, ""), (-10.0, ""),
          (-5.0, ""), (-2.0, ""), (-1.0, ""), (-0.5, ""), (-1e-3, ""), (-1e-10, ""),
          (0.0, "zero"), (5e-324, "smallest subnormal"), (1e-300, "tiny"), (1e-20, "tiny"),
          (1e-10, "tiny"), (1e-5, "small"), (0.01, ""), (0.1, ""), (0.25, ""), (0.5, "half"),
          (0.75, ""), (1.0, "one"), (1.5, ""), (2.0, "two"), (2.5, ""), (3.0, ""), (4.0, ""),
          (5.0, "five"), (6.0, ""), (8.0, ""), (10.0, "ten"), (12.0, ""), (15.0, ""), (20.0, ""),
          (26.0, "erfc underflows beyond"), (26.6, ""), (27.3, "erfc(x) is 0 in float64"),
          (30.0, ""), (50.0, ""), (100.0, ""), (1e3, "1e3"), (1e4, ""), (1e5, ""), (1e6, "1e6"),
          (1e7, ""), (1e8, "1e8"), (1e10, "extreme"), (1e20, "extreme"), (1e100, "extreme"),
          (1e300, "extreme, x^2 overflows")]
    # a deterministic spread over [-26, 30] and log-spaced over [1e-3, 1e8]
    for i in range(121):
        xs.append((-26.0 + 56.0 * i / 120.0 + 0.0123456789, "linear grid"))
    for i in range(45):
        xs.append((10.0 ** (-3 + 11.0 * i / 44.0) * 1.0372, "log grid"))
    for x, lab in xs:
        v, dprec = two_precisions(erfcx_mp, [x])
        cond = condition(erfcx_mp, [x], [0])
        row = {"label": ("erfcx(%r) %s" % (x, lab)).strip(), "x": fnum(x), "value": dstr(v),
               "cond": dstr(cond), "precision_check": mp.nstr(dprec, 3)}
        if 1e3 <= x <= 1e8:
            with mp.workdps(2 * DPS):
                row["series_relerr"] = mp.nstr(relerr(erfcx_series(mp.mpf(x)), v), 3)
        if sps is not None:
            s = float(sps.erfcx(x))
            row["scipy_relerr"] = mp.nstr(relerr(mp.mpf(s), v), 3) if v != 0 and not math.isinf(s) else None
        cases.append(row)
    erfcx_doc = header("Erfcx(x) = exp(x^2) erfc(x)")
    erfcx_doc["cases"] = cases

    # ExpErfc(a, b) = exp(a) erfc(b)
    ec = []
    spec = [
        (0.0, 0.0, "exp(0) erfc(0)"), (0.0, 1.0, "plain erfc"), (0.0, -3.0, "erfc of negative"),
        (3.0, 0.0, "plain exp"), (-3.0, 2.0, "both ordinary"),
        (1000.0, 30.0, "exp overflows, erfc underflows, product ordinary"),
        (1e4, 100.0, "a = b^2"), (1e4, 99.9, "a > b^2"), (1e4, 100.2, "a < b^2"),
        (1e6, 1000.0, "Peclet 1e6 sized, a = b^2"), (1e6, 1000.01, ""),
        (2.5e5, 500.0, ""), (800.0, 28.0, "exp overflows, erfc underflows"),
        (720.0, 5.0, "exp overflows alone"), (712.0, 1.5, "exp just overflows"),
        (750.0, 7.0, "exp overflows, erfc ordinary"),
        (-690.0, -3.0, "exp nearly underflows, erfc ~ 2"), (-700.0, 0.0, "tiny exp"),
        (-5.0, 26.0, "erfc near underflow"), (-100.0, 20.0, "product ~1e-220"),
        (3e5, -0.5, "huge a with negative b would overflow: excluded"),
    ]
    for a, target in [(800.0, 2e-300), (1e4, 1e-300), (1e6, 2e-300), (-600.0, 2e-300), (1e6, 1e-200), (1e3, 1e-280),
                      (1e8, 1e-300), (0.0, 1e-300), (50.0, 1e-299)]:
        spec.append((a, solve_b_for_target(a, target), "product ~%g" % target))
    for a, b, lab in spec:
        with mp.workdps(60):
            tv = experfc_mp(mp.mpf(a), mp.mpf(b))
        if tv > mp.mpf('1e307') or (tv < TINY_KEEP and tv >= TINY_ZERO):
            continue
        v, dprec = two_precisions(experfc_mp, [a, b])
        cond = condition(experfc_mp, [a, b], [0, 1])
        ec.append({"label": "expErfc(%r, %r) %s" % (a, b, lab), "a": fnum(a), "b": fnum(b),
                   "value": dstr(v), "expect_zero": bool(v < TINY_ZERO), "cond": dstr(cond),
                   "precision_check": mp.nstr(dprec, 3)})
    erfcx_doc["experfc_what"] = "ExpErfc(a, b) = exp(a) erfc(b)"
    erfcx_doc["experfc_cases"] = ec
    write("analytic_erfcx.json", erfcx_doc)
    print("erfcx cases", len(cases), "experfc cases", len(ec), file=sys.stderr)


# ---------------------------------------------------------------------------
# 1D column
# ---------------------------------------------------------------------------

def ob1(x, t, V, D, R, Mu):
    """First-type inlet, decay: van Genuchten & Alves (1982); Ogata & Banks
    (1961) for Mu = 0.  Equation R Ct = D Cxx - V Cx - R Mu C."""
    w = mp.sqrt(V * V + 4 * D * R * Mu)
    if mp.isinf(t):
        return mp.exp((V - w) * x / (2 * D))
    s = 2 * mp.sqrt(D * R * t)
    return (mp.exp((V - w) * x / (2 * D)) * mp.erfc((R * x - w * t) / s) / 2
            + mp.exp((V + w) * x / (2 * D)) * mp.erfc((R * x + w * t) / s) / 2)


def ob3(x, t, V, D, R, Mu):
    """Third-type (flux) inlet V C - D Cx = V C0 at x = 0: van Genuchten &
    Alves (1982); the Mu = 0 formula is the separate no-decay one (the decay
    formula's terms 2 and 3 blow up as Mu -> 0 and cancel)."""
    if mp.isinf(t):
        w = mp.sqrt(V * V + 4 * D * R * Mu)
        return 2 * V / (V + w) * mp.exp((V - w) * x / (2 * D))
    s = 2 * mp.sqrt(D * R * t)
    if Mu == 0:
        return (mp.erfc((R * x - V * t) / s) / 2
                + mp.sqrt(V * V * t / (mp.pi * D * R)) * mp.exp(-(R * x - V * t) ** 2 / (4 * D * R * t))
                - (1 + V * x / D + V * V * t / (D * R)) * mp.exp(V * x / D) * mp.erfc((R * x + V * t) / s) / 2)
    u = mp.sqrt(V * V + 4 * D * R * Mu)
    return (V / (V + u) * mp.exp((V - u) * x / (2 * D)) * mp.erfc((R * x - u * t) / s)
            + V / (V - u) * mp.exp((V + u) * x / (2 * D)) * mp.erfc((R * x + u * t) / s)
            + V * V / (2 * R * Mu * D) * mp.exp(V * x / D - Mu * t) * mp.erfc((R * x + V * t) / s))


def lap1(x, V, D, R, Mu):
    return lambda s: mp.exp((V - mp.sqrt(V * V + 4 * D * R * (s + Mu))) / (2 * D) * x) / s


def lap3(x, V, D, R, Mu):
    return lambda s: (2 * V / (s * (V + mp.sqrt(V * V + 4 * D * R * (s + Mu))))
                      * mp.exp((V - mp.sqrt(V * V + 4 * D * R * (s + Mu))) / (2 * D) * x))


def talbot(F, t, want):
    """Talbot inversion at growing precision; returns (value, note)."""
    if mp.isinf(t):
        return None, "steady state: not inverted"
    mag = -int(mp.floor(mp.log10(want))) if want < 1 else 0
    if mag > 100:
        return None, "value below 1e-100: Talbot not attempted"
    prev = None
    for extra in (0, 30):
        with mp.workdps(DPS + 10 + mag + extra):
            try:
                v = mp.invertlaplace(F, t, method='talbot')
            except Exception as e:  # noqa: BLE001
                return None, "Talbot failed: %s" % e
            if prev is not None and relerr(prev, v) < AGREE and relerr(v, want) < AGREE:
                return v, "ok"
            prev = v
    return None, ("Talbot did not converge (the transform behaves like exp(-s R x/V), "
                  "the contour cannot reach Re s < 0 for t <= travel time at high Peclet)")


def kernel_1d_first(x, tau, Vp, Dp, Mu):
    """Impulse response of the first-type inlet (retarded variables
    Vp = V/R, Dp = D/R) times the decay factor."""
    return x / (2 * mp.sqrt(mp.pi * Dp * tau ** 3)) * mp.exp(-Mu * tau - (x - Vp * tau) ** 2 / (4 * Dp * tau))


def kernel_1d_third(x, tau, Vp, Dp, Mu):
    """Impulse response of the third-type inlet (d/dt of the no-decay step
    response) times the decay factor."""
    g = (Vp / mp.sqrt(mp.pi * Dp * tau) * mp.exp(-(x - Vp * tau) ** 2 / (4 * Dp * tau))
         - Vp * Vp / (2 * Dp) * mp.exp(Vp * x / Dp) * mp.erfc((x + Vp * tau) / (2 * mp.sqrt(Dp * tau))))
    return g * mp.exp(-Mu * tau)


def time_breakpoints(t, tr, sig, Mu, end_scale):
    """Subinterval ends for the time integral over (0, t): dense around the
    advective travel time tr (kernel width sig), geometric away from it, a
    ladder towards the upper end t when the kernel is steep there, and decay
    e-folding lengths."""
    pts = set()
    for k in (0.125, 0.25, 0.5, 1, 1.5, 2, 3, 4, 6, 8, 12, 16, 24, 32, 48, 64):
        pts.add(tr - k * sig)
        pts.add(tr + k * sig)
    pts.add(tr)
    for j in range(1, 40):
        pts.add(tr * mp.mpf(4) ** j)
        pts.add(tr / mp.mpf(4) ** j)
    if Mu > 0:
        for k in (0.5, 1, 2, 4, 8, 16, 32, 64):
            pts.add(tr + k / Mu)
    if not mp.isinf(t) and end_scale is not None:
        for j in range(0, 40):
            pts.add(t - end_scale * mp.mpf(4) ** j)
    ends = sorted(p for p in pts if 0 < p < t)
    # prune points whose neighbours are closer than 1e-12 relative
    out = []
    for p in ends:
        if out and (p - out[-1]) <= mp.mpf('1e-12') * p:
            continue
        out.append(p)
    return [mp.mpf(0)] + out + [t]


def integrate(f, pts, method='tanh-sinh', refine=False):
    if refine:
        q = []
        for a, b in zip(pts[:-1], pts[1:]):
            q.append(a)
            if not mp.isinf(b):
                q.append((a + b) / 2)
        q.append(pts[-1])
        pts = q
    # mpmath.quad stops when its error estimate falls below the working
    # epsilon in absolute terms, so each subinterval's integrand is first
    # divided by its weight w = (largest of 9 samples, ends included) *
    # (interval length): the scaled piece is of order one and the stopping
    # rule becomes relative.  A piece whose weight is 10^-k of the largest
    # weight is integrated with k fewer digits, and skipped when k exceeds
    # the working digits (it cannot change the sum).
    dps = mp.mp.dps
    pieces = []
    for a, b in zip(pts[:-1], pts[1:]):
        if mp.isinf(b):
            width = a
            xs = [a] + [a * (1 + k) for k in range(1, 9)]
        else:
            width = b - a
            xs = ([a] if a > 0 else []) + [a + (b - a) * k / 8 for k in range(1, 8)] + [b]
        w = max(abs(f(x)) for x in xs) * width
        pieces.append((a, b, w))
    wmax = max(w for _, _, w in pieces)
    if wmax == 0:
        return mp.mpf(0)
    total = mp.mpf(0)
    for a, b, w in pieces:
        if w == 0:
            continue
        k = int(mp.log10(wmax / w))
        if k > dps:
            continue
        g = lambda tau, f=f, w=w: f(tau) / w
        with mp.workdps(max(20, dps - k)):
            if mp.isinf(b):
                q = mp.quad(g, [a, b], maxdegree=10)
            else:
                q = mp.quad(g, [a, b], method=method, maxdegree=10)
        total += w * q
    return total


def log_slope_at_end(E, t):
    """1/|dE/dtau| at tau = t for the exponent E(tau): the e-folding length
    of the integrand towards its upper end (None if flat there)."""
    if mp.isinf(t):
        return None
    d = mp.diff(E, t)
    if d <= 0:
        return None
    return min(1 / d, t / 4)


def time_integral_1d(kind, x, t, V, D, R, Mu):
    with mp.workdps(DPS + 15):
        x, t, V, D, R, Mu = [mp.mpf(a) for a in (x, t, V, D, R, Mu)]
        Vp, Dp = V / R, D / R
        tr = x / Vp
        sig = tr * mp.sqrt(2 * Dp / (Vp * x))
        E = lambda tau: -Mu * tau - (x - Vp * tau) ** 2 / (4 * Dp * tau)
        pts = time_breakpoints(t, tr, sig, Mu, log_slope_at_end(E, t))
        k = kernel_1d_first if kind == 1 else kernel_1d_third
        f = lambda tau: k(x, tau, Vp, Dp, Mu)
        return integrate(f, pts)


def gen_1d():
    cases = []
    x = 30.0
    V = 0.25
    t0 = time.time()

    def add(label, kind, x, t, V, D, R, Mu, tr):
        fn = ob1 if kind == 1 else ob3
        args = [x, t, V, D, R, Mu]
        with mp.workdps(DPS + 20):
            tv = fn(*[mp.mpf(a) for a in args])
        if tv < TINY_KEEP and tv >= TINY_ZERO:
            return "dropped"
        v, dprec = two_precisions(fn, args)
        row = {"label": label, "inlet": "first" if kind == 1 else "third",
               "x": fnum(x), "t": fnum(t), "V": fnum(V), "Dx": fnum(D), "R": fnum(R), "Mu": fnum(Mu),
               "travel_time": fnum(tr), "peclet": fnum(x * V / D),
               "value": dstr(v), "expect_zero": bool(v < TINY_ZERO),
               "closed_form_precision_check": mp.nstr(dprec, 3)}
        if v < TINY_ZERO:
            row["cond"] = "0"
            cases.append(row)
            return "zero"
        row["cond"] = dstr(condition(fn, args, [0, 1, 2, 3, 4, 5]))
        F = (lap1 if kind == 1 else lap3)(*[mp.mpf(a) for a in (x, V, D, R, Mu)])
        lv, note = talbot(F, mp.mpf(t), v)
        row["talbot_relerr"] = mp.nstr(relerr(lv, v), 3) if lv is not None else None
        row["talbot_note"] = note
        iv = time_integral_1d(kind, x, t, V, D, R, Mu)
        row["time_integral_relerr"] = mp.nstr(relerr(iv, v), 3)
        ok = (lv is not None and relerr(lv, v) < AGREE) or relerr(iv, v) < AGREE
        if not ok:
            print("DISAGREE", label, dstr(v), lv, dstr(iv), file=sys.stderr)
            row["independent_check"] = "FAILED"
        else:
            row["independent_check"] = "ok"
        cases.append(row)
        if len(cases) % 50 == 0:
            print(len(cases), "cases, %.0fs" % (time.time() - t0), file=sys.stderr, flush=True)
        return "kept"

    stats = {}
    for Pe in (1e-2, 1.0, 1e2, 1e4, 1e6):
        D = V * x / Pe
        for R in (1.0, 3.7):
            tr = R * x / V
            for mulab, mutr in (("0", 0.0), ("0.1", 0.1), ("5", 5.0)):
                Mu = mutr / tr
                for f in (1e-4, 1e-2, 0.5, 1.0, 2.0, 1e2, 1e3, INF):
                    t = f * tr
                    for kind in (1, 3):
                        lab = "%s Pe=%g R=%g Mu*tr=%s t=%s" % (
                            "first" if kind == 1 else "third", Pe, R, mulab,
                            "steady" if math.isinf(f) else "%g*tr" % f)
                        r = add(lab, kind, x, t, V, D, R, Mu, tr)
                        stats[r] = stats.get(r, 0) + 1
    # deep tails: times before arrival chosen so that the first-type value
    # is about 1e-12, 1e-100, 1e-250 and 1e-297 of the source
    for Pe in (1e2, 1e4, 1e6):
        D = V * x / Pe
        R = 3.7
        tr = R * x / V
        for mutr in (0.0, 0.1):
            Mu = mutr / tr
            for target in (1e-12, 1e-100, 1e-250, 1e-297):
                with mp.workdps(60):
                    g = lambda lf: mp.log(ob1(mp.mpf(x), tr * mp.exp(lf), mp.mpf(V), mp.mpf(D), mp.mpf(R),
                                              mp.mpf(Mu))) - mp.log(target)
                    # start from the leading-order estimate
                    # Pe (1-f)^2/(4f) = ln(1/target), f = t/tr
                    q = 1 + 2 * mp.log(1 / mp.mpf(target)) / Pe
                    f0 = q - mp.sqrt(q * q - 1)
                    # g increases with lf; bisect on a bracket around the estimate
                    lo, hi = mp.log(f0) - 1, min(mp.log(f0) + 1, mp.mpf(0))
                    assert g(lo) < 0 < g(hi), (Pe, target)
                    for _ in range(200):
                        mid = (lo + hi) / 2
                        if g(mid) < 0:
                            lo = mid
                        else:
                            hi = mid
                    lf = (lo + hi) / 2
                t = float(tr * mp.exp(lf))
                for kind in (1, 3):
                    lab = "%s tail Pe=%g R=%g Mu*tr=%g value~%g" % (
                        "first" if kind == 1 else "third", Pe, R, mutr, target)
                    r = add(lab, kind, x, t, V, D, R, Mu, tr)
                    stats[r] = stats.get(r, 0) + 1
    # far receptors at a fixed time (x large, fixed t): another tail family
    D = 0.25 * 1.0   # alpha_L = 1 m
    for xf in (300.0, 1000.0, 3000.0):
        t = 400.0
        for kind in (1, 3):
            lab = "%s far receptor x=%g alpha_L=1 t=%g" % ("first" if kind == 1 else "third", xf, t)
            r = add(lab, kind, xf, t, V, D, 1.0, 1e-3, xf / V)
            stats[r] = stats.get(r, 0) + 1
    doc = header("OgataBanks (first-type inlet) and OgataBanksFlux (third-type inlet): C/C0 in a "
                 "semi-infinite column, continuous source from t = 0, R Ct = Dx Cxx - V Cx - R Mu C")
    doc["sources"] = ["Ogata & Banks (1961), USGS Professional Paper 411-A",
                      "van Genuchten & Alves (1982), USDA Technical Bulletin 1661 (decay; third-type inlet)"]
    doc["laplace_domain"] = ("lambda = (V - sqrt(V^2 + 4 Dx R (s+Mu)))/(2 Dx); first-type exp(lambda x)/s; "
                             "third-type 2V/(s (V + sqrt(V^2+4DxR(s+Mu)))) exp(lambda x)")
    doc["relerr_note"] = ("talbot_relerr and time_integral_relerr are |other/value - 1| formed at 70 digits; "
                          "\"0.0\" means agreement beyond 70 digits (Talbot's second pass runs at 80+ digits)")
    doc["dropped"] = stats.get("dropped", 0)
    doc["dropped_note"] = "cases with true value in [1e-320, 1e-300) are left out"
    doc["cases"] = cases
    write("analytic_1d.json", doc)
    print("1d", stats, "%.0fs" % (time.time() - t0), file=sys.stderr)


# ---------------------------------------------------------------------------
# 1D column with a source history (finite duration, depletion)
# ---------------------------------------------------------------------------

def hist_closed(kind, x, t, V, D, R, Mu, Dur, g):
    """C/C0 for a source C0 exp(-g s) active for 0 <= s <= Dur (Dur = +Inf:
    never stops), by superposition of the closed forms: the response to
    C0 exp(-g s) from s = 0 is exp(-g t) times the constant-source solution
    with the decay rate Mu - g, so
        C = exp(-g t) [F(t) - F(t - Dur)],  F = ob1 or ob3 with Mu - g.
    Evaluated at the working precision, which must exceed the digits lost
    to the subtraction (the callers use 120 and 200 digits)."""
    fn = ob1 if kind == 1 else ob3
    c = fn(x, t, V, D, R, Mu - g)
    if not mp.isinf(Dur) and t > Dur:
        c -= fn(x, t - Dur, V, D, R, Mu - g)
    return mp.exp(-g * t) * c


def hist_integral(kind, x, t, V, D, R, Mu, Dur, g):
    """The same value as the time integral of the impulse response over the
    ages max(0, t - Dur) <= tau <= t with the depletion weight
    exp(-g (t - tau)): independent of the closed forms."""
    with mp.workdps(DPS + 15):
        x, t, V, D, R, Mu, Dur, g = [mp.mpf(a) for a in (x, t, V, D, R, Mu, Dur, g)]
        Vp, Dp = V / R, D / R
        t0 = t - Dur if (not mp.isinf(Dur) and t > Dur) else mp.mpf(0)
        tr = x / Vp
        sig = tr * mp.sqrt(2 * Dp / (Vp * x))
        E = lambda tau: -Mu * tau - (x - Vp * tau) ** 2 / (4 * Dp * tau) - g * (t - tau)
        pts = [p for p in time_breakpoints(t, tr, sig, Mu + g, log_slope_at_end(E, t))[1:-1] if p > t0]
        if t0 > 0:
            # a ladder away from the lower end, on the scale of the
            # integrand's fall there
            d = mp.diff(E, t0)
            scale = min(1 / abs(d), (t - t0) / 4) if d != 0 else (t - t0) / 4
            pts += [t0 + scale * mp.mpf(4) ** j for j in range(-6, 30) if t0 + scale * mp.mpf(4) ** j < t]
        pts = [t0] + sorted(set(pts)) + [t]
        k = kernel_1d_first if kind == 1 else kernel_1d_third
        f = lambda tau: k(x, tau, Vp, Dp, Mu) * mp.exp(-g * (t - tau))
        return integrate(f, pts)


def gen_1d_history():
    """analytic_1d_history.json: OgataBanksAt for finite-duration and
    depleting sources, both inlets, including long after the pulse, where
    two step responses of nearly equal size are subtracted."""
    t0 = time.time()
    cases = []
    L2 = mp.log(2)

    def add(label, kind, x, t, V, D, R, Mu, Dur, g):
        args = [x, t, V, D, R, Mu, Dur, g]
        with mp.workdps(120):
            v1 = hist_closed(kind, *[mp.mpf(a) for a in args])
        with mp.workdps(200):
            v2 = hist_closed(kind, *[mp.mpf(a) for a in args])
        prec = relerr(v1, v2)
        iv = hist_integral(kind, *args)
        agree = relerr(iv, v2)
        if v2 < TINY_ZERO:
            return
        with mp.workdps(120):
            fn = lambda *a: hist_closed(kind, *a)
            cond = condition(fn, args, [0, 1, 2, 3, 4, 5, 6, 7])
        row = {"label": label, "inlet": "first" if kind == 1 else "third",
               "x": fnum(x), "t": fnum(t), "V": fnum(V), "Dx": fnum(D), "R": fnum(R), "Mu": fnum(Mu),
               "duration": fnum(Dur), "depletion": fnum(g),
               "value": dstr(v2), "cond": dstr(cond),
               "precision_check": mp.nstr(prec, 3), "time_integral_relerr": mp.nstr(agree, 3)}
        if agree > AGREE:
            print("DISAGREE", label, dstr(v2), dstr(iv), file=sys.stderr)
            row["independent_check"] = "FAILED"
        else:
            row["independent_check"] = "ok"
        cases.append(row)

    # The audit case: v 0.3 m/d, alpha_L 5 m (D = 1.5 m2/d), R 1.5, a
    # half-life of 365 d on dissolved and sorbed mass (Mu = ln2/365), a
    # source active for 300 d; during, just after and long after the pulse.
    V, D, R, Mu, Dur = 0.3, 1.5, 1.5, float(L2 / 365), 300.0
    for kind in (1, 3):
        kl = "first" if kind == 1 else "third"
        for x, t in ((50.0, 3000.0), (10.0, 3000.0), (10.0, 5000.0), (10.0, 6000.0), (10.0, 7000.0),
                     (10.0, 8000.0), (50.0, 200.0), (50.0, 400.0), (50.0, 1000.0), (10.0, 301.0),
                     (120.0, 900.0), (120.0, 2500.0), (1.0, 4000.0), (0.01, 1000.0)):
            add("%s audit finite duration x=%g t=%g" % (kl, x, t), kind, x, t, V, D, R, Mu, Dur, 0.0)
        # depletion, slower and faster than the decay, and both histories
        for g in (float(L2 / 730), float(L2 / 100)):
            for x, t in ((10.0, 500.0), (50.0, 3000.0), (10.0, 6000.0)):
                add("%s audit depletion g=%.3g x=%g t=%g" % (kl, g, x, t), kind, x, t, V, D, R, Mu, INF, g)
                add("%s audit depletion and duration g=%.3g x=%g t=%g" % (kl, g, x, t), kind, x, t, V, D, R,
                    Mu, Dur, g)
    # Other Peclet numbers (x V/D = 0.01, 1e2, 1e4): a short pulse long
    # after, and without decay.
    for Pe in (1e-2, 1e2, 1e4):
        x = 30.0
        V = 0.25
        D = V * x / Pe
        R = 2.0
        tr = R * x / V
        for kind in (1, 3):
            kl = "first" if kind == 1 else "third"
            for Mu in (0.0, 0.1 / tr):
                for f, df in ((3.0, 0.1), (10.0, 0.5), (0.9, 0.5)):
                    t, Dur = f * tr, df * tr
                    add("%s Pe=%g Mu*tr=%g pulse t=%g*tr duration=%g*tr" % (kl, Pe, Mu * tr, f, df),
                        kind, x, t, V, D, R, Mu, Dur, 0.0)
    doc = header("OgataBanksAt: C/C0 in a semi-infinite column for a source C0 exp(-depletion s) "
                 "active for 0 <= s <= duration, both inlet types")
    doc["formula"] = ("exp(-g t) [F(t) - F(t - duration)] with F the constant-source solution (Ogata & Banks "
                      "1961; van Genuchten & Alves 1982, decay Mu - g), evaluated at 120 and 200 digits; "
                      "checked against the time integral of the impulse response over the ages the source "
                      "was active (time_integral_relerr)")
    doc["sources"] = ["Ogata & Banks (1961), USGS Professional Paper 411-A",
                      "van Genuchten & Alves (1982), USDA Technical Bulletin 1661"]
    doc["cases"] = cases
    write("analytic_1d_history.json", doc)
    print("1d history cases", len(cases), "%.0fs" % (time.time() - t0), file=sys.stderr)


# ---------------------------------------------------------------------------
# 3D exact and Domenico
# ---------------------------------------------------------------------------

def strip_factor(c, half, D, tau):
    """[erf((c+half)/(2 sqrt(D tau))) - erf((c-half)/(2 sqrt(D tau)))]/2,
    without cancellation when both arguments have the same sign."""
    c = abs(c)
    if mp.isinf(half):
        return mp.mpf(1)
    s = 2 * mp.sqrt(D * tau)
    lo, hi = (c - half) / s, (c + half) / s
    if lo >= 0:
        return (mp.erfc(lo) - mp.erfc(hi)) / 2
    return (mp.erf(hi) - mp.erf(lo)) / 2


def kernel_3d(x, y, z, tau, Vp, Dxp, Dyp, Dzp, Mu, W, Z):
    return (kernel_1d_first(x, tau, Vp, Dxp, Mu)
            * strip_factor(y, W / 2, Dyp, tau) * strip_factor(z, Z, Dzp, tau))


def exact3d(x, y, z, t, V, Dx, Dy, Dz, R, Mu, W, Z, refine=False, method='tanh-sinh'):
    Vp, Dxp, Dyp, Dzp = V / R, Dx / R, Dy / R, Dz / R
    tr = x / Vp
    sig = tr * mp.sqrt(2 * Dxp / (Vp * x))
    ylo = max(abs(y) - W / 2, 0) if not mp.isinf(W) else 0
    zlo = max(abs(z) - Z, 0) if not mp.isinf(Z) else 0
    E = lambda tau: (-Mu * tau - (x - Vp * tau) ** 2 / (4 * Dxp * tau)
                     - ylo ** 2 / (4 * Dyp * tau) - zlo ** 2 / (4 * Dzp * tau))
    pts = time_breakpoints(t, tr, sig, Mu, log_slope_at_end(E, t))
    # the transverse factors switch on where tau ~ distance^2/(4 D)
    extra = []
    for dist, Dp in ((ylo, Dyp), (zlo, Dzp), (abs(y) + W / 2, Dyp), (abs(z) + Z, Dzp)):
        if dist > 0 and not mp.isinf(dist):
            for k in (0.25, 1, 4):
                extra.append(k * dist ** 2 / (4 * Dp))
    pts = sorted(set(pts[1:-1] + [p for p in extra if 0 < p < t]))
    pts = [mp.mpf(0)] + pts + [t]
    f = lambda tau: kernel_3d(x, y, z, tau, Vp, Dxp, Dyp, Dzp, Mu, W, Z)
    return integrate(f, pts, method=method, refine=refine)


def domenico(x, y, z, t, V, Dx, Dy, Dz, R, Mu, W, Z):
    ax, ay, az = Dx / V, Dy / V, Dz / V
    q = mp.sqrt(1 + 4 * Mu * ax * R / V)
    if mp.isinf(t):
        e = mp.mpf(2)
    else:
        e = mp.erfc((x - (V / R) * t * q) / (2 * mp.sqrt(ax * (V / R) * t)))
    return (mp.exp(x / (2 * ax) * (1 - q)) * e / 8
            * 2 * strip_factor(y, W / 2, ay * x, 1) * 2 * strip_factor(z, Z, az * x, 1))


def gen_3d():
    t0 = time.time()
    cases = []
    geoms = [
        # label, V, alpha L/T/V, x list, W, Z
        ("moderate Peclet", 0.3, (10.0, 1.0, 0.1), (5.0, 50.0, 200.0), 15.0, 3.0),
        ("high Peclet", 0.3, (0.5, 0.05, 0.005), (500.0,), 15.0, 3.0),
    ]
    pts_yz = [(0.0, 0.0, "centreline"), (5.0, 0.0, "|y| inside W/2"), (-12.0, 0.0, "|y| outside W/2"),
              (0.0, 2.0, "z inside source depth"), (0.0, 6.0, "z below source"),
              (12.0, 6.0, "off axis and below"), (40.0, 1.0, "far off axis")]
    n = 0
    for glab, V, (aL, aT, aV), xs, W, Z in geoms:
        Dx, Dy, Dz = aL * V, aT * V, aV * V
        for R, mutr in ((1.0, 0.0), (3.7, 0.0), (1.0, 0.5), (3.7, 2.0)):
            for x in xs:
                if x != 50.0 and (R, mutr) in ((3.7, 0.0), (1.0, 0.5)):
                    continue  # all four combinations only at x = 50
                tr = R * x / V
                Mu = mutr / tr if mutr else 0.0
                if glab == "high Peclet":
                    fs = (0.6, 0.95, 1.0, 1.05, 3.0, INF)
                    yzs = pts_yz[:6]
                else:
                    fs = (0.5, 1.0, 2.0, 10.0, INF)
                    yzs = pts_yz if x == 50.0 else pts_yz[:1] + pts_yz[2:3] + pts_yz[4:5]
                for f in fs:
                    t = f * tr
                    for y, z, plab in yzs:
                        args = [x, y, z, t, V, Dx, Dy, Dz, R, Mu, W, Z]
                        with mp.workdps(DPS):
                            ma = [mp.mpf(a) for a in args]
                            v1 = exact3d(*ma)
                            v2 = exact3d(*ma, method='gauss-legendre')
                            dm = domenico(*ma)
                        agree = relerr(v1, v2) if v2 != 0 else mp.mpf(0)
                        lab = "%s %s x=%g t=%s R=%g Mu*tr=%g" % (
                            glab, plab, x, "steady" if math.isinf(f) else "%g*tr" % f, R, mutr)
                        if v1 < TINY_KEEP:
                            continue
                        dv, dprec = two_precisions(domenico, args)
                        row = {"label": lab, "x": fnum(x), "y": fnum(y), "z": fnum(z), "t": fnum(t),
                               "V": fnum(V), "Dx": fnum(Dx), "Dy": fnum(Dy), "Dz": fnum(Dz), "R": fnum(R),
                               "Mu": fnum(Mu), "Width": fnum(W), "Depth": fnum(Z),
                               "exact": dstr(v1), "exact_quadrature_agreement": mp.nstr(agree, 3),
                               "domenico": dstr(dv), "domenico_precision_check": mp.nstr(dprec, 3),
                               "domenico_cond": dstr(condition(domenico, args, range(12)))}
                        if agree > AGREE:
                            print("QUAD DISAGREE", lab, v1, v2, file=sys.stderr)
                        cases.append(row)
                        n += 1
        print(glab, n, "%.0fs" % (time.time() - t0), file=sys.stderr)
    # early-time tail at high Peclet, and the 1D limit with huge source
    for lab, args in [
        ("early-time tail high Peclet centreline t=0.8*tr",
         [500.0, 0.0, 0.0, 0.8 * 500.0 / 0.3, 0.3, 0.15, 0.015, 0.0015, 1.0, 0.0, 15.0, 3.0]),
        ("early-time tail high Peclet centreline t=0.7*tr decay",
         [500.0, 0.0, 1.0, 0.7 * 500.0 / 0.3, 0.3, 0.15, 0.015, 0.0015, 1.0, 1e-4, 15.0, 3.0]),
        ("early-time tail moderate Peclet t=0.05*tr",
         [200.0, 3.0, 1.0, 0.05 * 200.0 / 0.3, 0.3, 3.0, 0.3, 0.03, 1.0, 0.0, 15.0, 3.0]),
        ("very wide deep source (1D limit) x=50 t=tr",
         [50.0, 0.0, 0.0, 50.0 / 0.3, 0.3, 3.0, 0.3, 0.03, 1.0, 0.0, 1e6, 1e6]),
    ]:
        with mp.workdps(DPS):
            ma = [mp.mpf(a) for a in args]
            v1 = exact3d(*ma)
            v2 = exact3d(*ma, method='gauss-legendre')
        agree = relerr(v1, v2)
        dv, dprec = two_precisions(domenico, args)
        names = ["x", "y", "z", "t", "V", "Dx", "Dy", "Dz", "R", "Mu", "Width", "Depth"]
        row = {k: fnum(a) for k, a in zip(names, args)}
        row.update({"label": lab, "exact": dstr(v1), "exact_quadrature_agreement": mp.nstr(agree, 3),
                    "domenico": dstr(dv), "domenico_precision_check": mp.nstr(dprec, 3),
                    "domenico_cond": dstr(condition(domenico, args, range(12)))})
        if agree > AGREE:
            print("QUAD DISAGREE", lab, v1, v2, file=sys.stderr)
        cases.append(row)
    doc = header("Exact3D: C/C0 as the time integral over a continuous planar source (width Width "
                 "centred on y = 0, depth Depth below a no-flux water table); Domenico (1987) "
                 "approximation for the same points")
    doc["exact_formula"] = ("int_0^t x/(2 sqrt(pi Dx' tau^3)) exp(-Mu tau - (x - V' tau)^2/(4 Dx' tau)) Fy Fz dtau, "
                            "primes = divided by R, Fy = [erf((y+W/2)/(2 sqrt(Dy' tau))) - erf((y-W/2)/(2 sqrt(Dy' tau)))]/2, "
                            "Fz likewise with (z+Depth), (z-Depth)")
    doc["domenico_formula"] = ("1/8 exp(x/(2ax)(1-q)) erfc((x - (V/R) t q)/(2 sqrt(ax (V/R) t))) "
                               "[erf((y+W/2)/(2 sqrt(ay x))) - erf((y-W/2)/(2 sqrt(ay x)))] "
                               "[erf((z+Z)/(2 sqrt(az x))) - erf((z-Z)/(2 sqrt(az x)))], q = sqrt(1+4 Mu ax R/V), ai = Di/V")
    doc["sources"] = ["exact: time integral of the point-source kernel (e.g. Wexler 1992, USGS TWRI 3-B7)",
                      "Domenico (1987), J. Hydrology 91, 49-58"]
    doc["cases"] = cases
    write("analytic_3d.json", doc)
    print("3d cases", len(cases), "%.0fs" % (time.time() - t0), file=sys.stderr)


# ---------------------------------------------------------------------------
# 3D extremes: Peclet 1e-2 and 1e6, tiny values, screens, histories
# ---------------------------------------------------------------------------

def ierfc_mp(u):
    """integral_u^inf erfc = exp(-u^2)/sqrt(pi) - u erfc(u), u >= 0, at 40
    digits more than the working precision (the two terms cancel)."""
    with mp.workdps(mp.mp.dps + 40):
        u = mp.mpf(u)
        v = mp.exp(-u * u) / mp.sqrt(mp.pi) - u * mp.erfc(u)
    return +v


def strip_avg(z1, z2, Z, Dp, tau):
    """Mean over z in [z1, z2] of strip_factor(z, Z, Dp, tau) (z1 == z2: the
    point), from the antiderivative |s| + ierfc(|s|) of erf(s) with the
    linear parts written exactly for the position of the screen against Z
    (a closed form, not the Go code's: the Go code also switches to a
    Gauss rule for short screens)."""
    if z1 == z2:
        return strip_factor(z1, Z, Dp, tau)
    if mp.isinf(Z):
        return mp.mpf(1)
    c = 1 / (2 * mp.sqrt(Dp * tau))
    if z1 >= Z:
        lin = mp.mpf(0)
    elif z2 <= Z:
        lin = 2 * (z2 - z1)
    else:
        lin = 2 * (Z - z1)
    corr = (ierfc_mp(c * (z2 + Z)) - ierfc_mp(c * (z1 + Z))
            - ierfc_mp(c * abs(z2 - Z)) + ierfc_mp(c * abs(z1 - Z)))
    return (c * lin + corr) / (2 * c * (z2 - z1))


def exact3d_x(x, y, z1, z2, t, V, Dx, Dy, Dz, R, Mu, W, Z, Dur, g, method='tanh-sinh'):
    """The exact 3D value for a screen [z1, z2] and a source C0 exp(-g s)
    active for 0 <= s <= Dur: the point-source kernel times the transverse
    factors (the vertical one averaged over the screen), integrated over the
    ages max(0, t - Dur) <= tau <= t with the weight exp(-g (t - tau))."""
    Vp, Dxp, Dyp, Dzp = V / R, Dx / R, Dy / R, Dz / R
    tr = x / Vp
    sig = tr * mp.sqrt(2 * Dxp / (Vp * x))
    t0 = t - Dur if (not mp.isinf(Dur) and not mp.isinf(t) and t > Dur) else mp.mpf(0)
    ylo = max(abs(y) - W / 2, 0) if not mp.isinf(W) else 0
    zlo = max(z1 - Z, 0) if not mp.isinf(Z) else 0
    E = lambda tau: (-Mu * tau - (x - Vp * tau) ** 2 / (4 * Dxp * tau)
                     - ylo ** 2 / (4 * Dyp * tau) - zlo ** 2 / (4 * Dzp * tau) - g * (t - tau))
    pts = time_breakpoints(t, tr, sig, Mu + g, log_slope_at_end(E, t))[1:-1]
    for dist, Dp in ((ylo, Dyp), (zlo, Dzp), (abs(y) + W / 2, Dyp), (z1 + Z, Dzp), (z2 + Z, Dzp),
                     (abs(z2 - Z), Dzp)):
        if dist > 0 and not mp.isinf(dist):
            for k in (0.25, 1, 4):
                pts.append(k * dist ** 2 / (4 * Dp))
    if t0 > 0:
        d = mp.diff(E, t0)
        scale = min(1 / abs(d), (t - t0) / 4) if d != 0 else (t - t0) / 4
        pts += [t0 + scale * mp.mpf(4) ** j for j in range(-6, 30)]
    pts = [t0] + sorted(set(p for p in pts if t0 < p < t)) + [t]
    f = lambda tau: (kernel_1d_first(x, tau, Vp, Dxp, Mu) * strip_factor(y, W / 2, Dyp, tau)
                     * strip_avg(z1, z2, Z, Dzp, tau) * (mp.exp(-g * (t - tau)) if g else 1))
    return integrate(f, pts, method=method)


def dom_long(x, t, V, Dx, R, Mu):
    ax = Dx / V
    q = mp.sqrt(1 + 4 * Mu * ax * R / V)
    e = mp.mpf(2) if mp.isinf(t) else mp.erfc((x - (V / R) * t * q) / (2 * mp.sqrt(ax * (V / R) * t)))
    return mp.exp(x / (2 * ax) * (1 - q)) * e / 2


def domenico_x(x, y, z1, z2, t, V, Dx, Dy, Dz, R, Mu, W, Z, Dur, g):
    """DomenicoAt's definition: the longitudinal factor of the depleting
    source (g <= Mu: exp(-g t) L(t; Mu - g); g > Mu: exp(-g max(t - Rx/V,
    0)) L(t; Mu)), minus exp(-g Dur) times the same at t - Dur after the
    source stops; times the transverse factors at the travel distance, the
    vertical one averaged over the screen."""
    def dep(tt):
        if tt <= 0:
            return mp.mpf(0)
        if g == 0:
            return dom_long(x, tt, V, Dx, R, Mu)
        if mp.isinf(tt):
            return mp.mpf(0)
        if g <= Mu:
            return mp.exp(-g * tt) * dom_long(x, tt, V, Dx, R, Mu - g)
        return mp.exp(-g * max(tt - R * x / V, 0)) * dom_long(x, tt, V, Dx, R, Mu)
    L = dep(t)
    if not mp.isinf(Dur) and not mp.isinf(t) and t > Dur:
        L -= mp.exp(-g * Dur) * dep(t - Dur)
    ay, az = Dy / V, Dz / V
    return L * strip_factor(y, W / 2, ay * x, 1) * strip_avg(z1, z2, Z, az * x, 1)


def gen_3d_extremes():
    t0 = time.time()
    cases = []
    names = ["x", "y", "top", "bottom", "t", "V", "Dx", "Dy", "Dz", "R", "Mu", "Width", "Depth",
             "duration", "depletion"]

    def add(label, args):
        args = [float(a) for a in args]
        with mp.workdps(DPS):
            ma = [mp.mpf(a) for a in args]
            v1 = exact3d_x(*ma)
            v2 = exact3d_x(*ma, method='gauss-legendre')
        agree = relerr(v1, v2) if v2 != 0 else mp.mpf(0)
        with mp.workdps(2 * DPS):
            dv = domenico_x(*[mp.mpf(a) for a in args])
            dcond = condition(lambda *a: domenico_x(*a), args, range(15)) if dv > TINY_KEEP else mp.mpf(0)
        if v1 < TINY_KEEP:
            print("dropped (below 1e-300)", label, file=sys.stderr)
            return
        row = {k: fnum(a) for k, a in zip(names, args)}
        row.update({"label": label, "exact": dstr(v1), "exact_quadrature_agreement": mp.nstr(agree, 3),
                    "domenico": dstr(dv), "domenico_cond": dstr(dcond)})
        if agree > AGREE:
            print("QUAD DISAGREE", label, v1, v2, file=sys.stderr)
        cases.append(row)
        print(len(cases), label, mp.nstr(v1, 6), "%.0fs" % (time.time() - t0), file=sys.stderr, flush=True)

    inf = INF
    W, Z = 15.0, 3.0
    # Peclet 1e-2 at the receptor (x V/Dx): 0.1 m from the source, alpha_L 10 m.
    V, aL, aT, aV = 0.3, 10.0, 1.0, 0.1
    for R, Mu in ((1.0, 0.0), (2.0, 1e-3)):
        x = 0.1
        tr = R * x / V
        for f in (0.1, 1.0, 10.0, inf):
            for y, z1, z2, pl in ((0, 1, 1, "centreline"), (5, 2, 2, "inside"), (12, 1, 1, "beside"),
                                  (0, 6, 6, "below"), (0, 0, 3, "screen 0-3 m"), (0, 2, 6, "screen 2-6 m")):
                add("Pe=0.01 %s t=%s R=%g Mu=%g" % (pl, "steady" if math.isinf(f) else "%g*tr" % f, R, Mu),
                    [x, y, z1, z2, f * tr, V, aL * V, aT * V, aV * V, R, Mu, W, Z, inf, 0])
    # Peclet 1e6: alpha_L 0.3 mm at 300 m; times around the travel time.
    V, aL, aT, aV = 0.3, 3e-4, 3e-5, 3e-6
    for R, Mu in ((1.0, 0.0), (1.5, 1e-4)):
        x = 300.0
        tr = R * x / V
        for f in (0.999, 1.0, 1.001, 2.0, inf):
            for y, z1, z2, pl in ((0, 1, 1, "centreline"), (7, 2.9, 2.9, "inside near corner"),
                                  (7.6, 1, 1, "just beside"), (0, 1, 4, "screen 1-4 m")):
                add("Pe=1e6 %s t=%s R=%g Mu=%g" % (pl, "steady" if math.isinf(f) else "%g*tr" % f, R, Mu),
                    [x, y, z1, z2, f * tr, V, aL * V, aT * V, aV * V, R, Mu, W, Z, inf, 0])
    # Tiny values: the early tail, far beside, far below (moderate Peclet).
    V, aL, aT, aV = 0.1, 10.0, 1.0, 0.1
    R, Mu = 1.4, math.log(2) / 720
    for x, y, z1, z2, t, pl in ((300.0, 0, 1, 1, 600.0, "early tail"), (300.0, 0, 1, 1, 350.0, "early tail"),
                                 (50.0, 60, 1, 1, inf, "60 m beside"), (50.0, 100, 1, 1, inf, "100 m beside"),
                                 (30.0, 0, 25, 25, inf, "25 m below"), (30.0, 0, 20, 40, 3650.0, "screen 20-40 m"),
                                 (1500.0, 0, 1, 1, inf, "1500 m downgradient"),
                                 (100.0, 40, 12, 12, 3650.0, "beside and below")):
        add("tiny %s x=%g t=%s" % (pl, x, t), [x, y, z1, z2, t, V, aL * V, aT * V, aV * V, R, Mu, W, Z, inf, 0])
    # Screens and histories at the benchmark's parameters.
    for x, y, z1, z2 in ((50.0, 0, 0, 3), (50.0, 0, 2, 5), (50.0, 4, 5, 10), (210.0, 6, 1, 20), (30.0, 5, 1, 1)):
        for t, Dur, g, hl in ((3650.0, 1825.0, 0, "5 y source"), (9000.0, 1825.0, 0, "long after a 5 y source"),
                              (30000.0, 1825.0, 0, "very long after"), (3650.0, inf, math.log(2) / 3000, "depleting"),
                              (3650.0, inf, 0.01, "depleting fast"), (7300.0, 1825.0, 0.01, "depleting, stopped")):
            add("history %s x=%g y=%g z=[%g,%g] t=%g" % (hl, x, y, z1, z2, t),
                [x, y, z1, z2, t, V, aL * V, aT * V, aV * V, R, Mu, W, Z, Dur, g])
    doc = header("Exact3DAt and DomenicoAt at the extremes: Peclet numbers 1e-2 and 1e6 at the receptor, "
                 "values far below the source, well screens, receptors inside and below the source, "
                 "finite-duration and depleting sources")
    doc["exact_formula"] = ("int over ages max(0, t - duration) .. t of x/(2 sqrt(pi Dx' tau^3)) exp(-Mu tau - "
                            "(x - V' tau)^2/(4 Dx' tau)) Fy(tau) <Fz(tau)> exp(-depletion (t - tau)) dtau; primes: "
                            "divided by R; <Fz> the mean of Fz over [top, bottom] from the antiderivative of erf")
    doc["domenico_formula"] = ("longitudinal factor of the depleting source (depletion g <= Mu: exp(-g t) L(t; Mu-g); "
                               "g > Mu: exp(-g max(t - R x/V, 0)) L(t; Mu)) minus exp(-g duration) times the same at "
                               "t - duration; L = 1/2 exp(x/(2 ax)(1-q)) erfc((x - V t q/R)/(2 sqrt(ax V t/R))); "
                               "times the transverse factors at the travel distance (vertical one averaged)")
    doc["sources"] = ["exact: time integral of the point-source kernel (e.g. Wexler 1992, USGS TWRI 3-B7)",
                      "Domenico (1987), J. Hydrology 91, 49-58"]
    doc["cases"] = cases
    write("analytic_3d_extremes.json", doc)
    print("3d extremes", len(cases), "%.0fs" % (time.time() - t0), file=sys.stderr)


# ---------------------------------------------------------------------------
# Puffs
# ---------------------------------------------------------------------------

def puff3(x, y, z, t, V, Dx, Dy, Dz, R, Mu, M, n, d0):
    Vp, Dxp, Dyp, Dzp = V / R, Dx / R, Dy / R, Dz / R
    g = (1 / (8 * (mp.pi * t) ** mp.mpf(1.5) * mp.sqrt(Dxp * Dyp * Dzp))
         * mp.exp(-(x - Vp * t) ** 2 / (4 * Dxp * t) - y ** 2 / (4 * Dyp * t))
         * (mp.exp(-(z - d0) ** 2 / (4 * Dzp * t)) + mp.exp(-(z + d0) ** 2 / (4 * Dzp * t))))
    return M / (n * R) * g * mp.exp(-Mu * t)


def puff2(x, y, t, V, Dx, Dy, R, Mu, M, n):
    Vp, Dxp, Dyp = V / R, Dx / R, Dy / R
    g = (1 / (4 * mp.pi * t * mp.sqrt(Dxp * Dyp))
         * mp.exp(-(x - Vp * t) ** 2 / (4 * Dxp * t) - y ** 2 / (4 * Dyp * t)))
    return M / (n * R) * g * mp.exp(-Mu * t)


def puff1(x, t, V, Dx, R, Mu, M, n):
    Vp, Dxp = V / R, Dx / R
    g = 1 / mp.sqrt(4 * mp.pi * Dxp * t) * mp.exp(-(x - Vp * t) ** 2 / (4 * Dxp * t))
    return M / (n * R) * g * mp.exp(-Mu * t)


def gen_puff():
    doc = header("Instantaneous releases: dissolved concentration (mass per volume of water) of a "
                 "Gaussian puff moving with V/R, spreading with D/R, decaying at Mu")
    doc["formulas"] = {
        "Puff3D": "M/(n R) exp(-Mu t) exp(-(x-V't)^2/(4Dx't) - y^2/(4Dy't)) [exp(-(z-d0)^2/(4Dz't)) + exp(-(z+d0)^2/(4Dz't))] / (8 (pi t)^1.5 sqrt(Dx'Dy'Dz'))",
        "Puff2D": "M/(n R) exp(-Mu t) exp(-(x-V't)^2/(4Dx't) - y^2/(4Dy't)) / (4 pi t sqrt(Dx'Dy'))",
        "Puff1D": "M/(n R) exp(-Mu t) exp(-(x-V't)^2/(4Dx't)) / sqrt(4 pi Dx' t)",
        "primes": "divided by R",
    }
    c3, c2, c1 = [], [], []
    V, Dx, Dy, Dz = 0.3, 3.0, 0.3, 0.03
    for R, Mu in ((1.0, 0.0), (2.5, 1e-3)):
        for t in (1.0, 100.0, 1000.0):
            for x, y, z, d0 in ((0.0, 0.0, 0.0, 0.0), (30.0 / R, 0.0, 1.0, 2.0), (300.0 / R, 5.0, 4.0, 2.0),
                                (-10.0, -3.0, 0.5, 0.0), (60.0, 20.0, 10.0, 5.0)):
                M, n = 50.0, 0.3
                a3 = [x, y, z, t, V, Dx, Dy, Dz, R, Mu, M, n, d0]
                a2 = [x, y, t, V, Dx, Dy, R, Mu, M, n]
                a1 = [x, t, V, Dx, R, Mu, M, n]
                for fn, a, lst, names in (
                        (puff3, a3, c3, "x y z t V Dx Dy Dz R Mu mass porosity depth0"),
                        (puff2, a2, c2, "x y t V Dx Dy R Mu mass porosity"),
                        (puff1, a1, c1, "x t V Dx R Mu mass porosity")):
                    v, dprec = two_precisions(fn, a)
                    if v < TINY_KEEP:
                        continue
                    row = {k: fnum(val) for k, val in zip(names.split(), a)}
                    row.update({"label": "%s R=%g Mu=%g t=%g x=%g" % (fn.__name__, R, Mu, t, x),
                                "value": dstr(v), "cond": dstr(condition(fn, a, range(len(a)))),
                                "precision_check": mp.nstr(dprec, 3)})
                    lst.append(row)
    doc["puff3d"], doc["puff2d"], doc["puff1d"] = c3, c2, c1
    write("analytic_puff.json", doc)
    print("puff", len(c3), len(c2), len(c1), file=sys.stderr)


if __name__ == "__main__":
    mp.mp.dps = DPS
    what = sys.argv[1] if len(sys.argv) > 1 else "all"
    if what in ("erfcx", "all"):
        gen_erfcx()
    if what in ("1d", "all"):
        gen_1d()
    if what in ("puff", "all"):
        gen_puff()
    if what in ("3d", "all"):
        gen_3d()
    if what in ("1dhist", "all"):
        gen_1d_history()
    if what in ("3dx", "all"):
        gen_3d_extremes()
