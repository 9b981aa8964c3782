"""Side-by-side reference for test/bench/climate_medians.ts: the same surrogate test in numpy
and in scipy.fft, written the way a numpy user would (batches of surrogates, zero-padded FFT
cross-correlation, cumulative sums for the overlap means and variances).

Work: two 4,096-month series (AR(1) data, fixed seed), linear detrend of both and of every
surrogate, lags -120..120, Pearson r over the overlap at each lag, 10,000 phase-randomised
surrogates of the first series (Ebisuzaki 1997: random phases on the fixed amplitudes, zero
mean, real Nyquist term sqrt(2) A cos(theta)), per-lag exceedance counts and each surrogate's
max |r| over the window.

Variants:
- numpy:  numpy.fft, irfft to make the surrogate, rfft/irfft of length 8192 for the
  cross-correlation (the idiomatic zero-padded correlation);
- scipy:  the same with scipy.fft, next_fast_len padding and workers=-1 (all cores);
- numpy_packed: the algorithm sunlag uses, in numpy: one complex inverse FFT of length 4096 of
  S + i conj(S) Y gives the surrogate and its circular cross-correlation; the wrapped pairs are
  removed with two small matrix products.

Prints one JSON object with the median seconds for 10,000 surrogates per variant and the
library versions. Run: /usr/bin/python3 test/bench/climate_numpy.py [rounds] [variant]
(variant numpy, scipy or numpy_packed: time only that one; default all three).
"""
import json
import sys
import time

import numpy as np
import scipy
import scipy.fft

N, L, M, B = 4096, 120, 10_000, 500
rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 3
only = sys.argv[2] if len(sys.argv) > 2 else None

rng0 = np.random.default_rng(101)


def ar1(n, phi, rng):
    e = rng.standard_normal(n) * np.sqrt(1 - phi * phi)
    x = np.empty(n)
    x[0] = rng.standard_normal()
    for t in range(1, n):
        x[t] = phi * x[t - 1] + e[t]
    return x


t_idx = np.arange(N, dtype=float)
basis, _ = np.linalg.qr(np.column_stack([np.ones(N), t_idx - t_idx.mean()]))
x = ar1(N, 0.95, rng0) + np.sin(2 * np.pi * t_idx / 132)
y = ar1(N, 0.6, rng0)
x -= basis @ (basis.T @ x)
y -= basis @ (basis.T @ y)
lags = np.arange(-L, L + 1)
a = np.where(lags >= 0, 0, -lags)
b = np.where(lags >= 0, N - lags, N)
m = b - a
cy1 = np.concatenate([[0.0], np.cumsum(y)])
cy2 = np.concatenate([[0.0], np.cumsum(y * y)])
ysum = cy1[b + lags] - cy1[a + lags]
yvar = (cy2[b + lags] - cy2[a + lags]) - ysum ** 2 / m


def observed():
    r = np.empty(len(lags))
    for j, k in enumerate(lags):
        xs, ys = x[a[j]:b[j]], y[a[j] + k:b[j] + k]
        r[j] = np.corrcoef(xs, ys)[0, 1]
    return np.abs(r)


obs = observed()
h = N // 2 + 1


def stats(s, sxy, exceed, maxabs):
    p1 = np.concatenate([np.zeros((s.shape[0], 1)), np.cumsum(s, axis=1)], axis=1)
    p2 = np.concatenate([np.zeros((s.shape[0], 1)), np.cumsum(s * s, axis=1)], axis=1)
    s1 = p1[:, b] - p1[:, a]
    s2 = p2[:, b] - p2[:, a]
    r = (sxy - s1 * ysum / m) / np.sqrt((s2 - s1 * s1 / m) * yvar)
    ar = np.abs(r)
    exceed += (ar >= obs - 1e-12).sum(axis=0)
    maxabs.append(ar.max(axis=1))


