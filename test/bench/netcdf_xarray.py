"""xarray side of test/bench/netcdf_medians.ts: the same NetCDF work, driven one operation at a
time over stdin so that sunlag's and xarray's rounds interleave on the same machine.

Data (deterministic, the same formulas as netcdf_medians.ts):
- an ensemble of MEMBERS daily series of DAYS days (realization × time, float32), with the
  ensemble mean (double), time (days since 1850-01-01, standard calendar) and time bounds;
- a (time, lat, lon) float32 field of 600 × 90 × 180.

Commands (one per line), each answered with one JSON line {"seconds": ...}:
  make_field <path>        write the field as NetCDF-4, zlib level 4, chunks (12, 90, 180)
  write <path>             write the ensemble as NetCDF-3 classic (to_netcdf)
  read <path>              xarray.open_dataset(path).load()
  read_raw <path>          the same with decode_times=False (no datetime conversion)
  versions                 library versions

Run by netcdf_medians.ts as: /usr/bin/python3 test/bench/netcdf_xarray.py MEMBERS DAYS
"""
import json
import subprocess
import sys
import time

import numpy as np
import xarray as xr

MEMBERS, DAYS = int(sys.argv[1]), int(sys.argv[2])
j = np.arange(DAYS)
k = np.arange(MEMBERS)[:, None]
ens = (1361 + 0.5 * np.sin(2 * np.pi * j / 4018) + 0.01 * k).astype(np.float32)
t0 = 3650  # 1860-01-01 is day 3652 after 1850-01-01; any start works
time_v = t0 + j + 0.5
bnds = np.stack([t0 + j, t0 + j + 1.0], axis=1)
ds = xr.Dataset(
    {
        "time_bnds": (("time", "bnds"), bnds),
        "tsi": (("time",), ens.mean(axis=0).astype(np.float64),
                {"units": "W m-2", "standard_name": "solar_irradiance", "cell_methods": "time: mean"}),
        "tsi_realizations": (("realization", "time"), ens,
                             {"units": "W m-2", "standard_name": "solar_irradiance"}),
    },
    coords={
        "time": ("time", time_v, {"units": "days since 1850-01-01 00:00:00",
                                  "calendar": "standard", "bounds": "time_bnds"}),
        "realization": ("realization", np.arange(1, MEMBERS + 1, dtype=np.int32)),
    },
    attrs={"Conventions": "CF-1.10", "title": "bench"},
)
ENC = {"time": {"_FillValue": None}, "time_bnds": {"_FillValue": None},
       "realization": {"_FillValue": None}, "tsi": {"_FillValue": np.nan},
       "tsi_realizations": {"_FillValue": np.float32(np.nan)}}


def field(path):
    nt, ny, nx = 600, 90, 180
    lat = np.linspace(-89, 89, ny)
    lon = np.arange(nx) * 2.0 + 1.0
    tt = np.arange(nt)[:, None, None]
    f = (250 + 30 * np.cos(np.deg2rad(lat))[None, :, None] + np.sin(2 * np.pi * tt / 12)
         + 0.01 * lon[None, None, :]).astype(np.float32)
    x = xr.Dataset({"tas": (("time", "lat", "lon"), f, {"units": "K"})},
                   coords={"time": ("time", np.arange(nt) * 30.0 + 15,
                                    {"units": "days since 1950-01-01", "calendar": "noleap"}),
                           "lat": ("lat", lat, {"units": "degrees_north"}),
                           "lon": ("lon", lon, {"units": "degrees_east"})})
    x.to_netcdf(path, format="NETCDF4", encoding={
        "tas": {"zlib": True, "complevel": 4, "chunksizes": (12, ny, nx), "_FillValue": np.float32(1e20)},
        "time": {"_FillValue": None}, "lat": {"_FillValue": None}, "lon": {"_FillValue": None}})


def deb(pkg):
    try:
        return subprocess.run(["dpkg-query", "-W", "-f=${Version}", pkg], capture_output=True,
                              text=True, check=True).stdout.strip()
    except Exception:  # noqa: BLE001
        return "unknown"


for line in sys.stdin:
    cmd, *rest = line.split()
    a = time.perf_counter()
    if cmd == "write":
        ds.to_netcdf(rest[0], format="NETCDF3_CLASSIC", encoding=ENC)
    elif cmd == "read":
        with xr.open_dataset(rest[0]) as x:
            x.load()
    elif cmd == "read_raw":
        with xr.open_dataset(rest[0], decode_times=False) as x:
            x.load()
    elif cmd == "make_field":
        field(rest[0])
    elif cmd == "versions":
        import netCDF4
        print(json.dumps({"python3-xarray": deb("python3-xarray"), "numpy": np.__version__,
                          "netCDF4": netCDF4.__version__, "netcdf-c": netCDF4.__netcdf4libversion__,
                          "hdf5": netCDF4.__hdf5libversion__}), flush=True)
        continue
    print(json.dumps({"seconds": time.perf_counter() - a}), flush=True)
