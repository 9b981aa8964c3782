"""The numpy/scipy side of the side-by-side benchmarks (test/bench/peers/run_peers.ts starts one
process of this script per workload, beside one process of sunlag_side.ts that wrote the
inputs).

    /usr/bin/python3 test/bench/peers/peer_side.py WORKLOAD INPUT_DIR

Each workload is written as a researcher who knows numpy would write it, as fast as we could
make it while staying idiomatic: vectorised over surrogates in chunks, phases as cos/sin (not
np.exp(1j*theta), about 17x slower here), matrix products instead of three-operand einsum,
scipy.fft with next_fast_len padding and 2 workers, OpenBLAS as Debian installs it. Protocol as
sunlag_side.ts: prints {"ready": true, ...}; per `run` line {"seconds": s, "check": {...}}.

Library versions and the OpenBLAS kernel actually in use are reported in the ready line.
"""
import ctypes
import json
import sys
import time

import numpy as np
import scipy
import scipy.fft as sf
from scipy.ndimage import minimum_filter1d
from scipy.signal import find_peaks
from scipy.stats import t as tdist

NAME, DIR = sys.argv[1], sys.argv[2]


def load(name):
    return np.fromfile(f"{DIR}/{name}.f64", dtype="<f8")


def openblas_core():
    """Name of the OpenBLAS kernel numpy runs (OPENBLAS_CORETYPE changes it)."""
    for line in open("/proc/self/maps"):
        path = line.split()[-1]
        if "openblas" in path and path.endswith(".so") or "libopenblas" in path:
            try:
                lib = ctypes.CDLL(path)
                lib.openblas_get_corename.restype = ctypes.c_char_p
                lib.openblas_get_config.restype = ctypes.c_char_p
                return {"core": lib.openblas_get_corename().decode(),
                        "config": lib.openblas_get_config().decode(),
                        "threads": lib.openblas_get_num_threads()}
            except (OSError, AttributeError):
                continue
    return None


# --- (a) Monte Carlo significance of a lagged correlation ------------------------------------

M, L, CHUNK, WORKERS = 10_000, 120, 1000, 2


def lag_job():
    x, y = load("x"), load("y")
    n = len(x)
    t = np.arange(n, dtype=float)
    basis, _ = np.linalg.qr(np.column_stack([np.ones(n), t - t.mean()]))  # linear detrend
    lags = np.arange(-L, L + 1)
    a = np.where(lags >= 0, 0, -lags)
    b = np.where(lags >= 0, n - lags, n)
    m = b - a
    h = n // 2 + 1
    pad = sf.next_fast_len(n + L, real=True)

    def overlap_r(s, c, ysum, yvar):
        """Pearson r over the overlap at each lag, from circular-free sums (rows: series)."""
        p1 = np.zeros((s.shape[0], n + 1))
        np.cumsum(s, axis=1, out=p1[:, 1:])
        p2 = np.zeros((s.shape[0], n + 1))
        np.cumsum(s * s, axis=1, out=p2[:, 1:])
        s1 = p1[:, b] - p1[:, a]
        s2 = p2[:, b] - p2[:, a]
        return (c - s1 * ysum / m) / np.sqrt((s2 - s1 * s1 / m) * yvar)

    def run():
        cy1 = np.concatenate([[0.0], np.cumsum(y)])
        cy2 = np.concatenate([[0.0], np.cumsum(y * y)])
        ysum = cy1[b + lags] - cy1[a + lags]
        yvar = (cy2[b + lags] - cy2[a + lags]) - ysum**2 / m
        Y = sf.rfft(y, pad)
        X = sf.rfft(x, pad)
        c_obs = sf.irfft(np.conj(X) * Y, pad)[lags % pad]
        obs = np.abs(overlap_r(x[None, :], c_obs[None, :], ysum, yvar)[0])
        amp = np.abs(sf.rfft(x))
        rng = np.random.default_rng(7)
        ar = np.empty((M, len(lags)))
        rsum = np.zeros(len(lags))
        rsq = np.zeros(len(lags))
        for c0 in range(0, M, CHUNK):
            th = rng.uniform(0.0, 2 * np.pi, (CHUNK, h))
            S = np.empty((CHUNK, h), dtype=complex)
            S.real = amp * np.cos(th)
            S.imag = amp * np.sin(th)
            S[:, 0] = 0
            if n % 2 == 0:
                S[:, -1] = np.sqrt(2) * amp[-1] * np.cos(th[:, -1])
            s = sf.irfft(S, n, axis=1, workers=WORKERS)
            s -= (s @ basis) @ basis.T
            F = sf.rfft(s, pad, axis=1, workers=WORKERS)
            np.conjugate(F, out=F)
            F *= Y
            c = sf.irfft(F, pad, axis=1, workers=WORKERS)[:, lags % pad]
            r = overlap_r(s, c, ysum, yvar)
            rsum += r.sum(axis=0)
            rsq += (r * r).sum(axis=0)
            np.abs(r, out=ar[c0:c0 + CHUNK])
        best = ar.max(axis=1)
        p_lag = (1 + (ar >= obs - 1e-12).sum(axis=0)) / (1 + M)
        p_fw = (1 + (best >= obs.max() - 1e-12).sum()) / (1 + M)
        null_sd = np.sqrt(np.maximum(0, rsq / M - (rsum / M) ** 2))
        thr = np.quantile(ar, 0.95, axis=0)
        return {"observed_max_abs_r": float(obs.max()), "p_family_wise": float(p_fw),
                "max_abs_r_95": float(np.quantile(best, 0.95)),
                "mean_null_sd": float(null_sd.mean()), "mean_p_per_lag": float(p_lag.mean()),
                "mean_threshold_95": float(thr.mean())}

    return 1, run


