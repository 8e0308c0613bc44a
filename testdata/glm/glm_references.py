#!/usr/bin/python3
"""Reference values for the generalized-linear-model tests of engine/fixedpoint, computed
from the published equations by our own numerics (numpy/scipy of Debian's python3). Run:

    /usr/bin/python3 testdata/glm/glm_references.py > testdata/glm/glm_references.json

The equations are written here from memory of the papers, in their notation:

1. Sur & Candes 2019, "A modern maximum-likelihood theory for high-dimensional logistic
   regression", PNAS 116(29): for kappa = p/n and signal strength gamma^2 = Var(x^T beta),
   the unpenalized logistic MLE obeys beta_hat_j ~ alpha beta_j + sigma Z, where
   (alpha, sigma, lambda) solve, with rho(t) = log(1 + e^t),
     kappa^2 sigma^2 = E[2 rho'(Q1) (lambda rho'(prox_{lambda rho}(Q2)))^2]
     0               = E[rho'(Q1) Q1 lambda rho'(prox_{lambda rho}(Q2))]
     1 - kappa       = E[2 rho'(Q1) / (1 + lambda rho''(prox_{lambda rho}(Q2)))]
   and (Q1, Q2) centred Gaussian with Var Q1 = gamma^2, Cov = -alpha gamma^2,
   Var Q2 = alpha^2 gamma^2 + kappa sigma^2.
2. Candes & Sur 2020, "The phase transition for the existence of the maximum likelihood
   estimate in high-dimensional logistic regression", Ann. Statist. 48(1): the MLE exists
   (asymptotically) iff kappa < h(gamma) = min_t E[(Z - t Y V)_+^2], V, Z ~ N(0, 1)
   independent, P(Y = 1 | V) = rho'(gamma V). At gamma = 0, h = 1/2 (Cover 1965).
3. El Karoui, Bean, Bickel, Lim & Yu 2013, "On robust regression with high-dimensional
   predictors", PNAS 110(36) (also Donoho & Montanari 2016, PTRF 166): the unpenalized
   M-estimate with loss l and X_i ~ N(0, I_p) has ||beta_hat - beta0||^2 -> r^2 where (c, r)
   solve E[prox_c'(r Z + eps)] = 1 - kappa and kappa r^2 = E[(r Z + eps - prox_c(r Z + eps))^2],
   prox_c(x) = argmin_y l(y) + (x - y)^2/(2c).
"""
import json
import numpy as np
from scipy import optimize, special

GH = np.polynomial.hermite_e.hermegauss(120)  # weight exp(-x^2/2)
GX, GW = GH[0], GH[1] / np.sqrt(2 * np.pi)


def sig(t):
    return special.expit(t)


def prox_logistic(x, lam):
    """argmin_t lam rho(t) + (t - x)^2/2: t + lam sigmoid(t) = x, by Newton."""
    t = x - lam * sig(x)
    for _ in range(100):
        f = t + lam * sig(t) - x
        d = 1 + lam * sig(t) * (1 - sig(t))
        t = t - f / d
    return t


def sur_candes(kappa, gamma2):
    g = np.sqrt(gamma2)
    q1 = g * GX[:, None]
    z = GX[None, :]
    w = GW[:, None] * GW[None, :]

    def eqs(v):
        alpha, sigma, lam = v
        q2 = -alpha * q1 + np.sqrt(kappa) * sigma * z
        p = prox_logistic(q2, lam)
        r1 = sig(q1)
        e1 = np.sum(w * 2 * r1 * (lam * sig(p)) ** 2) - kappa ** 2 * sigma ** 2
        e2 = np.sum(w * r1 * q1 * lam * sig(p))
        e3 = np.sum(w * 2 * r1 / (1 + lam * sig(p) * (1 - sig(p)))) - (1 - kappa)
        return [e1, e2, e3]

    sol = optimize.root(eqs, [1.2, 2.0, 1.0], method="hybr", options={"xtol": 1e-13})
    assert sol.success, sol.message
    alpha, sigma, lam = sol.x
    return {"kappa": kappa, "gamma2": gamma2, "alpha": alpha, "sigma": abs(sigma), "lambda": lam,
            "residual": max(abs(x) for x in eqs(sol.x))}


def h_mle(gamma):
    v = GX
    wv = GW

    def f(a):  # E[(Z - a)_+^2]
        return (1 + a * a) * special.ndtr(-a) - a * np.exp(-a * a / 2) / np.sqrt(2 * np.pi)

    def obj(t):
        py = sig(gamma * v)
        return np.sum(wv * (py * f(t * v) + (1 - py) * f(-t * v)))

    res = optimize.minimize_scalar(obj, bounds=(-50, 50), method="bounded", options={"xatol": 1e-12})
    return {"gamma": gamma, "h": float(res.fun), "t": float(res.x)}


def huber_prox(x, c, width):
    return np.where(np.abs(x) <= width * (1 + c), x / (1 + c), x - c * width * np.sign(x))


def huber_prox_deriv(x, c, width):
    return np.where(np.abs(x) <= width * (1 + c), 1 / (1 + c), 1.0)


# Gauss-Hermite is not accurate across the kinks of the Huber prox: Gauss-Legendre on pieces
# split at the kinks instead.
def _expect_split(fn, s, cuts):
    pts = sorted([-14 * s, 14 * s] + [c for c in cuts if abs(c) < 14 * s])
    tot = 0.0
    xl, wl = np.polynomial.legendre.leggauss(40)
    for a, b in zip(pts[:-1], pts[1:]):
        n = max(1, int(np.ceil((b - a) / (s / 4))))
        for k in range(n):
            lo, hi = a + (b - a) * k / n, a + (b - a) * (k + 1) / n
            x = (hi - lo) / 2 * xl + (hi + lo) / 2
            tot += np.sum((hi - lo) / 2 * wl * fn(x) * np.exp(-x * x / (2 * s * s)) / (s * np.sqrt(2 * np.pi)))
    return tot


def el_karoui(kappa, width, comps):
    def expect(fn, r, c):
        tot = 0.0
        for wk, vk in comps:
            s = np.sqrt(r * r + vk)
            e = width * (1 + c)
            tot += wk * _expect_split(fn, s, [-e, e])
        return tot

    def eqs(v):
        c, r = np.exp(v)
        e1 = expect(lambda x: huber_prox_deriv(x, c, width), r, c) - (1 - kappa)
        e2 = expect(lambda x: (x - huber_prox(x, c, width)) ** 2, r, c) - kappa * r * r
        return [e1, e2]

    sol = optimize.root(eqs, [np.log(kappa / (1 - kappa)), 0.0], method="hybr", options={"xtol": 1e-12})
    c, r = np.exp(sol.x)
    assert max(abs(x) for x in eqs(sol.x)) < 1e-10, sol.message
    return {"kappa": kappa, "width": width, "noise": comps, "c": c, "r2": r * r,
            "residual": max(abs(x) for x in eqs(sol.x))}


out = {
    "sur_candes": [sur_candes(k, g2) for k, g2 in [(0.1, 5.0), (0.2, 5.0), (0.1, 1.0), (0.3, 1.0)]],
    "candes_sur_boundary": [h_mle(g) for g in [0.0, 1.0, np.sqrt(5.0), 3.0]],
    "el_karoui_huber": [el_karoui(k, w, c) for k, w, c in [
        (0.2, 1.0, [[1.0, 1.0]]),
        (0.5, 1.0, [[1.0, 0.25]]),
        (0.3, 0.5, [[0.9, 0.25], [0.1, 25.0]]),
    ]],
}
print(json.dumps(out, indent=1))
