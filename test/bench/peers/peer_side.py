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

def prais_winsten(X, y, tol=1e-8, maxit=100):
    """Iterated Prais-Winsten (rho from the residuals' lag-1 regression, first row scaled)."""
    def transformed(rho):
        k = np.sqrt(1 - rho * rho)
        Xs = np.empty_like(X)
        Xs[0] = k * X[0]
        np.subtract(X[1:], rho * X[:-1], out=Xs[1:])
        ys = np.empty_like(y)
        ys[0] = k * y[0]
        np.subtract(y[1:], rho * y[:-1], out=ys[1:])
        return Xs, ys

    def lag1(e):
        return np.dot(e[1:], e[:-1]) / np.dot(e[:-1], e[:-1])

    beta = np.linalg.lstsq(X, y, rcond=None)[0]
    rho = lag1(y - X @ beta)
    for _ in range(maxit):
        Xs, ys = transformed(rho)
        beta = np.linalg.lstsq(Xs, ys, rcond=None)[0]
        new = lag1(y - X @ beta)
        done = abs(new - rho) < tol
        rho = new
        if done:
            break
    Xs, ys = transformed(rho)
    Q, R = np.linalg.qr(Xs)
    beta = np.linalg.solve(R, Q.T @ ys)
    u = ys - Xs @ beta
    s2 = u @ u / (len(y) - X.shape[1])
    Rinv = np.linalg.inv(R)
    return beta, s2 * (Rinv @ Rinv.T), rho, np.sqrt(s2)


def calibrate(f, psi, y, folds=5):
    X = np.column_stack([np.ones_like(y), f - 0.15, -1360.8 * psi])
    Z = X[:, 1:] - X[:, 1:].mean(axis=0)
    cond = np.linalg.cond(Z / np.linalg.norm(Z, axis=0))
    beta, cov, rho, sigma = prais_winsten(X, y)
    n = len(y)
    sse = 0.0
    for j in range(folds):
        a, b = j * n // folds, (j + 1) * n // folds
        keep = np.ones(n, dtype=bool)
        keep[a:b] = False
        bj = prais_winsten(X[keep], y[keep])[0]
        sse += np.sum((y[a:b] - X[a:b] @ bj) ** 2)
    return beta, cov, rho, sigma / np.sqrt(1 - rho * rho), np.sqrt(sse / n), cond


def irradiance_job():
    cal = {k: load(f"cal_{k}") for k in ("r", "f", "psi", "y")}
    rr, df, dp = load("rec_r"), load("rec_f"), load("rec_psi")
    # untimed set-up, as on the sunlag side: the model and the two sunspot mappings
    beta0, cov0, rho0, sd0, _, _ = calibrate(cal["f"], cal["psi"], cal["y"], folds=0)
    A = np.column_stack([np.ones_like(cal["r"]), cal["r"]])
    iAA = np.linalg.inv(A.T @ A)

    def mapping(v):
        c = np.linalg.lstsq(A, v, rcond=None)[0]
        return c, np.sum((v - A @ c) ** 2) / (len(v) - 2) * iAA

    mapF, mapP = mapping(cal["f"]), mapping(cal["psi"])
    sd_b, rho_b = 0.3, 0.9
    miss_f, miss_p = np.isnan(df), np.isnan(dp)

    def reconstruct(beta, cov):
        def mapped(mp):
            c, S = mp
            return c[0] + c[1] * rr, S[0, 0] + 2 * rr * S[0, 1] + rr * rr * S[1, 1]

        vf, pf = mapped(mapF)
        vp, pp = mapped(mapP)
        f = np.where(miss_f, vf, df)
        p = np.where(miss_p, vp, dp)
        X = np.column_stack([np.ones_like(f), f - 0.15, -1360.8 * p])
        yhat = X @ beta
        q = ((X @ cov) * X).sum(axis=1)
        # first order (delta method), as sunlag's error model since reconstructions v5
        mv = np.where(miss_f, beta[1] ** 2 * pf, 0.0)
        mv += np.where(miss_p, beta[2] ** 2 * 1360.8**2 * pp, 0.0)
        rv = np.where(miss_f | miss_p, sd_b**2, sd0**2)  # one-day cells: AR(1) factor 1
        s = np.sqrt(q + mv + rv)
        return yhat, s, yhat - 1.96 * s, yhat + 1.96 * s

    def run():
        beta, cov, rho, _, cv, _ = calibrate(cal["f"], cal["psi"], cal["y"])
        yhat, s, _, _ = reconstruct(beta0, cov0)
        return {"coefficients": beta.tolist(), "rho": float(rho), "cv_rmse": float(cv),
                "mean_value": float(yhat.mean()), "mean_sd": float(s.mean())}

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