# --- (b) proxy-model calibration and reconstruction ------------------------------------------
#
# What both sides compute, per repetition (the numbers sunlag's calibrateProxyModel and
# reconstructFromProxies return for this workload, so that neither side does less):
#  - calibration on 17,000 days: iterated Prais-Winsten of TSI on (1, F - F_Q, -S_ref*PSI),
#    its coefficient covariance, standard errors, t values, two-sided p values and 95 %
#    intervals (Student t), R^2, adjusted R^2, residual RMS, AR(1)-Gaussian log-likelihood,
#    AIC, BIC, residual lag-1, fitted values, residuals and innovations, the collinearity
#    condition number, and 5-fold blocked cross-validation (every fold a full fit with the same
#    statistics) with the overall and per-fold RMSE;
#  - reconstruction of 153,000 days (the first half with F and PSI mapped from sunspot number)
#    with its first-order error model: the proxy values used and which were mapped, the source
#    of each day; the calibration loadings L^T x (Sigma_beta = L L^T, three per day); per mapped
#    term the mapping loadings beta_k s_k Lc^T g (two per day each); the residual processes of
#    the direct and of the back-extended model as AR(1) cell means (SD and lag-1 correlation
#    per cell, Wilks 2011 sec. 5.2.4 for the mean of m AR(1) steps); the variance of each day by
#    source (calibration, residual, mapping, input) and in total; the value, the one-sigma SD
#    and the 95 % interval.


def fit_statistics(X, y, beta, s2_innov, rho, cov, innov):
    """The statistics sunlag's praisWinsten returns beside beta (R^2 etc. on the original
    scale, inference from the transformed-scale covariance)."""
    n, p = X.shape
    fitted = X @ beta
    resid = y - fitted
    rss = resid @ resid
    yc = y - y.mean()
    r2 = 1 - rss / (yc @ yc)
    se = np.sqrt(np.maximum(0, np.diag(cov)))
    tval = beta / se
    df = n - p
    tcrit = tdist.ppf(0.975, df)
    s2ml = (innov @ innov) / n
    loglik = -0.5 * n * (np.log(2 * np.pi) + np.log(s2ml) + 1) + 0.5 * np.log(1 - rho * rho)
    return {"se": se, "t": tval, "p": 2 * tdist.cdf(-np.abs(tval), df),
            "lower": beta - tcrit * se, "upper": beta + tcrit * se, "r2": r2,
            "adj_r2": 1 - (1 - r2) * (n - 1) / df, "rms": np.sqrt(rss / n),
            "aic": -2 * loglik + 2 * (p + 2), "bic": -2 * loglik + np.log(n) * (p + 2),
            "lag1": (resid[1:] @ resid[:-1]) / (resid @ resid), "fitted": fitted,
            "residuals": resid, "innovations": innov, "sigma": np.sqrt(s2_innov)}


def prais_winsten(X, y, tol=1e-8, maxit=100):
    """Iterated Prais-Winsten (rho from the residuals' lag-1 regression, first row scaled)."""
    def transformed(rho, A):
        out = np.empty_like(A)
        out[0] = np.sqrt(1 - rho * rho) * A[0]
        np.subtract(A[1:], rho * A[:-1], out=out[1:])
        return out

    def lag1(e):
        return np.dot(e[1:], e[:-1]) / np.dot(e[:-1], e[:-1])

    beta = np.linalg.lstsq(X, y, rcond=None)[0]
    rho = lag1(y - X @ beta)
    for _ in range(maxit):
        beta = np.linalg.lstsq(transformed(rho, X), transformed(rho, y), rcond=None)[0]
        new = lag1(y - X @ beta)
        done = abs(new - rho) < tol
        rho = new
        if done:
            break
    Xs, ys = transformed(rho, X), transformed(rho, y)
    Q, R = np.linalg.qr(Xs)
    beta = np.linalg.solve(R, Q.T @ ys)
    innov = transformed(rho, y - X @ beta)
    s2 = innov @ innov / (len(y) - X.shape[1])
    Rinv = np.linalg.inv(R)
    cov = s2 * (Rinv @ Rinv.T)
    return beta, cov, rho, fit_statistics(X, y, beta, s2, rho, cov, innov)


