#!/usr/bin/python3
"""Finite instances of generalized linear models fitted by scikit-learn, for the tests of
engine/fixedpoint (SolveGLM against scikit-learn on Gaussian and orthogonal designs).

Run with Debian's interpreter and package python3-sklearn:  /usr/bin/python3 glm_sklearn.py
It writes glm_sklearn.json beside itself: for each case the model (as the engine names it),
the sizes, the number of trials, and the mean and standard error over the trials of
(1/n)||xhat - x0||^2, of the cosine <xhat, x0>/(|xhat||x0|) and of |xhat|/|x0|.

Designs have rows of unit norm on average (the engine's "rows" scale): Gaussian entries
N(0, 1/n); orthogonal designs are sqrt(max(1, m/n)) times m orthonormal rows (m <= n) or n
orthonormal columns (m > n) of a Haar matrix (QR of a Gaussian matrix, signs fixed).

scikit-learn's parametrizations, and the engine problem each one is:
  LogisticRegression(penalty="l2", C, fit_intercept=False): (1/2)||w||^2 + C sum log(1+e^(-y x.w))
      -> logistic loss with ridge l2 = 1/C;
  LogisticRegression(penalty="l1", C, solver="liblinear", fit_intercept=False):
      ||w||_1 + C sum log(1 + e^(-y x.w))  -> logistic loss with l1 = 1/C;
  Lasso(alpha, fit_intercept=False): (1/(2m))||y - Xw||^2 + alpha ||w||_1  -> square loss with
      l1 = m alpha;
  HuberRegressor(epsilon, alpha, fit_intercept=False): sum_i (sigma + H_eps((y_i - x_i.w)/sigma)
      sigma) + alpha ||w||^2, jointly in sigma. At its fitted scale sigma_hat the conditions in w
      are those of (2/sigma_hat)[sum huber_width(y_i - x_i.w) + (alpha sigma_hat/2)||w||^2] with
      width = eps sigma_hat: the Huber loss of that width with ridge l2 = alpha sigma_hat. The
      fixture records the mean of sigma_hat over the trials, from which the test builds the
      engine's problem.
"""
import json
import os

import numpy as np
import sklearn
from sklearn.linear_model import HuberRegressor, Lasso, LogisticRegression

HERE = os.path.dirname(os.path.abspath(__file__))
N, TRIALS, SEED = 400, 10, 20261202


def design(rng, shape, m, n):
    if shape == "gaussian":
        return rng.standard_normal((m, n)) / np.sqrt(n)
    k = max(m, n)
    q, r = np.linalg.qr(rng.standard_normal((k, k)))
    q = q * np.sign(np.diag(r))
    f = q[:m, :n] if m <= n else q[:m, :n]
    return f * np.sqrt(max(1.0, m / n)) if m > n else f


def signal(rng, law, n):
    if law["law"] == "gauss":
        return np.sqrt(law["variance"]) * rng.standard_normal(n)
    x = np.sqrt(law["variance"]) * rng.standard_normal(n)
    return x * (rng.random(n) < law["density"])


def readout(rng, kind, z, noise):
    w = np.sqrt(noise) * rng.standard_normal(z.shape)
    if kind["kind"] == "logistic":
        return np.where(rng.random(z.shape) < 1 / (1 + np.exp(-z)), 1.0, -1.0)
    if kind["kind"] == "sign":
        return np.where(z + w < 0, -1.0, 1.0)
    if kind["kind"] == "quantize":
        k = 2 ** kind["bits"]
        d = 2 * kind["range"] / k
        i = np.clip(np.floor((z + w + kind["range"]) / d), 0, k - 1)
        return -kind["range"] + (i + 0.5) * d
    if kind["kind"] == "outliers":
        out = rng.random(z.shape) < kind["fraction"]
        return z + np.where(out, np.sqrt(kind["outlier_variance"]) * rng.standard_normal(z.shape), w)
    raise ValueError(kind)


