"""Side-by-side for test/bench/ingest_bench.ts: pandas reads the same 150,000-row daily CSV
and converts dates to decimal years (proleptic Gregorian, noon of each day).

Run: /usr/bin/python3 test/bench/ingest_numpy.py
Prints the median of 15 runs in milliseconds.
"""
import io
import math
import statistics
import time

import numpy as np
import pandas as pd

ROWS = 150_000
t0 = pd.Timestamp("1700-01-01")
days = pd.date_range(t0, periods=ROWS, freq="D")
i = np.arange(ROWS)
v = 1360.5 + 0.5 * np.sin(2 * math.pi * i / 4018) + 0.1 * np.sin(i * 0.37)
text = "date,value,sigma\n" + "\n".join(
    f"{d},{x:.4f},0.05" for d, x in zip(days.strftime("%Y-%m-%d"), v)) + "\n"


def ingest():
    df = pd.read_csv(io.StringIO(text), comment="#")
    t = pd.to_datetime(df["date"], format="%Y-%m-%d")
    y = t.dt.year.to_numpy()
    leap = ((y % 4 == 0) & (y % 100 != 0)) | (y % 400 == 0)
    dec = y + (t.dt.dayofyear.to_numpy() - 0.5) / np.where(leap, 366, 365)
    return dec, df["value"].to_numpy(), df["sigma"].to_numpy()


times = []
for _ in range(15):
    a = time.perf_counter()
    ingest()
    times.append((time.perf_counter() - a) * 1000)
print(f"pandas {pd.__version__} read_csv + decimal years, 150,000 rows: "
      f"median {statistics.median(times):.1f} ms")
