#!/usr/bin/python3
"""Reference values for decay chains (package analytic), computed with mpmath.

Run by hand with the Debian interpreter (python3-mpmath):

    /usr/bin/python3 testdata/reference/gen_chain.py

and commit the file it writes beside itself, chain_reference.json.  The Go
tests (analytic/chain_reference_test.go) read it; CI never regenerates it.

The chains are TEST DATA: invented numbers shaped like a chlorinated-ethene
sequence (PCE -> TCE -> cis-DCE -> VC), with yields equal to ratios of
molar masses (PCE 165.83, TCE 131.39, cis-DCE 96.94, VC 62.50 g/mol, from
memory) and half-lives chosen so that linked rates differ by at least 10 %,
except in the cases named "repeated" and "near", which test the
repeated-rate limit.

What is computed, independently of the Go code:

  1D column ("column" cases).  The coupled equations of shared/DESIGN.md
  section 3b, written straight from the physical parameters (mu = ln 2 /
  half-life, the decay convention "total" or "dissolved"):

      R_i dC_i/dt = D C_i'' - V C_i' - a_i C_i + sum_p y_p a_p C_p,
      a_i = mu_i R_i ("total") or mu_i ("dissolved"),

  are Laplace-transformed in time to  D c'' - V c' - S c = 0  with the
  matrix S(s) = diag(R_i s + a_i) - B (B_dp = y_p a_p), whose bounded
  solution is c = expm(Lambda x) b, Lambda = (V I - sqrtm(V^2 I + 4 D S))/(2D)
  (mpmath.sqrtm, mpmath.expm: general matrix functions, no eigenvalues or
  divided differences, so equal and nearly equal rates need no special
  care).  b = c0 hbar(s) for a concentration inlet; for a flux inlet
  V b - D Lambda b = V c0 hbar(s), i.e. b = 2V (V I + sqrtm(...))^-1 c0 hbar.
  hbar = 1/s (constant source) or 1/(s + g) (depleting); a finite duration
  is the difference of two continuous sources.  Times are inverted with
  mpmath.invertlaplace by Talbot's method at 34 digits and, as an
  independent check on the first case of each kind (and every case with a
  source history or a higher Peclet number), by de Hoog's method; the
  steady state is the limit s c(s) at s = 0, a closed matrix expression.
  A checked value records the agreement of the two inversions
  (check_talbot_dehoog; required <= 1e-20 relative, or 1e-30 absolute for
  values below 1e-10).  For equal
  retardation and distinct rates a third, fully independent value is
  computed: the Sun-Petersen-Clement form, the Bateman-weighted sum of
  Ogata-Banks closed forms (first-type: Ogata & Banks 1961; flux inlet:
  van Genuchten & Alves 1982) evaluated with mpmath.erfc
  (check_closed_form).

  3D exact ("exact3d" cases, equal retardation).  The age integral
      C_i = int_0^t w(tau) [expm(-K tau) c0]_i dtau,
  w the kernel of the exact finite-source solution (Wexler 1992, USGS TWRI
  3-B7; water table as an image plane), K the decay matrix in retarded form
  (K_ii = a_i/R, K_dp = -y_p a_p/R); mpmath.quad (tanh-sinh) with
  breakpoints around the travel time, at 30 digits, and, for the first
  time of each case, again with Gauss-Legendre on the same subintervals
  (check_quadrature).

  Domenico ("domenico" cases).  The decoupled form applied to the Domenico
  (1987) approximation: lateral factors times the sum over decay paths of
  (-1)^m prod(y mu) L[k_j..k_i], divided differences in the rate of the
  longitudinal factor L(k) = 1/2 exp(a1) erfc(b1), taken at 50 digits by
  the Lagrange form for distinct rates and by mpmath.diff (exact
  derivatives of the closed form at high precision) for equal rates.

Values are written as decimal strings with 25 significant digits.
"""

import json
import math
import os

import mpmath as mp

HERE = os.path.dirname(os.path.abspath(__file__))
SIG = 25
INF = float('inf')

