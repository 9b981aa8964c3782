"""Side-by-side peer of test/bench/field_run.ts: the same field-significance test written the
way a researcher would in numpy/scipy (vectorised, matrix products through numpy's BLAS,
OpenBLAS on Debian), on the same numbers (written by field_medians.ts with field_case.ts).

Work (the same as sunlag's): remove each series' mean; for lags k = 0..24 the overlap pairs
(x_t, y_{t+k}); per cell and lag Pearson r, lag-1 autocorrelations of both overlap segments,
Bretherton et al. (1999) N_eff, the two-sided 5 % critical |r| from Student's t with N_eff - 2
df; area-weighted fraction of cells with |r| >= r* per lag; 1,000 phase-randomised surrogates
of the predictor (Ebisuzaki 1997: random phases on its DFT amplitudes, zero mean, real Nyquist
term sqrt(2) A cos(theta)), each correlated with every cell at every lag as one matrix product
per lag, and compared with the same critical values; p of the best-lag fraction.

Prints one JSON line: seconds for the whole test (data already in memory), per-stage seconds,
peak resident memory (ru_maxrss), the results, and the library versions with OpenBLAS's kernel.

    /usr/bin/python3 test/bench/field_numpy.py DIR [float64 | float32]

float64: numpy's default (the float32 field is converted on loading); float32: a careful
researcher's variant keeping the field and the surrogates in float32 (sgemm).
"""
import ctypes
import json
import resource
import sys
import time

import numpy as np
import scipy
import scipy.stats

d = sys.argv[1]
dtype = np.float32 if (len(sys.argv) > 2 and sys.argv[2] == "float32") else np.float64
N, G, L, M, SEED = 600, 36 * 72, 25, 1000, 17
field = np.fromfile(f"{d}/field.f32", dtype=np.float32).reshape(N, G)
x = np.fromfile(f"{d}/predictor.f64", dtype=np.float64)
w = np.fromfile(f"{d}/weights.f64", dtype=np.float64)


def openblas_core():
    for line in open("/proc/self/maps"):
        if "openblas" in line:
            lib = ctypes.CDLL(line.split()[-1])
            lib.openblas_get_corename.restype = ctypes.c_char_p
            lib.openblas_get_config.restype = ctypes.c_char_p
            return f"{lib.openblas_get_config().decode()} core {lib.openblas_get_corename().decode()}"
    return "no OpenBLAS loaded"


def r1(a, axis=0):
    a = a - a.mean(axis=axis, keepdims=True)
    if axis == 0:
        return (a[1:] * a[:-1]).sum(0) / (a * a).sum(0)
    return (a[:, 1:] * a[:, :-1]).sum(1) / (a * a).sum(1)


t0 = time.perf_counter()
Y = np.asarray(field, dtype=dtype)
Y = Y - Y.mean(axis=0)
xp = x - x.mean()
# observed map and critical values per lag
rcrit, obs_frac, Yn = [], [], []
for k in range(L):
    xs = xp[: N - k] - xp[: N - k].mean()
    ys = Y[k:] - Y[k:].mean(axis=0)
    norms = np.sqrt((ys.astype(np.float64) ** 2).sum(0))
    r = (xs @ ys) / (np.sqrt(xs @ xs) * norms)
    n = N - k
    a, b = r1(xs[:, None])[0], r1(ys)
    neff = np.minimum(n, n * (1 - a * b) / (1 + a * b))
    df = neff - 2
    tc = scipy.stats.t.ppf(0.975, df)
    rc = tc / np.sqrt(tc * tc + df)
    rcrit.append(rc)
    obs_frac.append(float(w[np.abs(r) >= rc].sum() / w.sum()))
    Yn.append((ys / norms).astype(dtype))
t1 = time.perf_counter()
# surrogates: random phases on the predictor's amplitudes
rng = np.random.default_rng(SEED)
A = np.abs(np.fft.rfft(xp))
theta = rng.uniform(0, 2 * np.pi, size=(M, len(A)))
spec = A * np.exp(1j * theta)
spec[:, 0] = 0
if N % 2 == 0:
    spec[:, -1] = np.sqrt(2) * A[-1] * np.cos(theta[:, -1])
S = np.fft.irfft(spec, n=N, axis=1)
frac = np.empty((M, L))
for k in range(L):
    Sk = S[:, : N - k] - S[:, : N - k].mean(axis=1, keepdims=True)
    Sk /= np.sqrt((Sk * Sk).sum(axis=1, keepdims=True))
    R = Sk.astype(dtype) @ Yn[k]
    frac[:, k] = (np.abs(R) >= rcrit[k]) @ w / w.sum()
best = frac.max(axis=1)
obs_best = max(obs_frac)
p = (1 + np.count_nonzero(best >= obs_best)) / (1 + M)
t2 = time.perf_counter()
print(json.dumps({
    "variant": f"numpy-{np.dtype(dtype).name}",
    "seconds": t2 - t0,
    "stages": {"map": t1 - t0, "surrogates": t2 - t1},
    "peakBytes": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024,
    "pField": p,
    "observedFraction": obs_frac,
    "observedBest": obs_best,
    "nullQ95": float(np.quantile(best, 0.95)),
    "versions": {"numpy": np.__version__, "scipy": scipy.__version__, "blas": openblas_core()},
}))
