/**
 * Files sunlag writes, read back by the tools climate researchers use: Debian's python3-xarray
 * (`open_dataset(..., use_cftime=True)`, which decodes CF time through cftime) and `ncdump -h`
 * (Debian netcdf-bin). Values, times, bounds and attributes must come back as written, on every
 * calendar, for series, run outputs and an ensemble (realization × time).
 *
 * Without python3-xarray or ncdump the tests are skipped with a warning on a developer's
 * machine, and fail when CI is set (CI installs both).
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, uploadSeries } from "../helpers.ts";
import { putFinishedRun } from "../run_fixture.ts";
import { buildSeriesDataset } from "../../../api/netcdf/series_dataset.ts";
import { encodeNetcdf3, netcdf3Chunks } from "../../../core/cf/mod.ts";
import { cfDateFromDayNumber, cfDayNumber, decimalYear } from "../../../core/time/mod.ts";

const PYTHON = "/usr/bin/python3";
const NCDUMP = "/usr/bin/ncdump";

function works(cmd: string, args: string[]): boolean {
  try {
    return new Deno.Command(cmd, { args, stdout: "null", stderr: "null" }).outputSync().success;
  } catch {
    return false;
  }
}
const HAS_XARRAY = works(PYTHON, ["-c", "import xarray, netCDF4, cftime"]);
const HAS_NCDUMP = works("/bin/sh", ["-c", `test -x ${NCDUMP}`]);
const IGNORE = !(HAS_XARRAY && HAS_NCDUMP) && !Deno.env.get("CI");
if (IGNORE) {
  console.warn(
    "xarray_readback_test: /usr/bin/python3 with xarray/netCDF4/cftime or /usr/bin/ncdump is " +
      "absent; the read-back checks are skipped (CI installs python3-xarray and netcdf-bin)",
  );
}

const READER = `
import json, math, sys, warnings
import numpy as np, xarray as xr, netCDF4
warnings.simplefilter("error", xr.SerializationWarning)  # a decoding warning is a failure
out = {}
for path in sys.argv[1:]:
    with xr.open_dataset(path, use_cftime=True) as ds:
        def conv(a):
            a = np.asarray(a)
            if a.dtype == object:
                return [[d.year, d.month, d.day, d.hour, d.minute, d.second] for d in a.ravel()]
            return [None if (isinstance(x, float) and math.isnan(x)) else x for x in a.ravel().tolist()]
        out[path] = {
            "dims": {k: int(v) for k, v in ds.sizes.items()},
            "calendar": ds.time.encoding.get("calendar"),
            "vars": {k: {"dims": list(v.dims), "dtype": str(v.dtype), "values": conv(v.values),
                         "attrs": {a: (str(x) if isinstance(x, str) else float(np.ravel(x)[0]))
                                   for a, x in v.attrs.items()}}
                     for k, v in ds.variables.items()},
            "attrs": {k: str(v) for k, v in ds.attrs.items()},
        }
print(json.dumps(out))
`;

interface Read {
  dims: Record<string, number>;
  calendar: string;
  vars: Record<
    string,
    { dims: string[]; dtype: string; values: unknown[]; attrs: Record<string, unknown> }
  >;
  attrs: Record<string, string>;
}

async function readBack(files: Record<string, Uint8Array>): Promise<Record<string, Read>> {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-nc-" });
  try {
    const paths: Record<string, string> = {};
    for (const [k, b] of Object.entries(files)) {
      paths[k] = `${dir}/${k}.nc`;
      await Deno.writeFile(paths[k], b);
      const d = await new Deno.Command(NCDUMP, { args: ["-h", paths[k]] }).output();
      assert.ok(d.success, `ncdump -h ${k}: ${new TextDecoder().decode(d.stderr)}`);
      assert.match(new TextDecoder().decode(d.stdout), /:Conventions = "CF-1\.10"/);
    }
    const out = await new Deno.Command(PYTHON, { args: ["-c", READER, ...Object.values(paths)] })
      .output();
    const err = new TextDecoder().decode(out.stderr);
    assert.ok(out.success, `xarray failed: ${err}`);
    const raw = JSON.parse(new TextDecoder().decode(out.stdout));
    const byKey: Record<string, Read> = {};
    for (const [k, p] of Object.entries(paths)) byKey[k] = raw[p];
    return byKey;
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
}

const MONTHS = 30;
const value = (i: number) => (i === 7 ? null : 1360.5 + 0.03 * i);
const sigma = (i: number) => 0.2 + 0.01 * i;

Deno.test({
  name:
    "series files on every calendar open in xarray with the same values, times, bounds and attributes",
  ignore: IGNORE,
  async fn() {
    const svc = await makeTestApp();
    try {
      const id = await uploadSeries(
        svc,
        monthlySeries("TSI (synthetic)", "tsi", "W m-2", 1999, MONTHS, value, {
          uncertainty: Array.from({ length: MONTHS }, (_, i) => sigma(i)),
        }),
      );
      const cals = [
        "standard",
        "gregorian",
        "proleptic_gregorian",
        "noleap",
        "365_day",
        "all_leap",
        "366_day",
        "360_day",
        "julian",
      ];
      const files: Record<string, Uint8Array> = {};
      for (const cal of cals) {
        const res = await svc.get(`/v1/series/${id}?format=netcdf&calendar=${cal}`);
        assert.equal(res.status, 200);
        files[cal] = new Uint8Array(await res.arrayBuffer());
      }
      const read = await readBack(files);
      for (const cal of cals) {
        const r = read[cal];
        const kept = Array.from({ length: MONTHS }, (_, i) => i).filter((i) => value(i) !== null);
        assert.equal(r.dims.time, kept.length, cal);
        assert.deepEqual(r.vars.tsi.values, kept.map(value), cal);
        assert.deepEqual(r.vars.tsi_uncertainty.values, kept.map(sigma), cal);
        assert.equal(r.vars.tsi.attrs.standard_name, "solar_irradiance");
        assert.equal(r.vars.tsi.attrs.units, "W m-2");
        assert.equal(r.vars.tsi.attrs.cell_methods, "time: mean");
        assert.equal(r.vars.tsi.attrs.ancillary_variables, "tsi_uncertainty");
        assert.equal(r.vars.tsi_uncertainty.attrs.standard_name, "solar_irradiance standard_error");
        assert.equal(r.attrs.Conventions, "CF-1.10");
        assert.equal(r.attrs.series_id, id);
        assert.match(r.attrs.source, /^sunlag /);
        const bounds = r.vars.time_bnds.values as number[][];
        const times = r.vars.time.values as number[][];
        kept.forEach((i, k) => {
          const y = 1999 + Math.floor(i / 12), m = (i % 12) + 1;
          if (cal === "julian") {
            // The same days as Gregorian month m: its first day, in Julian dates 13 days earlier.
            const g = cfDayNumber("proleptic_gregorian", y, m, 1);
            const j = cfDateFromDayNumber("julian", g);
            assert.deepEqual(bounds[2 * k], [j.year, j.month, j.day, 0, 0, 0], `${cal} ${y}-${m}`);
          } else {
            // Every other calendar: the bounds are the first of the month and of the next.
            assert.deepEqual(bounds[2 * k], [y, m, 1, 0, 0, 0], `${cal} ${y}-${m}`);
            assert.deepEqual(bounds[2 * k + 1], [
              m === 12 ? y + 1 : y,
              m === 12 ? 1 : m + 1,
              1,
              0,
              0,
              0,
            ]);
            assert.equal(times[k][1], m, `${cal}: time in month ${m}`);
          }
        });
      }
      // The calendar attribute as xarray reports it (aliases kept as their canonical names).
      assert.equal(read["365_day"].calendar, "noleap");
      assert.equal(read["360_day"].vars.time.values.length, MONTHS - 1);
    } finally {
      await svc.close();
    }
  },
});

Deno.test({
  name: "run outputs and an ensemble (realization × time) open in xarray; bytes are stable",
  ignore: IGNORE,
  async fn() {
    const svc = await makeTestApp();
    try {
      const time = Array.from({ length: 10 }, (_, i) => {
        const c = cfDateFromDayNumber(
          "proleptic_gregorian",
          cfDayNumber("proleptic_gregorian", 2000, 2, 24) + i,
        );
        return decimalYear(c.year, c.month, c.day, 0.5);
      });
      const run = await putFinishedRun(svc.store, "irradiance_reconstructions", {
        outputs: {
          tsi: {
            name: "Reconstructed TSI (synthetic)",
            quantity: "tsi",
            units: "W m-2",
            time,
            value: time.map((_, i) => 1361 + i / 10),
            lower: time.map((_, i) => 1360.8 + i / 10),
            upper: time.map((_, i) => 1361.2 + i / 10),
            interval: "95 % interval",
          },
        },
        warnings: ["Before 1976 the reconstruction rests on sunspot numbers only."],
        cautions: ["Reconstructions before the satellite era are model-dependent."],
      });
      const files: Record<string, Uint8Array> = {};
      for (const cal of ["standard", "noleap", "all_leap"]) {
        const res = await svc.get(`/v1/runs/${run.id}/outputs/tsi?format=netcdf&calendar=${cal}`);
        assert.equal(res.status, 200);
        files[`run_${cal}`] = new Uint8Array(await res.arrayBuffer());
      }
      // An ensemble as the ensemble runs will write it: members streamed row by row.
      const members = 5;
      const built = buildSeriesDataset(
        {
          name: "TSI ensemble (synthetic)",
          quantity: "tsi",
          units: "W m-2",
          time,
          value: time.map(() => 1361),
        },
        { title: "ensemble", history: ["test"], references: ["test"], warnings: [], cautions: [] },
        {
          calendar: "noleap",
          ensemble: { members, member: (k) => time.map((_, j) => 1361 + k * 0.01 + j * 0.001) },
        },
      );
      files.ensemble = encodeNetcdf3(built.dataset);
      const chunks = [...netcdf3Chunks(built.dataset)];
      assert.ok(chunks.length >= members, "members are written one at a time");
      const read = await readBack(files);
      const std = read.run_standard;
      assert.equal(std.attrs.run_id, run.id);
      assert.equal(std.attrs.result_digest, `sha256:${run.result_digest}`);
      assert.equal(
        std.attrs.warnings,
        "Before 1976 the reconstruction rests on sunspot numbers only.",
      );
      assert.equal(
        std.attrs.cautions,
        "Reconstructions before the satellite era are model-dependent.",
      );
      assert.match(std.attrs.comment, /Correlation is not attribution/);
      assert.equal(std.vars.tsi.attrs.ancillary_variables, "tsi_lower tsi_upper");
      assert.deepEqual(std.vars.tsi_upper.values, time.map((_, i) => 1361.2 + i / 10));
      assert.equal(std.dims.time, 10);
      assert.deepEqual((std.vars.time.values as number[][])[5], [2000, 2, 29, 12, 0, 0]);
      assert.equal(read.run_noleap.dims.time, 9); // 29 February dropped
      assert.match(read.run_noleap.attrs.calendar_conversion, /29 February were dropped/);
      assert.equal(read.run_all_leap.dims.time, 10);
      const e = read.ensemble.vars.tsi_realizations;
      assert.deepEqual(e.dims, ["realization", "time"]);
      assert.equal(e.dtype, "float32");
      assert.equal(read.ensemble.dims.realization, members);
      assert.deepEqual(read.ensemble.vars.realization.values, [1, 2, 3, 4, 5]);
      assert.equal(read.ensemble.vars.realization.attrs.standard_name, "realization");
      const v = e.values as number[];
      assert.equal(v.length, members * 9);
      assert.ok(Math.abs(v[2 * 9 + 0] - Math.fround(1361 + 0.02)) < 1e-9);
      // Byte-stable: the same request gives the same file.
      const again = new Uint8Array(
        await (await svc.get(`/v1/runs/${run.id}/outputs/tsi?format=netcdf&calendar=noleap`))
          .arrayBuffer(),
      );
      assert.deepEqual(again, files.run_noleap);
    } finally {
      await svc.close();
    }
  },
});
