#!/usr/bin/python3
"""A fixed 200 x 400 design with correlated columns, and scikit-learn's LASSO on the trials
that `hdrisk check --matrix` draws for it (engine/simulate, TestMatrixAgainstSklearn).

Run with Debian's interpreter and package python3-sklearn, in three steps:

  /usr/bin/python3 make_matrix_fixture.py matrix
      writes ../matrices/ar1_200x400.mtx. Recipe: numpy.random.default_rng(20260412); each row
      of F is a Gaussian AR(1) sequence along the columns with correlation rho = 0.8,
      F[:, 0] = z_0, F[:, j] = rho F[:, j-1] + sqrt(1 - rho^2) z_j with z_j ~ N(0, I_m / m),
      so the columns have unit norm on average and correlation rho^|j-k|. The entries are
      written at 7 significant digits; the rounded decimals ARE the matrix.
  go test ./engine/simulate -run TestMatrixTrialsFixture -update-matrix-trials
      writes matrix_trials.json: x0 and w of each trial the check draws (seed and trial
      index as stated in the file), so that scikit-learn solves the same instances.
  /usr/bin/python3 make_matrix_fixture.py lasso
      writes matrix_ar1_200x400.json: for each trial the error (1/n)||xhat - x0||^2 of
      scikit-learn's Lasso on y = F x0 + w, and its mean with the standard error.

scikit-learn minimizes (1/(2 m)) ||y - F w||^2 + alpha ||w||_1 (fit_intercept=False); the
project's objective 1/2 ||y - F w||^2 + l1 ||w||_1 has the same minimizer at alpha = l1 / m.
"""
import json
import os
import sys

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
MATRIX = os.path.join(HERE, "..", "matrices", "ar1_200x400.mtx")
TRIALS = os.path.join(HERE, "matrix_trials.json")
OUT = os.path.join(HERE, "matrix_ar1_200x400.json")
M, N, RHO, SEED = 200, 400, 0.8, 20260412


def write_matrix():
    rng = np.random.default_rng(SEED)
    z = rng.standard_normal((M, N)) / np.sqrt(M)
    f = np.empty((M, N))
    f[:, 0] = z[:, 0]
    c = np.sqrt(1 - RHO * RHO)
    for j in range(1, N):
        f[:, j] = RHO * f[:, j - 1] + c * z[:, j]
    with open(MATRIX, "w") as fh:
        fh.write("%%MatrixMarket matrix array real general\n")
        fh.write("% A 200 x 400 Gaussian design with AR(1) column correlation rho = 0.8,\n")
        fh.write("% made by testdata/sklearn/make_matrix_fixture.py (seed 20260412).\n")
        fh.write("%d %d\n" % (M, N))
        for v in f.ravel(order="F"):
            fh.write("%.7g\n" % v)


def read_matrix():
    with open(MATRIX) as fh:
        lines = [l for l in fh if not l.startswith("%")]
    m, n = map(int, lines[0].split())
    vals = np.array([float(l) for l in lines[1:]])
    return vals.reshape((n, m)).T


def lasso():
    import sklearn
    from sklearn.linear_model import Lasso

    f = read_matrix()
    with open(TRIALS) as fh:
        tr = json.load(fh)
    m, n = f.shape
    l1 = tr["l1"]
    alpha = l1 / m
    errs = []
    for t in tr["trials"]:
        x0 = np.zeros(n)
        x0[t["x0_index"]] = t["x0_value"]
        y = f @ x0 + np.array(t["w"])
        model = Lasso(alpha=alpha, fit_intercept=False, tol=1e-14, max_iter=10**6)
        model.fit(np.asfortranarray(f), y)
        errs.append(float(((model.coef_ - x0) ** 2).mean()))
    errs = np.array(errs)
    out = {
        "source": "scikit-learn %s (Debian python3-sklearn) Lasso, tol=1e-14, max_iter=10**6, "
                  "fit_intercept=False, alpha = l1/m; made by make_matrix_fixture.py" % sklearn.__version__,
        "seed": tr["seed"], "first": tr["first"], "l1": l1, "alpha": alpha,
        "mse": [float(e) for e in errs],
        "mean_mse": float(errs.mean()),
        "stderr": float(errs.std(ddof=1) / np.sqrt(len(errs))),
    }
    with open(OUT, "w") as fh:
        json.dump(out, fh, indent=1)
        fh.write("\n")
    print("%s: %d trials, mean MSE %.6g +- %.2g" % (OUT, len(errs), out["mean_mse"], out["stderr"]),
          file=sys.stderr)


if __name__ == "__main__":
    {"matrix": write_matrix, "lasso": lasso}[sys.argv[1]]()