MOLAR = {'PCE': 165.83, 'TCE': 131.39, 'DCE': 96.94, 'VC': 62.50}
Y1 = MOLAR['TCE'] / MOLAR['PCE']
Y2 = MOLAR['DCE'] / MOLAR['TCE']
Y3 = MOLAR['VC'] / MOLAR['DCE']


def dstr(v):
    return mp.nstr(v, SIG, min_fixed=1, max_fixed=0, strip_zeros=False)


def fnum(v):
    v = float(v)
    if math.isinf(v):
        return "+Inf"
    return v


def chain4(hl, r, conv, yields=(Y1, Y2, Y3)):
    """A serial 4-compound chain (test data)."""
    out = []
    for i in range(4):
        out.append({'half_life': hl[i], 'R': r[i], 'convention': conv,
                    'daughter': i + 1 if i < 3 else -1,
                    'yield': yields[i] if i < 3 else 0.0})
    return out


def tree5(hl, r, conv):
    """Two parents into one daughter, then a grand-daughter, plus an
    unlinked compound (test data)."""
    d = [2, 2, 3, -1, -1]
    y = [0.7, 0.5, 0.6, 0.0, 0.0]
    return [{'half_life': hl[i], 'R': r[i], 'convention': conv,
             'daughter': d[i], 'yield': y[i]} for i in range(5)]


def mu_of(c):
    if c['half_life'] is None:
        return mp.mpf(0)
    return mp.log(2) / mp.mpf(c['half_life'])


def a_of(c):
    mu = mu_of(c)
    return mu * c['R'] if c['convention'] == 'total' else mu


def smatrix(chain, s):
    n = len(chain)
    S = mp.matrix(n, n)
    for i, c in enumerate(chain):
        S[i, i] = mp.mpf(c['R']) * s + a_of(c)
    for p, c in enumerate(chain):
        d = c['daughter']
        if d >= 0:
            S[d, p] -= mp.mpf(c['yield']) * a_of(c)
    return S


def column_transform(chain, c0, v, D, x, inlet, s):
    """G(S(s)) c0 (without the history factor)."""
    n = len(chain)
    v, D, x = mp.mpf(v), mp.mpf(D), mp.mpf(x)
    S = smatrix(chain, s)
    M = v * v * mp.eye(n) + 4 * D * S
    sq = mp.sqrtm(M)
    lam = (v * mp.eye(n) - sq) / (2 * D)
    E = mp.expm(lam * x)
    b = mp.matrix([mp.mpf(c) for c in c0])
    if inlet == 'flux':
        b = mp.lu_solve(v * mp.eye(n) + sq, 2 * v * b)
    return E * b


def column_value(case, t, method):
    chain, c0 = case['chain'], case['c0']
    v, D, x, inlet = case['v'], case['D'], case['x'], case['inlet']
    g = mp.mpf(case.get('depletion', 0))
    dur = case.get('duration')
    n = len(chain)
    if t == INF:
        if g > 0 or dur is not None:
            return [mp.mpf(0)] * n
        vec = column_transform(chain, c0, v, D, x, inlet, mp.mpf(0))
        return [vec[i] for i in range(n)]
    cache = {}

    def comp(i):
        def f(s):
            key = (s.real, s.imag) if isinstance(s, mp.mpc) else (s, 0)
            if key not in cache:
                cache[key] = column_transform(chain, c0, v, D, x, inlet, s) / (s + g)
            return cache[key][i]
        return f

    def one(tt):
        cache.clear()
        return [mp.invertlaplace(comp(i), tt, method=method) for i in range(n)]

    vals = one(mp.mpf(t))
    if dur is not None and t > dur:
        late = one(mp.mpf(t) - mp.mpf(dur))
        f = mp.exp(-g * mp.mpf(dur))
        vals = [vals[i] - f * late[i] for i in range(n)]
    return vals


