#!/usr/bin/python3
"""Times numpy and scikit-learn doing what `hdrisk check` does for one invented scenario.

Run with Debian's interpreter and packages:  /usr/bin/python3 bench_check.py
Scenario (invented): n = 1000 unknowns, m = 500 measurements, orthogonal rows (F F^T = I),
Bernoulli-Gauss signal of density 0.1 and unit variance, noise variance 0.01, LASSO with
l1 = 0.05, 3 trials. Each trial draws Haar factors by numpy's QR with the sign fix of Mezzadri
(2007) (the thin factor of V only, which is all F needs), forms F = U V_m^T, draws x0 and the
noise, and solves with scikit-learn's Lasso at tol = 1e-8 (duality gap <= 1e-8 ||y||^2, the rule
of engine/simulate's coordinate descent). It writes bench_check.json beside itself with the
median wall and processor times of the whole check over several repetitions; BenchmarkCheckN1000 in
engine/simulate times the same check (fast factors) for the ratio.
"""
import json
import os
import time

import numpy as np
import sklearn
from sklearn.linear_model import Lasso

HERE = os.path.dirname(os.path.abspath(__file__))
N, ALPHA, DENSITY, NOISE, L1, TRIALS, REPEATS = 1000, 0.5, 0.1, 0.01, 0.05, 3, 5


def haar_columns(rng, n, k):
    q, r = np.linalg.qr(rng.standard_normal((n, k)))
    return q * np.sign(np.diag(r))


def check(seed):
    m = int(round(ALPHA * N))
    errs = []
    for t in range(TRIALS):
        rng = np.random.default_rng([seed, t])
        x0 = np.where(rng.random(N) < DENSITY, rng.standard_normal(N), 0.0)
        u = haar_columns(rng, m, m)
        v = haar_columns(rng, N, m)
        F = np.asfortranarray(u @ v.T)
        y = F @ x0 + np.sqrt(NOISE) * rng.standard_normal(m)
        model = Lasso(alpha=L1 / m, fit_intercept=False, tol=1e-8, max_iter=100000)
        model.fit(F, y)
        errs.append(np.mean((model.coef_ - x0) ** 2))
    return float(np.mean(errs))


def main():
    times, cpu, mses = [], [], []
    for rep in range(REPEATS):
        t0, c0 = time.perf_counter(), time.process_time()
        mses.append(check(rep))
        times.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    out = {
        "source": "numpy %s, scikit-learn %s (Debian packages); made by bench_check.py"
                  % (np.__version__, sklearn.__version__),
        "n": N, "alpha": ALPHA, "density": DENSITY, "noise": NOISE, "l1": L1, "trials": TRIALS,
        "seconds_median": float(np.median(times)), "seconds_all": times,
        "cpu_seconds_median": float(np.median(cpu)),
        "mean_mse": mses,
    }
    with open(os.path.join(HERE, "bench_check.json"), "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")
    print("numpy + scikit-learn check, %d trials at n = %d: median %.3f s (all %s; cpu %.3f s), mean MSE %s"
          % (TRIALS, N, out["seconds_median"], ["%.3f" % t for t in times], out["cpu_seconds_median"],
             ["%.5f" % e for e in mses]))


main()
