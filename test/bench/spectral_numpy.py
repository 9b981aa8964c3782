"""The spectral benchmark work of test/bench/spectral_case.ts in vectorised numpy.

Calibrate 100 band models on 17,000 days on the regressors [1, F - 0.15, -1360.8 PSI]:
- OLS: one numpy.linalg.lstsq over all bands (Y is 17,000 x 100), coefficient covariances
  s2_b (X'X)^-1, R^2, 5-fold blocked cross-validation (one lstsq over all bands per fold);
- Prais-Winsten, vectorised over bands: each band has its own rho, so the transformed designs
  differ; each iteration forms every band's X*'X* and X*'y* with einsum and solves them in one
  batched numpy.linalg.solve, until every |d rho| < 1e-8; the same in each CV fold;
- both: the residual cross-correlation at lags 0 and 1 (E'E and the lag-1 products).
Reconstruct 119,000 days: X @ B for all bands, the quadratic forms x' S_b x by einsum,
mapped-proxy variance (the first half back-extended through linear sunspot mappings), AR(1)
residual variance, 95 % bounds; plus the integral over all bands with the correlated errors.
Ensemble: 100 realisations of that reconstruction (the draw of
core/irradiance/spectral_band_ensemble.ts): per member the coefficients of all bands,
correlated across bands (xi = L_r z per coefficient, beta_b = beta_hat_b + S_b^1/2 xi_b, one
einsum), the two linear mappings' parameters and the sunspot number's independent error
(sigma = 0.1 R + 2) once for all bands, the direct and back-extended residual processes as
AR(1) per band (scipy.signal.lfilter per band: the bands' rho differ) driven by innovations
correlated across bands (one matmul Z @ L_C.T through OpenBLAS), streamed member by member into
per-day, per-band sums and squares and the integral's.

Run: /usr/bin/python3 test/bench/spectral_numpy.py [--rounds R] [--json]
Prints the median time (ms) of each task over R rounds (after one warm-up), the peak resident
memory (ru_maxrss) and the numpy version. With --serve it reads task names from stdin, one per
line, and answers each with one timing as a JSON line ("rss" answers the peak memory): how
spectral_medians.ts interleaves it with the Deno side. numpy uses Debian's OpenBLAS (pthread)
through the libblas.so.3 alternative.
"""
import json
import resource
import sys
import time

import numpy as np
from scipy.signal import lfilter

BANDS, CAL, REC, REALIZATIONS = 100, 17_000, 119_000, 100


def proxies(n, rng):
    t = np.arange(n)
    r = np.maximum(0, 100 * (1 + np.sin(2 * np.pi * t / 4018)) + 20 * rng.standard_normal(n))
    u = lfilter([1], [1, -0.5], 0.0002 * rng.standard_normal(n))
    f = 0.15 + 6.5e-5 * r + u
    psi = np.maximum(0, 2.5e-6 * r * (1 + 0.5 * rng.standard_normal(n)))
    return r, f, psi


def bands(f, psi, rng):
    n = len(f)
    b = np.arange(BANDS)
    level = 0.1 + 2 * np.exp(-(((b - 30) / 25) ** 2))
    common = rng.standard_normal((n, 1))
    z = 0.7 * common + 0.714 * rng.standard_normal((n, BANDS))
    e = lfilter([1], [1, -0.7], 1e-4 * level * z, axis=0)
    return (level + level * 3 / (1 + b) * (f[:, None] - 0.15)
            - 0.5 * 1360.8 * psi[:, None] * 1e-3 * (1 + b / 50) + e)


def design(f, psi):
    return np.column_stack([np.ones_like(f), f - 0.15, -1360.8 * psi])


def correlation(E):
    g0 = E.T @ E
    g1 = E[1:].T @ E[:-1]
    d = np.sqrt(np.outer(np.diag(g0), np.diag(g0)))
    return g0 / d, (g1 + g1.T) / 2 / d


def ols(X, Y):
    B = np.linalg.lstsq(X, Y, rcond=None)[0]
    E = Y - X @ B
    n, p = X.shape
    s2 = np.sum(E * E, axis=0) / (n - p)
    xtx = np.linalg.inv(X.T @ X)
    cov = s2[:, None, None] * xtx[None]
    r2 = 1 - np.sum(E * E, axis=0) / np.sum((Y - Y.mean(axis=0)) ** 2, axis=0)
    return B, cov, E, r2


def folds(X, Y, fit, k=5):
    n = len(Y)
    sse = np.zeros(Y.shape[1])
    for j in range(k):
        a, b = j * n // k, (j + 1) * n // k
        train = np.r_[0:a, b:n]
        B = fit(X[train], Y[train])[0]
        sse += np.sum((Y[a:b] - X[a:b] @ B) ** 2, axis=0)
    return np.sqrt(sse / n)


def calibrate_ols(X, Y):
    B, cov, E, r2 = ols(X, Y)
    cv = folds(X, Y, ols)
    return B, cov, cv, correlation(E)


