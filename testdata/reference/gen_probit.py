#!/usr/bin/python3
"""Reference values of the inverse complementary error function
erfcinv(y), the probit variable of the first-exceedance search (package
plume, probit), computed with mpmath at 40 digits by root finding on
ln erfc(w) = ln y (erfc(w) = 2 - y above y = 1). Run by hand:

    /usr/bin/python3 testdata/reference/gen_probit.py

and commit probit.json beside it; CI never regenerates it.
"""
import json
import os
from mpmath import mp, mpf, erfc, log, findroot, sqrt

mp.dps = 40
HERE = os.path.dirname(os.path.abspath(__file__))

YS = ["2.2250738585072014e-308", "1e-300", "1e-100", "1e-30", "1e-12", "1e-6", "9.99e-4", "1e-3",
      "0.01", "0.3", "0.5", "1", "1.2", "1.5", "1.99", "1.9999999"]


def erfcinv(y):
    if y > 1:
        return -erfcinv(2 - y)
    if y == 1:
        return mpf(0)
    start = sqrt(-log(y)) if y < mpf("0.1") else mpf("0.5")
    return findroot(lambda w: log(erfc(w)) - log(y), start)


# y is the float64 nearest each decimal, taken exactly; the first is the
# smallest normal float64.
cases = [{"y": repr(float(s)), "w": mp.nstr(erfcinv(mpf(float(s))), 30)} for s in YS]
with open(os.path.join(HERE, "probit.json"), "w") as f:
    json.dump({"source": "mpmath, 40 digits, gen_probit.py", "cases": cases}, f, indent=1)
    f.write("\n")