def calibrate(f, psi, y, folds=5):
    X = np.column_stack([np.ones_like(y), f - 0.15, -1360.8 * psi])
    Z = X[:, 1:] - X[:, 1:].mean(axis=0)
    cond = np.linalg.cond(Z / np.linalg.norm(Z, axis=0))
    beta, cov, rho, st = prais_winsten(X, y)
    n = len(y)
    fold_sse = []
    for j in range(folds):
        a, b = j * n // folds, (j + 1) * n // folds
        keep = np.ones(n, dtype=bool)
        keep[a:b] = False
        bj = prais_winsten(X[keep], y[keep])[0]
        e = y[a:b] - X[a:b] @ bj
        fold_sse.append(e @ e)
    fold_rmse = [np.sqrt(s / ((j + 1) * n // folds - j * n // folds))
                 for j, s in enumerate(fold_sse)]
    cv = np.sqrt(sum(fold_sse) / n) if folds else None
    return beta, cov, rho, st["sigma"] / np.sqrt(1 - rho * rho), cv, cond, st, fold_rmse


def ar1_cell_means(days, sd, rho, step):
    """SD of the mean of each cell of an AR(1) process (m = max(1, days/step) steps, variance
    sd^2 f(m, rho)/m) and the correlation of adjacent cell means (covariance
    sd^2 S(m0) rho S(m1)/(m0 m1), S(m) = (1 - rho^m)/(1 - rho); cells both shorter than a step:
    rho^(mean length/step)), for rho > 0 as in this workload. Powers and the variance factor
    are evaluated only where they differ from the one-step case (masks), as one would write it."""
    m = np.maximum(1.0, days / step)
    long = m > 1
    rm = np.full_like(m, rho)
    np.power(rho, m, out=rm, where=long)
    f = np.ones_like(m)
    if long.any():
        ml, rl = m[long], rm[long]
        f[long] = 1 + 2 * (rho / (1 - rho) - rho * (1 - rl) / (ml * (1 - rho) ** 2))
    s = sd * np.sqrt(f / m)
    geo = (1 - rm) / (1 - rho)
    r = sd * sd * rho * geo[:-1] * geo[1:] / (m[:-1] * m[1:] * s[:-1] * s[1:])
    short = (days[:-1] < step) & (days[1:] < step)
    if short.any():
        r[short] = rho ** ((days[:-1][short] + days[1:][short]) / 2 / step)
    lag1 = np.empty_like(s)
    lag1[0] = 0.0
    np.clip(r, -1, 1, out=lag1[1:])
    return s, lag1


def irradiance_job():
    cal = {k: load(f"cal_{k}") for k in ("r", "f", "psi", "y")}
    rr, df, dp = load("rec_r"), load("rec_f"), load("rec_psi")
    days = np.ones_like(rr)
    # untimed set-up, as on the sunlag side: the model and the two sunspot mappings
    beta0, cov0, rho0, sd0, _, _, _, _ = calibrate(cal["f"], cal["psi"], cal["y"], folds=0)
    A = np.column_stack([np.ones_like(cal["r"]), cal["r"]])
    iAA = np.linalg.inv(A.T @ A)

    def mapping(v):
        c = np.linalg.lstsq(A, v, rcond=None)[0]
        return c, np.sum((v - A @ c) ** 2) / (len(v) - 2) * iAA

    mapF, mapP = mapping(cal["f"]), mapping(cal["psi"])
    sd_b, rho_b = 0.3, 0.9

    def reconstruct(beta, cov):
        G = np.column_stack([np.ones_like(rr), rr])  # dF/dc of a linear mapping c0 + c1 R
        mf, mp = np.isnan(df), np.isnan(dp)
        f = np.where(mf, G @ mapF[0], df)
        p = np.where(mp, G @ mapP[0], dp)
        source = np.where(mf | mp, 2, 1).astype(np.uint8)  # every day has R or both proxies
        X = np.column_stack([np.ones_like(f), f - 0.15, -1360.8 * p])
        value = X @ beta
        cal_load = X @ np.linalg.cholesky(cov)  # columns: L^T x per day
        map_f = (G @ np.linalg.cholesky(mapF[1])) * (beta[1] * mf)[:, None]
        map_p = (G @ np.linalg.cholesky(mapP[1])) * (beta[2] * -1360.8 * mp)[:, None]
        s_d, lag_d = ar1_cell_means(days, sd0, rho0, 1.0)
        s_b, lag_b = ar1_cell_means(days, sd_b, rho_b, 1.0)
        res_d = np.where(source == 1, s_d, 0.0)
        res_b = np.where(source == 2, s_b, 0.0)
        var = {"calibration": np.einsum("ij,ij->i", cal_load, cal_load),
               "residual": res_d * res_d + res_b * res_b,
               "mapping": np.einsum("ij,ij->i", map_f, map_f) + np.einsum("ij,ij->i", map_p, map_p),
               "input": np.zeros_like(value)}
        total = var["calibration"] + var["residual"] + var["mapping"] + var["input"]
        sd = np.sqrt(total)
        return {"value": value, "sd": sd, "lower": value - 1.96 * sd, "upper": value + 1.96 * sd,
                "components": var, "source": source, "values": (f, p), "mapped": (mf, mp),
                "loadings": (cal_load, map_f, map_p), "processes": ((res_d, lag_d), (res_b, lag_b))}

    def run():
        beta, cov, rho, _, cv, _, _, _ = calibrate(cal["f"], cal["psi"], cal["y"])
        rec = reconstruct(beta0, cov0)
        return {"coefficients": beta.tolist(), "rho": float(rho), "cv_rmse": float(cv),
                "mean_value": float(rec["value"].mean()), "mean_sd": float(rec["sd"].mean()),
                "mean_variance": {k: float(v.mean()) for k, v in rec["components"].items()},
                "loadings": len(rec["loadings"][0][0]) + len(rec["loadings"][1][0])
                + len(rec["loadings"][2][0]), "processes": len(rec["processes"])}

    return 5, run


# --- (c) 13-month smoothing and cycle extrema -------------------------------------------------

W13 = np.array([0.5] + [1.0] * 11 + [0.5]) / 12
SEP = 84  # 7 years of months


def maxima_between(s, mins):
    """The highest point between consecutive minima, and an interior one before/after them."""
    maxs = [a + 1 + int(np.argmax(s[a + 1:b])) for a, b in zip(mins[:-1], mins[1:])]
    if len(mins):
        head = int(np.argmax(s[:mins[0]])) if mins[0] >= 2 else 0
        tail = mins[-1] + 1 + int(np.argmax(s[mins[-1] + 1:])) if mins[-1] <= len(s) - 3 else 0
        if head > 0:
            maxs.insert(0, head)
        if 0 < tail < len(s) - 1:
            maxs.append(tail)
    return maxs


def cycles_job():
    x = load("activity")

    def by_filter():
        """Minima as the points equal to their running minimum over +-7 years (windows that
        reach past an end do not count: the series may fall further there), the first of a
        flat bottom."""
        s = np.convolve(x, W13, mode="valid")
        lo = minimum_filter1d(s, 2 * SEP + 1, mode="constant", cval=-np.inf)
        mins = np.flatnonzero(s == lo)
        mins = mins[np.diff(mins, prepend=-2) > 1]
        return s, mins

    def by_peaks():
        """Minima by scipy.signal.find_peaks (prominence a tenth of the range, 7 years apart)."""
        s = np.convolve(x, W13, mode="valid")
        mins, _ = find_peaks(-s, prominence=0.1 * (s.max() - s.min()), distance=SEP)
        return s, mins

    def timed(fn, k=200):
        t0 = time.perf_counter()
        for _ in range(k):
            s, mins = fn()
            maxs = maxima_between(s, mins)
        return (time.perf_counter() - t0) / k, s, mins, maxs

    # the faster of the two idiomatic paths is the peer (both must find the same extrema)
    tf, s, mf, xf = timed(by_filter)
    tp, _, mp, xp = timed(by_peaks)
    fn = by_filter if tf <= tp else by_peaks

    def run():
        s, mins = fn()
        maxs = maxima_between(s, mins)
        return {"minima": [int(i) + 6 for i in mins], "maxima": [int(i) + 6 for i in maxs],
                "path": fn.__name__,
                "paths_agree": bool(np.array_equal(mf, mp) and xf == xp)}

    return 200, run


JOBS = {"lag4096": lag_job, "lag4000": lag_job, "irradiance": irradiance_job,
        "cycles": cycles_job}


def main():
    repeat, run = JOBS[NAME]()
    print(json.dumps({"ready": True, "python": sys.version.split()[0], "numpy": np.__version__,
                      "scipy": scipy.__version__, "openblas": openblas_core(),
                      "repeat": repeat}), flush=True)
    for line in sys.stdin:
        cmd = line.strip()
        if cmd == "quit":
            return
        if cmd == "run":
            t0 = time.perf_counter()
            for _ in range(repeat):
                check = run()
            print(json.dumps({"seconds": (time.perf_counter() - t0) / repeat, "check": check}),
                  flush=True)


main()
