"""Write the field-upload benchmark file: a 1 degree monthly field of 50 years (600 x 180 x 360
float32, 155.5 MB of values) as NetCDF-4/HDF5, zlib level 4, chunked one month per chunk, on the
noleap calendar -- the kind of file a model archive serves. Invented values (smooth patterns,
a seasonal cycle and noise rounded to 0.01 K), numpy's PCG64 with a fixed seed.

Run: /usr/bin/python3 test/bench/field_upload_make.py test/output/field_upload/field150.nc
"""
import sys

import netCDF4
import numpy as np

path = sys.argv[1]
nt, ny, nx = 600, 180, 360
rng = np.random.default_rng(150)
lat = np.linspace(-89.5, 89.5, ny)
lon = np.linspace(0.5, 359.5, nx)
base = (300 - 45 * np.sin(np.deg2rad(lat)) ** 2)[:, None] + 2 * np.cos(np.deg2rad(3 * lon))[None, :]
with netCDF4.Dataset(path, "w", format="NETCDF4") as ds:
    ds.createDimension("time", nt)
    ds.createDimension("lat", ny)
    ds.createDimension("lon", nx)
    t = ds.createVariable("time", "f8", ("time",))
    t.units = "days since 1970-01-01 00:00:00"
    t.calendar = "noleap"
    t.standard_name = "time"
    cum = np.array([0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334, 365])
    k = np.arange(nt)
    t[:] = 365 * (k // 12) + (cum[k % 12] + cum[k % 12 + 1]) / 2
    la = ds.createVariable("lat", "f8", ("lat",))
    la.units = "degrees_north"
    la[:] = lat
    lo = ds.createVariable("lon", "f8", ("lon",))
    lo.units = "degrees_east"
    lo[:] = lon
    v = ds.createVariable("tas", "f4", ("time", "lat", "lon"), zlib=True, complevel=4,
                          chunksizes=(1, ny, nx))
    v.units = "K"
    v.standard_name = "air_temperature"
    season = -12 * np.sin(np.deg2rad(lat))[:, None]
    for i in range(nt):
        noise = np.round(rng.standard_normal((ny, nx)) * 0.8, 2)
        v[i, :, :] = (base + season * np.cos(2 * np.pi * ((i % 12) + 0.5) / 12) + noise).astype("f4")
print(path)