def ogata_banks(x, t, D, R, v, k, inlet):
    """Single-compound column with decay rate k (retarded form), constant
    source, at high precision (first-type: Ogata & Banks 1961 with decay;
    flux: van Genuchten & Alves 1982)."""
    x, t, D, R, v, k = [mp.mpf(q) for q in (x, t, D, R, v, k)]
    w = mp.sqrt(v * v + 4 * D * R * k)
    if t == mp.inf:
        base = mp.exp((v - w) * x / (2 * D))
        return base if inlet == 'conc' else 2 * v / (v + w) * base
    s = 2 * mp.sqrt(D * R * t)
    b1 = (R * x - w * t) / s
    b2 = (R * x + w * t) / s
    if inlet == 'conc':
        return (mp.exp((v - w) * x / (2 * D)) * mp.erfc(b1) + mp.exp((v + w) * x / (2 * D)) * mp.erfc(b2)) / 2
    b3 = (R * x + v * t) / s
    if k == 0:
        return (mp.erfc(b1) / 2 + mp.sqrt(v * v * t / (mp.pi * D * R)) * mp.exp(-(R * x - v * t) ** 2 / (4 * D * R * t))
                - (1 + v * x / D + v * v * t / (D * R)) * mp.exp(v * x / D) * mp.erfc(b3) / 2)
    return (v / (v + w) * mp.exp((v - w) * x / (2 * D)) * mp.erfc(b1)
            + v / (v - w) * mp.exp((v + w) * x / (2 * D)) * mp.erfc(b2)
            + v * v / (2 * R * k * D) * mp.exp(v * x / D - k * t) * mp.erfc(b3))


def spc_closed_form(case, t):
    """Equal R, distinct rates, constant source: sum over decay paths of
    c0_j prod(y k) sum_l F(k_l)/prod_{r != l}(k_r - k_l)."""
    chain, c0 = case['chain'], case['c0']
    R = chain[0]['R']
    n = len(chain)
    k = [a_of(c) / R for c in chain]
    out = []
    for i in range(n):
        tot = mp.mpf(0)
        for j in range(n):
            if c0[j] == 0:
                continue
            path = [j]
            while path[-1] != i and chain[path[-1]]['daughter'] >= 0:
                path.append(chain[path[-1]]['daughter'])
            if path[-1] != i:
                continue
            w = mp.mpf(c0[j])
            for q in path[:-1]:
                w *= mp.mpf(chain[q]['yield']) * k[q]
            for l in path:
                den = mp.mpf(1)
                for r in path:
                    if r != l:
                        den *= k[r] - k[l]
                tot += w * ogata_banks(case['x'], t, case['D'], R, case['v'], k[l], case['inlet']) / den
        out.append(tot)
    return out