def pw(X, Y, tol=1e-8, maxit=100):
    B = np.linalg.lstsq(X, Y, rcond=None)[0]
    n, p = X.shape

    def rho_of(B):
        E = Y - X @ B
        return np.sum(E[1:] * E[:-1], axis=0) / np.sum(E[:-1] ** 2, axis=0)

    def solve(rho):
        Xs = X[None, 1:, :] - rho[:, None, None] * X[None, :-1, :]   # bands x (n-1) x p
        Ys = (Y[1:] - rho[None, :] * Y[:-1]).T                        # bands x (n-1)
        c = np.sqrt(1 - rho ** 2)
        A = np.einsum("bnp,bnq->bpq", Xs, Xs) + (c ** 2)[:, None, None] * np.outer(X[0], X[0])[None]
        v = np.einsum("bnp,bn->bp", Xs, Ys) + (c ** 2 * Y[0])[:, None] * X[0][None, :]
        return np.linalg.solve(A, v[..., None])[..., 0].T, A, Xs, Ys

    rho = rho_of(B)
    for _ in range(maxit):
        B, A, Xs, Ys = solve(rho)
        new = rho_of(B)
        done = np.max(np.abs(new - rho)) < tol
        rho = new
        if done:
            break
    B, A, Xs, Ys = solve(rho)
    U = Ys - np.einsum("bnp,pb->bn", Xs, B)
    u0 = np.sqrt(1 - rho ** 2) * (Y[0] - X[0] @ B)
    s2 = (np.sum(U * U, axis=1) + u0 ** 2) / (n - p)
    cov = s2[:, None, None] * np.linalg.inv(A)
    return B, cov, Y - X @ B, rho


def calibrate_pw(X, Y):
    B, cov, E, rho = pw(X, Y)
    cv = folds(X, Y, pw)
    return B, cov, cv, correlation(E)


def sqrtm_sym(S):
    w, V = np.linalg.eigh(S)
    return (V * np.sqrt(np.maximum(w, 0))[..., None, :]) @ np.swapaxes(V, -1, -2)


def reconstruct(B, cov, sd, rho, r2, f2, p2, half, mapF, mapP, corr, weights):
    (cF, sF), (cP, sP) = mapF, mapP
    vf, pf = cF[0] + cF[1] * r2, sF[0, 0] + 2 * r2 * sF[0, 1] + r2 * r2 * sF[1, 1]
    vp, pp = cP[0] + cP[1] * r2, sP[0, 0] + 2 * r2 * sP[0, 1] + r2 * r2 * sP[1, 1]
    back = np.arange(len(r2)) < half
    f = np.where(back, vf, f2)
    p = np.where(back, vp, p2)
    X = design(f, p)
    be_sd, be_rho = 3 * sd, 0.9
    # the integral over all bands as one more model
    l0, l1 = corr
    w = weights
    Bi = B @ w
    R = sqrtm_sym(cov)
    Ci = np.einsum("i,j,ij,iab,jbc->ac", w, w, l0, R, R)
    Ci = (Ci + Ci.T) / 2
    v0 = np.einsum("i,j,i,j,ij->", w, w, sd, sd, l0)
    l1d = l1.copy()
    np.fill_diagonal(l1d, rho)
    rho_i = np.einsum("i,j,i,j,ij->", w, w, sd, sd, l1d) / v0
    bsd = be_sd
    bv0 = np.einsum("i,j,i,j,ij->", w, w, bsd, bsd, l0)
    l1b = l1.copy()
    np.fill_diagonal(l1b, be_rho)
    brho = np.einsum("i,j,i,j,ij->", w, w, bsd, bsd, l1b) / bv0
    Ball = np.column_stack([B, Bi])                     # p x (bands + 1)
    covall = np.concatenate([cov, Ci[None]], axis=0)   # (bands + 1) x p x p
    sdall = np.append(sd, np.sqrt(v0))
    besd = np.append(bsd, np.sqrt(bv0))
    value = X @ Ball
    q = np.einsum("ni,bij,nj->nb", X, covall, X, optimize=True)
    # first-order (delta-method) mapping term, as core/irradiance/proxy_reconstruction_errors.ts
    mapped = ((Ball[1] ** 2)[None, :] * pf[:, None]
              + (Ball[2] ** 2)[None, :] * 1360.8 ** 2 * pp[:, None])
    rv = np.where(back[:, None], besd[None, :] ** 2 + mapped, sdall[None, :] ** 2)
    s = np.sqrt(q + rv)
    return value, s, value - 1.96 * s, value + 1.96 * s


def ar1_rows(E, lag, u0):
    """AR(1) along each row of E (bands x time) with its own lag, innovations E scaled by
    sqrt(1 - lag^2), started from u0 (the stationary first value)."""
    out = np.empty((E.shape[0], E.shape[1] + 1))
    out[:, 0] = u0
    c = np.sqrt(1 - lag ** 2)
    for b in range(E.shape[0]):
        out[b, 1:], _ = lfilter([c[b]], [1, -lag[b]], E[b], zi=[lag[b] * u0[b]])
    return out


