#!/usr/bin/python3
"""Reference values of the breakthrough rate d(C/C0)/dt of the exact 3D
planar-source solution (package analytic, Exact3DRate), computed with
mpmath at 40 digits straight from the integrand of the time integral
(Wexler 1992, USGS TWRI 3-B7, with the water table as a no-flux boundary):

    x/(2 sqrt(pi D' t^3)) exp(-Mu t - (x - v' t)^2/(4 D' t)) Fy Fz,
    Fy = (erf((y + W/2) cy) - erf((y - W/2) cy))/2,  cy = 1/(2 sqrt(Dy t/R)),
    Fz = (erf((z + Z) cz) - erf((z - Z) cz))/2,      cz = 1/(2 sqrt(Dz t/R)),

Fz averaged over a well screen [z1, z2] by mpmath.quad. D' = Dx/R,
v' = V/R. The parameters are test data (invented). Run by hand:

    /usr/bin/python3 testdata/reference/gen_rate.py

and commit exact3d_rate.json beside it; CI never regenerates it.
"""
import json
import os
from mpmath import mp, mpf, sqrt, exp, erf, pi, quad

mp.dps = 40
HERE = os.path.dirname(os.path.abspath(__file__))


def strip(d, h, c):
    return (erf((d + h) * c) - erf((d - h) * c)) / 2


def rate(case):
    x, y, z1, z2 = (mpf(case[k]) for k in ('x', 'y', 'top', 'bottom'))
    t, V, Dx, Dy, Dz, R, Mu = (mpf(case[k]) for k in ('t', 'V', 'Dx', 'Dy', 'Dz', 'R', 'Mu'))
    W, Z = case['width'], case['depth']
    dp, vp = Dx / R, V / R
    f = x / (2 * sqrt(pi * dp * t**3)) * exp(-Mu * t - (x - vp * t)**2 / (4 * dp * t))
    if W is not None:
        f *= strip(abs(y), mpf(W) / 2, 1 / (2 * sqrt(Dy * t / R)))
    if Z is not None:
        cz = 1 / (2 * sqrt(Dz * t / R))
        if z2 > z1:
            f *= quad(lambda z: strip(z, mpf(Z), cz), [z1, z2]) / (z2 - z1)
        else:
            f *= strip(z1, mpf(Z), cz)
    return f


def main():
    base = dict(V=0.2, Dx=2.0, Dy=0.2, Dz=0.02, R=1.8, Mu=0.001, width=20.0, depth=4.0, y=3.0, top=1.0, bottom=1.0)
    cases = []
    for x, t in [(40.0, 100.0), (40.0, 400.0), (40.0, 3000.0), (150.0, 300.0), (150.0, 1400.0), (600.0, 2000.0)]:
        cases.append(dict(base, x=x, t=t))
    cases.append(dict(base, x=80.0, t=900.0, top=2.0, bottom=9.0))       # well screen below the source bottom
    cases.append(dict(base, x=80.0, t=900.0, y=30.0))                    # beside the source
    cases.append(dict(base, x=50.0, t=250.0, width=None, depth=None))    # 1D column pulse response
    cases.append(dict(base, x=10.0, t=2.0, Mu=0.0))                      # early time, far in the tail
    for c in cases:
        c['rate'] = mp.nstr(rate(c), 25)
    import mpmath
    doc = {'source': 'testdata/reference/gen_rate.py (mpmath %s, 40 digits); test data' % mpmath.__version__, 'cases': cases}
    with open(os.path.join(HERE, 'exact3d_rate.json'), 'w') as f:
        json.dump(doc, f, indent=1)


if __name__ == '__main__':
    main()