def column_cases():
    hl = [600.0, 900.0, 400.0, 1000.0]
    cases = []
    base = {'v': 0.2, 'D': 2.0}
    eqR = [2.0, 2.0, 2.0, 2.0]
    diR = [3.6, 2.2, 1.6, 1.2]
    for name, chain, c0 in [
        ('equalR_total', chain4(hl, eqR, 'total'), [1.0, 0.0, 0.0, 0.0]),
        ('distinctR_total', chain4(hl, diR, 'total'), [1.0, 0.0, 0.0, 0.0]),
        ('distinctR_dissolved', chain4(hl, diR, 'dissolved'), [1.0, 0.3, 0.0, 0.1]),
        ('equalR_repeated', chain4([600.0, 600.0, 400.0, 400.0], eqR, 'total'), [1.0, 0.0, 0.0, 0.0]),
        ('equalR_allequal', chain4([600.0] * 4, eqR, 'total'), [1.0, 0.0, 0.0, 0.0]),
        ('equalR_near', chain4([600.0, 600.6, 400.0, 399.8], eqR, 'total'), [1.0, 0.0, 0.0, 0.0]),
        ('distinctR_repeated', chain4([600.0, 600.0, 400.0, 400.0], diR, 'total'), [1.0, 0.0, 0.0, 0.0]),
        ('tree_equalR', tree5([500.0, 800.0, 300.0, 700.0, 200.0], [1.8] * 5, 'total'), [1.0, 0.5, 0.0, 0.0, 0.4]),
        ('tree_distinctR', tree5([500.0, 800.0, 300.0, 700.0, 200.0], [2.5, 1.9, 1.4, 1.1, 3.0], 'dissolved'), [1.0, 0.5, 0.0, 0.0, 0.4]),
    ]:
        for inlet in ('conc', 'flux'):
            for x in (30.0, 150.0):
                rs = [c['R'] for c in chain]
                tr = lambda r: r * x / base['v']
                times = [0.4 * tr(min(rs)), tr(sum(rs) / len(rs)), 4 * tr(max(rs)), INF]
                case = dict(base, name=name, chain=chain, c0=c0, inlet=inlet, x=x, times=times)
                cases.append(case)
    # Source histories and a higher Peclet number (test data).
    ch = chain4(hl, diR, 'total')
    cases.append(dict(base, name='distinctR_depleting', chain=ch, c0=[1.0, 0, 0, 0], inlet='conc', x=80.0,
                      depletion=1e-3, times=[600.0, 2000.0, 6000.0, INF]))
    cases.append(dict(base, name='distinctR_duration', chain=ch, c0=[1.0, 0, 0, 0], inlet='flux', x=80.0,
                      duration=1500.0, times=[600.0, 2000.0, 6000.0, INF]))
    cases.append(dict(name='distinctR_peclet150', v=0.2, D=0.2, chain=ch, c0=[1.0, 0, 0, 0], inlet='conc', x=150.0,
                      times=[1.3 * 150 / 0.2, 2.0 * 150 / 0.2, 3.0 * 150 / 0.2, INF]))
    return cases


def rel(a, b):
    if a == b:
        return mp.mpf(0)
    return abs(a - b) / max(abs(a), abs(b))


def run_columns():
    out = []
    seen = set()
    for case in column_cases():
        check = case['name'] not in seen or 'depletion' in case or 'duration' in case or 'peclet' in case['name']
        seen.add(case['name'])
        n = len(case['chain'])
        equal_r = len(set(c['R'] for c in case['chain'])) == 1
        ks = [a_of(c) / c['R'] for c in case['chain']]
        distinct = all(abs(ks[a] - ks[b]) > mp.mpf('1e-6') * ks[a] for a in range(n) for b in range(a))
        closed_ok = equal_r and distinct and 'depletion' not in case and 'duration' not in case
        rows = []
        for t in case['times']:
            if t == INF:
                vals = column_value(case, t, 'talbot')
                chk = mp.mpf(0)
            else:
                mp.mp.dps = 34
                vals = column_value(case, t, 'talbot')
                chk = None
                if check:
                    other = column_value(case, t, 'dehoog')
                    chk = max((rel(vals[i], other[i]) if abs(vals[i]) > mp.mpf('1e-10') else abs(vals[i] - other[i]))
                              for i in range(n))
                    if chk > mp.mpf('1e-20'):
                        raise SystemExit('%s t=%s: Talbot and de Hoog differ by %s' % (case['name'], t, chk))
            row = {'time': fnum(t), 'values': [dstr(v) for v in vals]}
            if chk is not None:
                row['check_talbot_dehoog'] = mp.nstr(chk, 3)
            if closed_ok:
                cf = spc_closed_form(case, mp.inf if t == INF else t)
                cchk = max(rel(vals[i], cf[i]) for i in range(n) if abs(cf[i]) > mp.mpf('1e-30'))
                if cchk > mp.mpf('1e-20'):
                    raise SystemExit('%s t=%s: closed form differs by %s' % (case['name'], t, cchk))
                row['check_closed_form'] = mp.nstr(cchk, 3)
            rows.append(row)
            print(case['name'], case['inlet'], case['x'], t, [mp.nstr(v, 8) for v in vals], flush=True)
        out.append(case_json(case, rows))
    return out