def ensemble(B, cov, sd, rho, r2, f2, p2, half, maps, corr, weights, seed=1):
    rng = np.random.default_rng(seed)
    n = len(r2)
    p = B.shape[0]
    l0 = corr[0]
    Lr = np.linalg.cholesky(l0)
    roots = sqrtm_sym(cov)                                    # bands x p x p
    be_sd, be_rho = 3 * sd, np.full(BANDS, 0.9)

    def innovation_factor(lag):
        c = np.sqrt(1 - lag ** 2)
        C = l0 * (1 - np.outer(lag, lag)) / np.outer(c, c)
        np.fill_diagonal(C, 1)
        return np.linalg.cholesky(C)

    Ld, Lb = innovation_factor(rho), innovation_factor(be_rho)
    (cF, sF), (cP, sP) = maps
    LF, LP = np.linalg.cholesky(sF), np.linalg.cholesky(sP)
    r_sd = 0.1 * r2[:half] + 2
    total = np.zeros((n, BANDS))
    sq = np.zeros((n, BANDS))
    isum = np.zeros(n)
    isq = np.zeros(n)
    for _ in range(REALIZATIONS):
        xi = rng.standard_normal((p, BANDS)) @ Lr.T           # p x bands, correlated across bands
        beta = B + np.einsum("bij,jb->ib", roots, xi)         # p x bands
        a = cF + LF @ rng.standard_normal(2)
        c = cP + LP @ rng.standard_normal(2)
        R = np.maximum(r2[:half] + r_sd * rng.standard_normal(half), 0)
        f = np.concatenate([a[0] + a[1] * R, f2[half:]])
        q = np.concatenate([c[0] + c[1] * R, p2[half:]])
        Y = design(f, q) @ beta                               # days x bands
        for lo, hi, s, lag, L in ((half, n, sd, rho, Ld), (0, half, be_sd, be_rho, Lb)):
            u0 = Lr @ rng.standard_normal(BANDS)
            E = L @ rng.standard_normal((BANDS, hi - lo - 1))  # bands x days
            Y[lo:hi] += (s[:, None] * ar1_rows(E, lag, u0)).T
        total += Y
        sq += Y * Y
        I = Y @ weights
        isum += I
        isq += I * I
    return total, sq, isum, isq


def main():
    rounds = int(sys.argv[sys.argv.index("--rounds") + 1]) if "--rounds" in sys.argv else 5
    rng = np.random.default_rng(1)
    r, f, psi = proxies(CAL, rng)
    X = design(f, psi)
    Y = bands(f, psi, np.random.default_rng(2))
    B, cov, _, corr = calibrate_pw(X, Y)
    E = Y - X @ B
    sd = np.sqrt(np.mean(E * E, axis=0))
    rho = np.sum(E[1:] * E[:-1], axis=0) / np.sum(E * E, axis=0)
    A = np.column_stack([np.ones_like(r), r])
    iAA = np.linalg.inv(A.T @ A)
    maps = []
    for y in (f, psi):
        c = np.linalg.lstsq(A, y, rcond=None)[0]
        maps.append((c, np.sum((y - A @ c) ** 2) / (len(r) - 2) * iAA))
    r2, f2, p2 = proxies(REC, np.random.default_rng(3))
    weights = 5.0 + np.arange(BANDS)
    tasks = {
        "calibrate_ols": lambda: calibrate_ols(X, Y),
        "calibrate_prais_winsten": lambda: calibrate_pw(X, Y),
        "reconstruct": lambda: reconstruct(B, cov, sd, rho, r2, f2, p2, REC // 2, maps[0],
                                           maps[1], corr, weights),
        "ensemble": lambda: ensemble(B, cov, sd, rho, r2, f2, p2, REC // 2, maps, corr, weights),
    }
    if "--serve" in sys.argv:
        print(json.dumps({"ready": True, "numpy": np.__version__}), flush=True)
        for line in sys.stdin:
            k = line.strip()
            if k == "rss":
                mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
                print(json.dumps({"peak_rss_mb": mb}), flush=True)
            elif k in tasks:
                t0 = time.perf_counter()
                tasks[k]()
                print(json.dumps({"task": k, "ms": (time.perf_counter() - t0) * 1e3}), flush=True)
            else:
                break
        return
    times = {k: [] for k in tasks}
    for k, fn in tasks.items():
        fn()  # warm-up
    for _ in range(rounds):
        for k, fn in tasks.items():
            t0 = time.perf_counter()
            fn()
            times[k].append((time.perf_counter() - t0) * 1e3)
    out = {
        "numpy": np.__version__,
        "median_ms": {k: float(np.median(v)) for k, v in times.items()},
        "min_ms": {k: float(np.min(v)) for k, v in times.items()},
        "peak_rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
    }
    if "--json" in sys.argv:
        print(json.dumps(out))
        return
    print(f"numpy {out['numpy']}, peak RSS {out['peak_rss_mb']:.0f} MB")
    for k in tasks:
        print(f"{k}: median {out['median_ms'][k]:.1f} ms, min {out['min_ms'][k]:.1f} ms")


if __name__ == "__main__":
    main()
