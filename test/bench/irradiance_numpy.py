"""The irradiance benchmark work of test/bench/irradiance_bench.ts in idiomatic numpy.

Calibrate: Prais-Winsten (iterated, rho = sum e_t e_{t-1} / sum e_{t-1}^2, first row scaled
by sqrt(1 - rho^2)) on 17,000 days with numpy.linalg.lstsq, covariance from the QR R factor,
plus 5-fold blocked cross-validation. Reconstruct: 153,000 days, x @ beta, the quadratic form
x' S x by einsum, mapped-proxy variance, AR(1) residual variance, 95 % bounds; half the days
back-extended through linear sunspot mappings.

Run: unset OPENBLAS_CORETYPE OPENBLAS_L2_SIZE; /usr/bin/python3 test/bench/irradiance_numpy.py
Prints the median and minimum of repeated runs (ms) for each task and the numpy version.
"""
import time

import numpy as np


def synthetic(n, rng):
    t = np.arange(n)
    r = np.maximum(0, 100 * (1 + np.sin(2 * np.pi * t / 4018)) + 20 * rng.standard_normal(n))
    u = np.zeros(n)
    e = np.zeros(n)
    nu = 0.0002 * rng.standard_normal(n)
    ne = 0.107 * rng.standard_normal(n)
    for i in range(1, n):  # AR(1) generation (not timed)
        u[i] = 0.5 * u[i - 1] + nu[i]
        e[i] = 0.7 * e[i - 1] + ne[i]
    f = 0.15 + 6.5e-5 * r + u
    psi = np.maximum(0, 2.5e-6 * r * (1 + 0.5 * rng.standard_normal(n)))
    y = 1360.8 + 135 * (f - 0.15) - 0.96 * 1360.8 * psi + e
    return r, f, psi, y


def prais_winsten(X, y, tol=1e-8, maxit=100):
    beta = np.linalg.lstsq(X, y, rcond=None)[0]
    e = y - X @ beta
    rho = np.dot(e[1:], e[:-1]) / np.dot(e[:-1], e[:-1])
    for _ in range(maxit):
        Xs = np.vstack([np.sqrt(1 - rho**2) * X[:1], X[1:] - rho * X[:-1]])
        ys = np.concatenate([[np.sqrt(1 - rho**2) * y[0]], y[1:] - rho * y[:-1]])
        beta = np.linalg.lstsq(Xs, ys, rcond=None)[0]
        e = y - X @ beta
        new = np.dot(e[1:], e[:-1]) / np.dot(e[:-1], e[:-1])
        done = abs(new - rho) < tol
        rho = new
        if done:
            break
    Xs = np.vstack([np.sqrt(1 - rho**2) * X[:1], X[1:] - rho * X[:-1]])
    ys = np.concatenate([[np.sqrt(1 - rho**2) * y[0]], y[1:] - rho * y[:-1]])
    beta = np.linalg.lstsq(Xs, ys, rcond=None)[0]
    R = np.linalg.qr(Xs, mode="r")
    Rinv = np.linalg.inv(R)
    u = ys - Xs @ beta
    s2 = u @ u / (len(y) - X.shape[1])
    return beta, s2 * Rinv @ Rinv.T, rho


def calibrate(f, psi, y, folds=5):
    X = np.column_stack([np.ones_like(y), f - 0.15, -1360.8 * psi])
    beta, cov, rho = prais_winsten(X, y)
    n = len(y)
    sse = 0.0
    for j in range(folds):
        a, b = j * n // folds, (j + 1) * n // folds
        train = np.r_[0:a, b:n]
        bj, _, _ = prais_winsten(X[train], y[train])
        sse += np.sum((y[a:b] - X[a:b] @ bj) ** 2)
    return beta, cov, rho, np.sqrt(sse / n)


def ar1_factor(m, rho):
    if m <= 1:
        return 1.0
    return 1 + 2 * (rho / (1 - rho) - rho * (1 - rho**m) / (m * (1 - rho) ** 2))


def reconstruct(beta, cov, r, direct_f, direct_p, mapF, mapP, sd, rho, sd_b, rho_b):
    # linear mappings F = c0 + c1 R with parameter covariance
    def mapped(m, x):
        c, S = m
        return c[0] + c[1] * x, S[0, 0] + 2 * x * S[0, 1] + x * x * S[1, 1]

    vf, pf = mapped(mapF, r)
    vp, pp = mapped(mapP, r)
    miss = np.isnan(direct_f) | np.isnan(direct_p)
    f = np.where(np.isnan(direct_f), vf, direct_f)
    p = np.where(np.isnan(direct_p), vp, direct_p)
    X = np.column_stack([np.ones_like(f), f - 0.15, -1360.8 * p])
    yhat = X @ beta
    q = np.einsum("ij,jk,ik->i", X, cov, X)
    mv = np.where(np.isnan(direct_f), (beta[1] ** 2 + cov[1, 1]) * pf, 0) + np.where(
        np.isnan(direct_p), (beta[2] ** 2 + cov[2, 2]) * 1360.8**2 * pp, 0
    )
    rv = np.where(miss, sd_b**2 * ar1_factor(1, rho_b), sd**2 * ar1_factor(1, rho))
    s = np.sqrt(q + mv + rv)
    return yhat, s, yhat - 1.96 * s, yhat + 1.96 * s


MINS = []


def median_ms(fn, repeat):
    for _ in range(3):
        fn()  # warm-up, as the Deno side
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append((time.perf_counter() - t0) * 1e3)
    MINS.append(min(times))
    return float(np.median(times))


rng = np.random.default_rng(1)
r, f, psi, y = synthetic(17_000, rng)
cal_ms = median_ms(lambda: calibrate(f, psi, y), 30)
beta, cov, rho, _ = calibrate(f, psi, y, folds=2)
A = np.column_stack([np.ones_like(r), r])
cF = np.linalg.lstsq(A, f, rcond=None)[0]
cP = np.linalg.lstsq(A, psi, rcond=None)[0]
iAA = np.linalg.inv(A.T @ A)
sF = np.sum((f - A @ cF) ** 2) / (len(r) - 2) * iAA
sP = np.sum((psi - A @ cP) ** 2) / (len(r) - 2) * iAA
N, half = 153_000, 76_500
r2, f2, p2, _ = synthetic(N, np.random.default_rng(2))
df = f2.copy()
dp = p2.copy()
df[:half] = np.nan
dp[:half] = np.nan
rec_ms = median_ms(
    lambda: reconstruct(beta, cov, r2, df, dp, (cF, sF), (cP, sP), 0.15, rho, 0.3, 0.9), 50
)
print(f"numpy {np.__version__}")
print(f"calibrate 17,000 days (Prais-Winsten + 5-fold blocked CV): median {cal_ms:.2f} ms, min {MINS[0]:.2f} ms")
print(f"reconstruct 153,000 days with 95 % prediction intervals: median {rec_ms:.2f} ms, min {MINS[1]:.2f} ms")