def case_json(case, rows):
    d = {k: case[k] for k in ('name', 'v', 'D', 'x', 'c0') if k in case}
    for k in ('inlet', 'depletion', 'duration', 'y', 'top', 'bottom', 'width', 'depth', 'Dy', 'Dz'):
        if k in case:
            d[k] = case[k]
    d['chain'] = case['chain']
    d['rows'] = rows
    return d


# --- 3D exact, equal retardation -------------------------------------------

def kmatrix(chain):
    n = len(chain)
    K = mp.matrix(n, n)
    for i, c in enumerate(chain):
        K[i, i] = a_of(c) / c['R']
    for p, c in enumerate(chain):
        d = c['daughter']
        if d >= 0:
            K[d, p] -= mp.mpf(c['yield']) * a_of(c) / chain[d]['R']
    return K


def strip(d, h, c):
    return (mp.erf((d + h) * c) - mp.erf((d - h) * c)) / 2


def exact3d_values(case, t, quad):
    chain, c0 = case['chain'], case['c0']
    n = len(chain)
    R = mp.mpf(chain[0]['R'])
    v, Dx, Dy, Dz = [mp.mpf(case[k]) for k in ('v', 'D', 'Dy', 'Dz')]
    x, y, z = mp.mpf(case['x']), mp.mpf(case['y']), mp.mpf(case['top'])
    W, Z = mp.mpf(case['width']), mp.mpf(case['depth'])
    dp, vp = Dx / R, v / R
    K = kmatrix(chain)
    b0 = mp.matrix([mp.mpf(c) for c in c0])

    def kernel(tau):
        k = x / (2 * mp.sqrt(mp.pi * dp * tau ** 3)) * mp.exp(-(x - vp * tau) ** 2 / (4 * dp * tau))
        k *= strip(y, W / 2, 1 / (2 * mp.sqrt(Dy * tau / R)))
        k *= strip(z, Z, 1 / (2 * mp.sqrt(Dz * tau / R)))
        return k

    cache = {}

    def bateman(tau):
        if tau not in cache:
            cache[tau] = mp.expm(-K * tau) * b0
        return cache[tau]

    def comp(i):
        def f(tau):
            if tau == 0:
                return mp.mpf(0)
            return kernel(tau) * bateman(tau)[i]
        return f

    tadv = x / vp
    upper = mp.mpf(t) if t != INF else mp.inf
    pts = [mp.mpf(0)]
    for fct in (0.25, 0.5, 0.8, 1.0, 1.25, 2.0, 4.0, 10.0):
        if fct * tadv < upper:
            pts.append(fct * tadv)
    pts.append(upper)
    return [mp.quad(comp(i), pts, method=quad) for i in range(n)]


def run_exact3d():
    out = []
    base = {'v': 0.2, 'D': 2.0, 'Dy': 0.2, 'Dz': 0.02, 'width': 20.0, 'depth': 4.0}
    eqR = [1.8] * 4
    for name, chain in [('exact3d_distinct', chain4([600.0, 900.0, 400.0, 1000.0], eqR, 'total')),
                        ('exact3d_repeated', chain4([600.0, 600.0, 600.0, 400.0], eqR, 'total')),
                        ('exact3d_dissolved', chain4([600.0, 900.0, 400.0, 1000.0], eqR, 'dissolved'))]:
        for (x, y, z) in ((40.0, 3.0, 1.0), (150.0, 8.0, 2.5)):
            times = [1500.0, 5000.0] + ([INF] if x == 40.0 else [])
            case = dict(base, name=name, chain=chain, c0=[1.0, 0.0, 0.0, 0.0], x=x, y=y, top=z, bottom=z, times=times)
            rows = []
            mp.mp.dps = 30
            for t in times:
                a = exact3d_values(case, t, 'tanh-sinh')
                row = {'time': fnum(t), 'values': [dstr(q) for q in a]}
                if t == times[0]:
                    b = exact3d_values(case, t, 'gauss-legendre')
                    chk = max(rel(a[i], b[i]) for i in range(4))
                    if chk > mp.mpf('1e-18'):
                        raise SystemExit('%s: quadratures differ by %s' % (name, chk))
                    row['check_quadrature'] = mp.nstr(chk, 3)
                rows.append(row)
                print(name, x, t, [mp.nstr(q, 8) for q in a], flush=True)
            out.append(case_json(case, rows))
    return out