def fit(case, x, y, m):
    e = case["estimator"]
    if e == "logistic-l2":
        return LogisticRegression(penalty="l2", C=1 / case["l2"], fit_intercept=False, tol=1e-10, max_iter=10000).fit(x, y).coef_.ravel(), None
    if e == "logistic-l1":
        return LogisticRegression(penalty="l1", C=1 / case["l1"], solver="liblinear", fit_intercept=False, tol=1e-10, max_iter=10000).fit(x, y).coef_.ravel(), None
    if e == "lasso":
        return Lasso(alpha=case["l1"] / m, fit_intercept=False, tol=1e-12, max_iter=100000).fit(x, y).coef_, None
    if e == "huber":
        h = HuberRegressor(epsilon=case["epsilon"], alpha=case["alpha_sk"], fit_intercept=False, tol=1e-10, max_iter=10000).fit(x, y)
        return h.coef_, h.scale_
    raise ValueError(e)


CASES = []
for shape in ["gaussian", "orthogonal"]:
    CASES += [
        {"name": f"logistic-l2/{shape}", "shape": shape, "alpha": 2.0, "signal": {"law": "gauss", "variance": 2.0},
         "readout": {"kind": "logistic"}, "noise": 0.0, "estimator": "logistic-l2", "l2": 0.5},
        {"name": f"logistic-l1/{shape}", "shape": shape, "alpha": 1.0, "signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 10.0},
         "readout": {"kind": "logistic"}, "noise": 0.0, "estimator": "logistic-l1", "l1": 1.0},
        {"name": f"lasso-sign/{shape}", "shape": shape, "alpha": 0.8, "signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 1.0},
         "readout": {"kind": "sign"}, "noise": 0.01, "estimator": "lasso", "l1": 0.1},
        {"name": f"lasso-2bit/{shape}", "shape": shape, "alpha": 0.8, "signal": {"law": "bernoulli-gauss", "density": 0.2, "variance": 1.0},
         "readout": {"kind": "quantize", "bits": 2, "range": 1.0}, "noise": 0.01, "estimator": "lasso", "l1": 0.05},
        {"name": f"huber-outliers/{shape}", "shape": shape, "alpha": 2.0, "signal": {"law": "gauss", "variance": 1.0},
         "readout": {"kind": "outliers", "fraction": 0.1, "outlier_variance": 25.0}, "noise": 0.1, "estimator": "huber",
         "epsilon": 1.35, "alpha_sk": 0.5},
    ]

rng = np.random.default_rng(SEED)
out = {"sklearn": sklearn.__version__, "n": N, "trials": TRIALS, "seed": SEED, "cases": []}
for case in CASES:
    m = int(round(case["alpha"] * N))
    mse, cos, nr, sig = [], [], [], []
    for _ in range(TRIALS):
        f = design(rng, case["shape"], m, N)
        x0 = signal(rng, case["signal"], N)
        y = readout(rng, case["readout"], f @ x0, case["noise"])
        xh, s = fit(case, f, y, m)
        mse.append(np.mean((xh - x0) ** 2))
        cos.append(xh @ x0 / (np.linalg.norm(xh) * np.linalg.norm(x0)))
        nr.append(np.linalg.norm(xh) / np.linalg.norm(x0))
        if s is not None:
            sig.append(s)
    r = dict(case)
    r["m"] = m
    for k, v in [("mse", mse), ("cosine", cos), ("norm_ratio", nr)]:
        r[k] = float(np.mean(v))
        r[k + "_sem"] = float(np.std(v, ddof=1) / np.sqrt(len(v)))
    if sig:
        r["sigma_hat"] = float(np.mean(sig))
    out["cases"].append(r)

with open(os.path.join(HERE, "glm_sklearn.json"), "w") as fh:
    json.dump(out, fh, indent=1)
    fh.write("\n")
