"""The ensemble draw of test/bench/ensemble_medians.ts, vectorised in numpy as a researcher
would write it: 1,000 members of a daily reconstruction 1700-01-01..2025-12-31 (119,069 days;
proxies observed from 1978-01-01, day 101,537; mapped from a daily sunspot number before),
drawn in chunks of 25 members and streamed into per-day sums (the whole ensemble would be
950 MB).

Per chunk: calibration coefficients beta = beta_hat + L z (Cholesky factor, matmul through
OpenBLAS), mapping parameters likewise; the sunspot number's correlated scale error (an AR(1)
with lag-1 exp(-1/(365.2425*20)) per day, scaled by 5-40 % of R by era) and independent
Poisson-like error; the AR(1) residual processes of the direct (sd 0.15, rho 0.7) and
back-extended (sd 0.3, rho 0.9) models with scipy.signal.lfilter, started in their stationary
state; TSI = X @ beta (+ mapped proxies) + residual.

Run: /usr/bin/python3 test/bench/ensemble_numpy.py [repeats]
Prints the median and minimum wall time of the repeats and the peak resident memory.
"""
import os
import resource
import sys
import time

import numpy as np
import scipy
from scipy.signal import lfilter

DAYS, FIRST_DIRECT, MEMBERS, CHUNK = 119_069, 101_537, 1000, 25
YEAR = 365.2425
# the eras of core/irradiance/sunspot_number_uncertainty.ts: (from, relative scale SD, alpha)
ERAS = [(-np.inf, 0.4, 6), (1749, 0.25, 4), (1818, 0.15, 2), (1849, 0.1, 1.5), (1947, 0.07, 1),
        (1981, 0.05, 1)]


def case(rng):
    t = 1700 + (np.arange(DAYS) + 0.5) / YEAR
    r = np.maximum(0, 100 * (1 + np.sin(2 * np.pi * (t - 1700) / 11)) + 20 * rng.standard_normal(DAYS))
    f = 0.15 + 6.5e-5 * r + 2e-4 * rng.standard_normal(DAYS)
    psi = np.maximum(0, 2.5e-6 * r * (1 + 0.5 * rng.standard_normal(DAYS)))
    s = np.zeros(DAYS)
    a = np.zeros(DAYS)
    for start, rel, alpha in ERAS:
        s[t >= start] = rel
        a[t >= start] = alpha
    cal = slice(FIRST_DIRECT, None)
    maps = []
    for y in (f, psi):
        X = np.column_stack([np.ones(DAYS - FIRST_DIRECT), r[cal]])
        c, *_ = np.linalg.lstsq(X, y[cal], rcond=None)
        res = y[cal] - X @ c
        s2 = res @ res / (len(res) - 2)
        maps.append((c, np.linalg.cholesky(s2 * np.linalg.inv(X.T @ X))))
    return dict(r=r, f=f, psi=psi, sd_corr=s * r, sd_ind=a * np.sqrt(r), maps=maps)


BETA = np.array([1360.8, 135, 0.96])
L_BETA = np.linalg.cholesky(np.array([[1e-4, 1e-4, 0], [1e-4, 4, 1e-3], [0, 1e-3, 4e-4]]))


def ar1(z, rho):
    """Unit-variance AR(1) along axis 1, started in its stationary state (y0 = z0)."""
    b = np.sqrt(1 - rho * rho)
    y, _ = lfilter([b], [1, -rho], z, axis=1, zi=(1 - b) * z[:, :1])
    return y


def chunk(c, rng, m):
    nb, nd = FIRST_DIRECT, DAYS - FIRST_DIRECT
    beta = BETA[:, None] + L_BETA @ rng.standard_normal((3, m))  # 3 x m
    cs = [ch[0][:, None] + ch[1] @ rng.standard_normal((2, m)) for ch in c["maps"]]
    rc = np.exp(-1 / (YEAR * 20))
    rm = (c["r"][:nb] + c["sd_corr"][:nb] * ar1(rng.standard_normal((m, nb)), rc)
          + c["sd_ind"][:nb] * rng.standard_normal((m, nb)))
    np.maximum(rm, 0, out=rm)
    fb = cs[0][0][:, None] + cs[0][1][:, None] * rm
    pb = cs[1][0][:, None] + cs[1][1][:, None] * rm
    back = (beta[0][:, None] + beta[1][:, None] * (fb - 0.15) - beta[2][:, None] * 1360.8 * pb
            + 0.3 * ar1(rng.standard_normal((m, nb)), 0.9))
    X = np.column_stack([np.ones(nd), c["f"][nb:] - 0.15, -1360.8 * c["psi"][nb:]])
    direct = (X @ beta).T + 0.15 * ar1(rng.standard_normal((m, nd)), 0.7)
    return np.concatenate([back, direct], axis=1)


def run(c, seed):
    rng = np.random.default_rng(seed)
    total = np.zeros(DAYS)
    sq = np.zeros(DAYS)
    t0 = time.perf_counter()
    for _ in range(0, MEMBERS, CHUNK):
        x = chunk(c, rng, CHUNK)
        total += x.sum(axis=0)
        sq += (x * x).sum(axis=0)
    ms = (time.perf_counter() - t0) * 1000
    i = 18_262  # 1750-01-01
    mean = total[i] / MEMBERS
    return ms, np.sqrt((sq[i] - MEMBERS * mean * mean) / (MEMBERS - 1))


def main():
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    c = case(np.random.default_rng(2025))
    times = []
    for k in range(repeats):
        ms, sd = run(c, k)
        times.append(ms)
    times.sort()
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    blas = os.path.realpath("/usr/lib/x86_64-linux-gnu/libblas.so.3")  # Debian's alternative
    print(f"numpy {np.__version__} (BLAS {blas}), scipy {scipy.__version__}: {MEMBERS} members x "
          f"{DAYS} days, chunks of {CHUNK}")
    print(f"numpy: median {times[len(times) // 2] / 1000:.2f} s, min {times[0] / 1000:.2f} s, "
          f"peak RSS {peak:.0f} MiB, SD on 1750-01-01 {sd:.4f} W m-2")


if __name__ == "__main__":
    main()
