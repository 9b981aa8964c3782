/**
 * Map files sunlag writes (`GET /v1/runs/{id}/map?format=netcdf`) read back by Debian's
 * python3-xarray (`open_dataset`, mask-and-scale decoding on) and `ncdump -h` (netcdf-bin): the
 * same values as the run's JSON map (NaN where a cell was left out), the flag variable's
 * meanings, the coordinates with units, per-lag maps, and the run's provenance and cautions in
 * the global attributes. The CSV of cells carries the same numbers.
 *
 * Without python3-xarray or ncdump the test is skipped with a warning on a developer's
 * machine, and fails when CI is set (CI installs both).
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, uploadSeries } from "../helpers.ts";
import { gridNetcdf } from "./grid_file.ts";

const PYTHON = "/usr/bin/python3";
const NCDUMP = "/usr/bin/ncdump";

function works(cmd: string, args: string[]): boolean {
  try {
    return new Deno.Command(cmd, { args, stdout: "null", stderr: "null" }).outputSync().success;
  } catch {
    return false;
  }
}
const HAS_XARRAY = works(PYTHON, ["-c", "import xarray, netCDF4"]);
const HAS_NCDUMP = works("/bin/sh", ["-c", `test -x ${NCDUMP}`]);
const IGNORE = !(HAS_XARRAY && HAS_NCDUMP) && !Deno.env.get("CI");
if (IGNORE) {
  console.warn(
    "map_readback_test: /usr/bin/python3 with xarray/netCDF4 or /usr/bin/ncdump is absent; the " +
      "read-back check is skipped (CI installs python3-xarray and netcdf-bin)",
  );
}

const READER = `
import json, math, sys, warnings
import numpy as np, xarray as xr
warnings.simplefilter("error", xr.SerializationWarning)
with xr.open_dataset(sys.argv[1]) as ds:
    def conv(a):
        return [None if (isinstance(x, float) and math.isnan(x)) else x for x in np.asarray(a).ravel().tolist()]
    print(json.dumps({
        "dims": {k: int(v) for k, v in ds.sizes.items()},
        "vars": {k: {"dims": list(v.dims), "dtype": str(v.dtype), "values": conv(v.values),
                     "attrs": {a: (str(x) if isinstance(x, str) else np.ravel(x).tolist())
                               for a, x in v.attrs.items()}}
                 for k, v in ds.variables.items()},
        "attrs": {k: str(v) for k, v in ds.attrs.items()},
    }))
`;

Deno.test({
  name: "map NetCDF files open in xarray with the run's values and pass ncdump -h",
  ignore: IGNORE,
  async fn() {
    const svc = await makeTestApp();
    const dir = await Deno.makeTempDir();
    try {
      const nT = 96, lat = [-60, -20, 20, 60], lon = [0, 90, 180, 270];
      const x = Array.from(
        { length: nT },
        (_, t) => Math.sin((2 * Math.PI * t) / 40) + 0.3 * Math.cos(1.7 * t),
      );
      const values: (number | null)[] = [];
      for (let t = 0; t < nT; t++) {
        for (let c = 0; c < 16; c++) {
          values.push(c === 5 ? null : 0.5 * (c < 4 ? x[t] : 0) + Math.sin(0.9 * t + c));
        }
      }
      const up = await svc.app.request("/v1/fields?quantity=temperature_anomaly", {
        method: "POST",
        headers: { "content-type": "application/x-netcdf" },
        body: gridNetcdf({ startYear: 2001, nTime: nT, lat, lon, values }),
      });
      const field = (await up.json()).field.id;
      const solar = await uploadSeries(
        svc,
        monthlySeries("p", "tsi", "W m-2", 2001, nT, (t) => 1361 + x[t]),
      );
      const res = await svc.post("/v1/solar-signal-maps", {
        field,
        solar,
        max_lag: 3,
        surrogates: 99,
        keep_lag_maps: true,
      });
      const run = await res.json();
      assert.equal(res.status, 201, JSON.stringify(run).slice(0, 500));
      const nc = await svc.get(`/v1/runs/${run.id}/map?format=netcdf`);
      assert.equal(nc.status, 200);
      assert.equal(nc.headers.get("content-type"), "application/x-netcdf");
      const path = `${dir}/map.nc`;
      await Deno.writeFile(path, new Uint8Array(await nc.arrayBuffer()));
      // byte-stable: the same map twice is the same file
      const again = new Uint8Array(
        await (await svc.get(`/v1/runs/${run.id}/map?format=netcdf`)).arrayBuffer(),
      );
      assert.deepEqual(again, await Deno.readFile(path));

      const dump = new Deno.Command(NCDUMP, { args: ["-h", path] }).outputSync();
      assert.ok(dump.success, new TextDecoder().decode(dump.stderr));
      const header = new TextDecoder().decode(dump.stdout);
      assert.match(header, /double slope\(lat, lon\)/);
      assert.match(header, /byte significant\(lat, lon\)/);
      assert.match(header, /double r_lag\(lag, lat, lon\)/);
      assert.match(header, /:Conventions = "CF-1.10"/);

      const py = new Deno.Command(PYTHON, { args: ["-c", READER, path] }).outputSync();
      assert.ok(py.success, new TextDecoder().decode(py.stderr));
      const ds = JSON.parse(new TextDecoder().decode(py.stdout));
      const map = run.result.map;
      assert.deepEqual(ds.dims, { lag: 4, lat: 4, lon: 4 });
      assert.deepEqual(ds.vars.lat.values, lat);
      assert.equal(ds.vars.lat.attrs.units, "degrees_north");
      assert.equal(ds.vars.lon.attrs.standard_name, "longitude");
      for (const v of map.variables) {
        const got = ds.vars[v.name];
        assert.ok(got, `${v.name} in the file`);
        assert.deepEqual(got.dims, ["lat", "lon"]);
        assert.equal(got.attrs.units ?? "1", v.units, `${v.name} units`);
        // xarray masks the fill values: NaN (floats), −2147483647 (ints) and −127 (flags)
        assert.deepEqual(got.values, v.values, `${v.name} values`);
      }
      assert.deepEqual(ds.vars.significant.attrs.flag_values, [0, 1]);
      assert.deepEqual(ds.vars.r_lag.values, run.result.lag_maps.r.flat());
      assert.equal(ds.attrs.run_id, run.id);
      assert.equal(ds.attrs.result_digest, `sha256:${run.result_digest}`);
      assert.match(ds.attrs.cautions, /A map has many cells/);
      assert.match(ds.attrs.cautions, /Correlation is not attribution/);
      assert.match(ds.attrs.field_significance, /"fdr"/);

      // the CSV of cells carries the same numbers
      const csv = await (await svc.get(`/v1/runs/${run.id}/map?format=csv`)).text();
      const rows = csv.split("\n").filter((l) => l && !l.startsWith("#"));
      const head = rows[0].split(",");
      const slope = map.variables.find((v: { name: string }) => v.name === "slope").values;
      rows.slice(1).forEach((row, c) => {
        const cell = row.split(",")[head.indexOf("slope")];
        assert.equal(cell === "" ? null : Number(cell), slope[c], `slope of cell ${c} in CSV`);
      });
      assert.match(csv, /# caution: A map has many cells/);
    } finally {
      await Deno.remove(dir, { recursive: true });
      await svc.close();
    }
  },
});
