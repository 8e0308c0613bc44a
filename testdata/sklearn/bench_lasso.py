#!/usr/bin/python3
"""Times scikit-learn's Lasso on a 500 x 1000 instance that engine/simulate rebuilds bit for bit.

Run with Debian's interpreter and package python3-sklearn:  /usr/bin/python3 bench_lasso.py
It writes bench_lasso.json beside itself: the instance's seed and sizes, y, the penalty in both
scalings, scikit-learn's median time over several fits and its solution. The design is invented
for the benchmark: entries (2u - 1) sqrt(3/m) with u uniform from the splitmix64 generator
(Steele, Lea & Flood 2014), so the Go side builds the same matrix exactly without Python
(every step is exact or correctly rounded in IEEE arithmetic). The stopping rule is the same on
both sides: duality gap <= tol ||y||^2.
"""
import json
import os
import time

import numpy as np
import sklearn
from sklearn.linear_model import Lasso

HERE = os.path.dirname(os.path.abspath(__file__))
M, N, SEED, TOL = 500, 1000, 20260101, 1e-8


def splitmix64(seed, count):
    with np.errstate(over="ignore"):
        s = np.uint64(seed) + np.arange(1, count + 1, dtype=np.uint64) * np.uint64(0x9E3779B97F4A7C15)
        z = (s ^ (s >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
        z = (z ^ (z >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
        return z ^ (z >> np.uint64(31))


def design(m, n, seed):
    u = (splitmix64(seed, m * n) >> np.uint64(11)).astype(np.float64) * 2.0 ** -53
    return ((2 * u - 1) * np.sqrt(3.0 / m)).reshape((n, m)).T  # column-major fill


def main():
    X = np.asfortranarray(design(M, N, SEED))
    rng = np.random.default_rng(SEED)
    x0 = np.zeros(N)
    x0[rng.choice(N, 100, replace=False)] = rng.standard_normal(100)
    y = X @ x0 + 0.1 * rng.standard_normal(M)
    l1 = 0.05 * np.abs(X.T @ y).max()
    alpha = l1 / M
    times = []
    for _ in range(7):
        model = Lasso(alpha=alpha, fit_intercept=False, tol=TOL, max_iter=100000)
        t0 = time.perf_counter()
        model.fit(X, y)
        times.append(time.perf_counter() - t0)
    w = model.coef_
    out = {
        "source": "scikit-learn %s (Debian python3-sklearn), numpy %s; made by bench_lasso.py"
                  % (sklearn.__version__, np.__version__),
        "rows": M, "cols": N, "seed": SEED, "tol": TOL,
        "l1": float(l1), "alpha": float(alpha),
        "y": [float(v) for v in y],
        "sklearn_seconds": float(np.median(times)),
        "sklearn_n_iter": int(model.n_iter_),
        "nonzero": int((w != 0).sum()),
        "coef": [float(v) for v in w],
    }
    with open(os.path.join(HERE, "bench_lasso.json"), "w") as fh:
        json.dump(out, fh, separators=(",", ":"))
        fh.write("\n")
    print("sklearn Lasso %dx%d: median %.4f s over %d fits, %d iterations, %d nonzero"
          % (M, N, out["sklearn_seconds"], len(times), out["sklearn_n_iter"], out["nonzero"]))


main()
