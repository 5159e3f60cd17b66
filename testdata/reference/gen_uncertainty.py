#!/usr/bin/python3
"""Reference values for the uncertainty tests (plume/sampling_test.go,
plume/uncertain_test.go), from scipy.stats (Debian python3-scipy).

Run with /usr/bin/python3 testdata/reference/gen_uncertainty.py; writes
testdata/reference/uncertainty_reference.json. CI reads the committed file.
"""
import json, math, os
import scipy
from scipy import stats

probs = [0.05, 0.25, 0.5, 0.75, 0.95]
z95 = stats.norm.ppf(0.95)

def lognormal(p05, p95):
    mu = 0.5 * (math.log(p05) + math.log(p95))
    sigma = (math.log(p95) - math.log(p05)) / (2 * z95)
    return stats.lognorm(s=sigma, scale=math.exp(mu))

cases = [
    ("lognormal", {"distribution": "lognormal", "p05": 2, "p95": 40}, lognormal(2, 40)),
    ("uniform", {"distribution": "uniform", "min": 1, "max": 3}, stats.uniform(loc=1, scale=2)),
    ("loguniform", {"distribution": "loguniform", "min": 0.1, "max": 10}, stats.loguniform(0.1, 10)),
    ("triangular", {"distribution": "triangular", "min": 1, "mode": 2, "max": 5},
     stats.triang(c=(2 - 1) / (5 - 1), loc=1, scale=4)),
]
out = {"source": "scipy.stats %s (ppf, mean, std)" % scipy.__version__, "distributions": []}
for name, spec, d in cases:
    out["distributions"].append({
        "name": name, "spec": spec,
        "probabilities": probs,
        "quantiles": [float(d.ppf(p)) for p in probs],
        "mean": float(d.mean()), "std": float(d.std()),
    })
# Clopper-Pearson 95 % intervals: beta.ppf(0.025, k, n-k+1), beta.ppf(0.975, k+1, n-k).
cp = []
for k, n in [(0, 1000), (1, 1000), (37, 1000), (500, 1000), (999, 1000), (1000, 1000), (3, 20)]:
    lo = 0.0 if k == 0 else float(stats.beta.ppf(0.025, k, n - k + 1))
    hi = 1.0 if k == n else float(stats.beta.ppf(0.975, k + 1, n - k))
    cp.append({"k": k, "n": n, "lo": lo, "hi": hi})
out["clopper_pearson_95"] = cp
# Student t 97.5 % quantiles used by the regression and calibration intervals.
out["student_t_975"] = [{"df": df, "q": float(stats.t.ppf(0.975, df))} for df in (1, 2, 5, 27)]
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "uncertainty_reference.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
print("wrote", path)
