"""Side-by-side reference for test/bench/cycles_medians.ts: the same work in numpy/scipy, written
the way a numpy user would.

- 13-month smoothing (numpy.convolve with the 13-month kernel) + cycle minima by
  scipy.signal.find_peaks on the negated series (prominence a tenth of the range, distance
  7 years = 84 months) + maxima between minima (numpy.argmax): the cycle table's work;
- scipy.signal.lombscargle on 3,600 uneven times over 5,000 periods (2 months to 100 years),
  the grid even in frequency.

Inputs come from the closed formulas of test/bench/cycles_case.ts. Prints one JSON object with
median seconds and library versions. Run: /usr/bin/python3 test/bench/cycles_numpy.py [rounds]
"""
import json
import sys
import time

import numpy as np
import scipy
from scipy.signal import find_peaks, lombscargle

rounds = int(sys.argv[1]) if len(sys.argv) > 1 else 7
M, P = 3600, 5000
i = np.arange(M, dtype=float)
cyc = 0.5 - 0.5 * np.cos(2 * np.pi * i / 131)
amp = 120 + 60 * np.sin(2 * np.pi * i / 1000)
noise = 15 * np.sin(0.7331 * i) * np.sin(1.913 * i + 0.4)
x = np.maximum(0, amp * cyc**1.5 + noise)
tu = 1700 + (i + 0.3 * np.sin(i)) / 12
f = np.linspace(1 / 100, 6, P)
w = np.array([0.5] + [1.0] * 11 + [0.5]) / 12


def table():
    s = np.convolve(x, w, mode="valid")
    rng = s.max() - s.min()
    mins, _ = find_peaks(-s, prominence=0.1 * rng, distance=84)
    maxs = [a + int(np.argmax(s[a:b])) for a, b in zip(mins[:-1], mins[1:])]
    return mins, maxs


def ls():
    return lombscargle(tu, x - x.mean(), 2 * np.pi * f, precenter=False, normalize=False)


def med(fn):
    ts = []
    for _ in range(rounds):
        t0 = time.perf_counter()
        fn()
        ts.append(time.perf_counter() - t0)
    return float(np.median(ts))


print(json.dumps({
    "numpy": np.__version__,
    "scipy": scipy.__version__,
    "rounds": rounds,
    "cycle_table_seconds": med(table),
    "lomb_scargle_seconds": med(ls),
}))
