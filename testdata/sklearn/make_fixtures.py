#!/usr/bin/python3
"""Reference solutions of the LASSO and the elastic net from scikit-learn, for engine/simulate.

Run with Debian's interpreter and package python3-sklearn:  /usr/bin/python3 make_fixtures.py
It writes fixture_MxN.json beside itself. The instances are invented for the test: Gaussian
designs with entries N(0, 1/m) rounded to 6 significant digits (the rounded decimals ARE the
instance), a sparse signal, and a little noise.

scikit-learn minimizes (1/(2 m)) ||y - X w||^2 + alpha l1_ratio ||w||_1
+ alpha (1 - l1_ratio)/2 ||w||^2 (fit_intercept=False). The project's objective is
1/2 ||y - X w||^2 + l1 ||w||_1 + l2/2 ||w||^2, the same minimizer with l1 = m alpha l1_ratio and
l2 = m alpha (1 - l1_ratio); both are written, so the Go test needs no conversion of its own.
"""
import json
import os
import sys

import numpy as np
import sklearn
from sklearn.linear_model import ElasticNet, Lasso

HERE = os.path.dirname(os.path.abspath(__file__))


def rounded(a, digits):
    return np.array([float("%.*g" % (digits, v)) for v in a.ravel()]).reshape(a.shape)


def duality_gap(X, y, w, l1, l2):
    r = y - X @ w
    xtr = X.T @ r
    primal = 0.5 * r @ r + l1 * np.abs(w).sum() + 0.5 * l2 * w @ w
    if l2 > 0:
        conj = (np.maximum(np.abs(xtr) - l1, 0) ** 2).sum() / (2 * l2)
        return primal - (r @ y - 0.5 * r @ r - conj)
    c = min(1.0, l1 / np.abs(xtr).max())
    return primal - (c * r @ y - 0.5 * c * c * r @ r)


def kkt(X, y, w, l1, l2):
    """Largest violation of the optimality conditions of the project's objective."""
    g = X.T @ (X @ w - y) + l2 * w
    on = w != 0
    v = np.zeros_like(w)
    v[on] = np.abs(g[on] + l1 * np.sign(w[on]))
    v[~on] = np.maximum(np.abs(g[~on]) - l1, 0)
    return float(v.max())


def make(m, n, seed, fits):
    rng = np.random.default_rng(seed)
    X = rounded(rng.standard_normal((m, n)) / np.sqrt(m), 6)
    k = max(1, n // 10)
    x0 = np.zeros(n)
    x0[rng.choice(n, k, replace=False)] = rng.standard_normal(k)
    y = rounded(X @ x0 + 0.1 * rng.standard_normal(m), 10)
    out = {
        "source": "scikit-learn %s (Debian python3-sklearn), coordinate descent, "
                  "tol=1e-14, max_iter=10**6, fit_intercept=False; made by make_fixtures.py"
                  % sklearn.__version__,
        "rows": m, "cols": n, "seed": seed,
        "x": [float(v) for v in X.ravel(order="F")],  # column-major
        "y": [float(v) for v in y],
        "fits": [],
    }
    for kind, alpha, ratio in fits:
        if kind == "lasso":
            model = Lasso(alpha=alpha, fit_intercept=False, tol=1e-14, max_iter=10**6)
            ratio = 1.0
        else:
            model = ElasticNet(alpha=alpha, l1_ratio=ratio, fit_intercept=False, tol=1e-14,
                               max_iter=10**6)
        model.fit(np.asfortranarray(X), y)
        w = model.coef_.astype(float)
        l1, l2 = m * alpha * ratio, m * alpha * (1 - ratio)
        out["fits"].append({
            "kind": kind, "alpha": alpha, "l1_ratio": ratio, "l1": l1, "l2": l2,
            "coef": [float(v) for v in w],
            "nonzero": int((w != 0).sum()),
            "gap": float(duality_gap(X, y, w, l1, l2)),
            "kkt": kkt(X, y, w, l1, l2),
            "n_iter": int(model.n_iter_),
        })
    path = os.path.join(HERE, "fixture_%dx%d.json" % (m, n))
    with open(path, "w") as fh:
        json.dump(out, fh, separators=(",", ":"))
        fh.write("\n")
    for f in out["fits"]:
        print("%s %s alpha=%g ratio=%g nonzero=%d gap=%.2e kkt=%.2e iters=%d" % (
            path, f["kind"], f["alpha"], f["l1_ratio"], f["nonzero"], f["gap"], f["kkt"],
            f["n_iter"]), file=sys.stderr)


make(60, 120, 1, [("lasso", 0.01, 1), ("lasso", 0.002, 1), ("enet", 0.01, 0.5), ("enet", 0.003, 0.2)])
make(100, 200, 2, [("lasso", 0.005, 1), ("enet", 0.005, 0.7), ("enet", 0.02, 0.1)])
make(120, 60, 3, [("lasso", 0.002, 1), ("enet", 0.004, 0.5)])
