"""The peer of field_upload_run.ts: xarray's open_dataset(...).load() of the same NetCDF-4 file
(CF decoding on, as a researcher opens a file), timed, with the process's peak resident memory.
Prints one JSON line. Debian python3-xarray / python3-netcdf4.

Run: /usr/bin/python3 test/bench/field_upload_xarray.py FILE
"""
import json
import resource
import subprocess
import sys
import time

import xarray as xr

r0 = resource.getrusage(resource.RUSAGE_SELF)
t0 = time.perf_counter()
with xr.open_dataset(sys.argv[1], use_cftime=True) as ds:
    ds.load()
    n = int(ds.tas.size)
seconds = time.perf_counter() - t0
r1 = resource.getrusage(resource.RUSAGE_SELF)
cpu = (r1.ru_utime - r0.ru_utime) + (r1.ru_stime - r0.ru_stime)
version = subprocess.run(["dpkg-query", "-W", "-f=${Version}", "python3-xarray"],
                         capture_output=True, text=True).stdout.strip()
print(json.dumps({"seconds": seconds, "cpuSeconds": cpu, "peakBytes": r1.ru_maxrss * 1024,
                  "values": n, "xarray": version}))