def spectra(rng, amp):
    th = rng.uniform(0, 2 * np.pi, (B, h))
    S = amp * np.exp(1j * th)
    S[:, 0] = 0
    S[:, -1] = np.sqrt(2) * amp[-1] * np.cos(th[:, -1])
    return S


def padded(fft, pad, workers):
    kw = {} if workers is None else {"workers": workers}
    amp = np.abs(fft.rfft(x, **kw))
    Y = fft.rfft(y, pad, **kw)
    rng = np.random.default_rng(7)
    exceed = np.zeros(len(lags))
    maxabs = []
    for _ in range(M // B):
        s = fft.irfft(spectra(rng, amp), N, axis=1, **kw)
        s -= (s @ basis) @ basis.T
        Fs = fft.rfft(s, pad, axis=1, **kw)
        c = fft.irfft(np.conj(Fs) * Y, pad, axis=1, **kw)
        stats(s, c[:, lags % pad], exceed, maxabs)
    return exceed, np.concatenate(maxabs)


# wrapped pairs of the circular correlation at lag k > 0: sum_{j<k} s[N-k+j] y[j];
# at lag -k: sum_{j<k} s[j] y[N-k+j]. As matrices over the last/first L samples of s.
Wpos = np.zeros((L, L))  # rows: tail index u = N-L+q, columns: lag k = 1..L
Wneg = np.zeros((L, L))
for k in range(1, L + 1):
    for j in range(k):
        Wpos[L - k + j, k - 1] = y[j]
        Wneg[j, k - 1] = y[N - k + j]


def packed():
    X = np.fft.fft(x)
    amp = np.abs(X[:h])
    Y = np.fft.fft(y)
    rng = np.random.default_rng(7)
    exceed = np.zeros(len(lags))
    maxabs = []
    f = np.arange(1, h - 1)
    for _ in range(M // B):
        S = spectra(rng, amp)
        Z = np.zeros((B, N), dtype=complex)
        Z[:, :h] = S
        Z[:, h:] = np.conj(S[:, 1:h - 1][:, ::-1])
        Z += 1j * np.conj(Z) * Y
        z = np.fft.ifft(Z, axis=1)
        s, c = z.real.copy(), z.imag
        sxy = c[:, lags % N]
        sxy[:, L + 1:] -= s[:, N - L:] @ Wpos
        sxy[:, :L] -= (s[:, :L] @ Wneg)[:, ::-1]
        coef = s @ basis
        s -= coef @ basis.T
        # projection share of the overlap sums: sum_ov b_q(t) y_{t+k}
        stats(s, sxy - coef @ G, exceed, maxabs)
    return exceed, np.concatenate(maxabs)


G = np.zeros((2, len(lags)))
for j, k in enumerate(lags):
    G[:, j] = basis[a[j]:b[j]].T @ y[a[j] + k:b[j] + k]


def median_time(fn):
    ts = []
    for _ in range(rounds):
        t0 = time.perf_counter()
        res = fn()
        ts.append(time.perf_counter() - t0)
    return float(np.median(ts)), res


out = {"versions": {"python": sys.version.split()[0], "numpy": np.__version__,
                    "scipy": scipy.__version__}, "rounds": rounds, "surrogates": M}
variants = {
    "numpy": lambda: padded(np.fft, 8192, None),
    "scipy": lambda: padded(scipy.fft, scipy.fft.next_fast_len(N + L), -1),
    "numpy_packed": packed,
}
fam = lambda r: float((1 + (r[1] >= obs.max() - 1e-12).sum()) / (1 + M))
results = {}
for name, fn in variants.items():
    if only is not None and name != only:
        continue
    t, res = median_time(fn)
    out[f"{name}_seconds"] = t
    results[name] = res
# the variants agree with each other (same random phases): family-wise p
out["p_family_wise"] = {k: fam(v) for k, v in results.items()}
if "numpy" in results and "numpy_packed" in results:
    out["max_abs_difference_numpy_vs_packed"] = float(
        np.abs(results["numpy"][1] - results["numpy_packed"][1]).max())
print(json.dumps(out))