# --- Domenico for chains -----------------------------------------------------

def domenico_long(k, x, t, D, R, v):
    w = mp.sqrt(v * v + 4 * D * R * k)
    a1 = (v - w) * x / (2 * D)
    if t == mp.inf:
        return mp.exp(a1)
    return mp.exp(a1) * mp.erfc((R * x - w * t) / (2 * mp.sqrt(D * R * t))) / 2


def divdiff(f, pts):
    """Divided difference over pts (equal points allowed) by Hermite's
    formula: sum over distinct values of the residues of f/prod(z - p),
    the derivatives taken with mpmath.diff."""
    vals = {}
    for p in pts:
        vals[p] = vals.get(p, 0) + 1
    tot = mp.mpf(0)
    keys = list(vals)
    for kk in keys:
        m = vals[kk]
        others = [(q, vals[q]) for q in keys if q != kk]

        def g(z, others=others):
            r = f(z)
            for q, mq in others:
                r /= (z - q) ** mq
            return r
        tot += mp.diff(g, kk, m - 1) / mp.factorial(m - 1)
    return tot


def run_domenico():
    out = []
    base = {'v': 0.2, 'D': 2.0, 'Dy': 0.2, 'Dz': 0.02, 'width': 20.0, 'depth': 4.0}
    mp.mp.dps = 50
    for name, hl in [('domenico_distinct', [600.0, 900.0, 400.0, 1000.0]),
                     ('domenico_repeated', [600.0, 600.0, 600.0, 400.0])]:
        chain = chain4(hl, [1.8] * 4, 'total')
        R = mp.mpf(1.8)
        ks = [mu_of(c) for c in chain]
        for (x, y, z) in ((40.0, 3.0, 1.0), (150.0, 8.0, 2.5)):
            case = dict(base, name=name, chain=chain, c0=[1.0, 0.0, 0.0, 0.0], x=x, y=y, top=z, bottom=z,
                        times=[1500.0, 5000.0, INF])
            X, Y, Zr = mp.mpf(x), mp.mpf(y), mp.mpf(z)
            v, D = mp.mpf(base['v']), mp.mpf(base['D'])
            lat = strip(Y, mp.mpf(base['width']) / 2, 1 / (2 * mp.sqrt(mp.mpf(base['Dy']) / v * X)))
            lat *= strip(Zr, mp.mpf(base['depth']), 1 / (2 * mp.sqrt(mp.mpf(base['Dz']) / v * X)))
            rows = []
            for t in case['times']:
                T = mp.inf if t == INF else mp.mpf(t)
                vals = []
                for i in range(4):
                    path = list(range(0, i + 1))
                    w = mp.mpf(1)
                    for q in path[:-1]:
                        w *= mp.mpf(chain[q]['yield']) * ks[q]
                    dd = divdiff(lambda k: domenico_long(k, X, T, D, R, v), [ks[q] for q in path])
                    vals.append(lat * w * (-1) ** (len(path) - 1) * dd)
                rows.append({'time': fnum(t), 'values': [dstr(q) for q in vals]})
                print(name, x, t, [mp.nstr(q, 8) for q in vals], flush=True)
            out.append(case_json(case, rows))
    return out


def main():
    doc = {
        'source': 'testdata/reference/gen_chain.py (mpmath %s); test data, see the doc string' % mp.__version__,
        'column': run_columns(),
        'exact3d': run_exact3d(),
        'domenico': run_domenico(),
    }
    with open(os.path.join(HERE, 'chain_reference.json'), 'w') as f:
        json.dump(doc, f, indent=1)
        f.write('\n')


if __name__ == '__main__':
    main()
