/**
 * Reading NetCDF files that Debian's python3-netcdf4 wrote, against what xarray 2023.01 and
 * cftime 1.6.2 decode from them (fixtures/netcdf/make_reference.py → reference.json):
 * calendars day for day, packed data bit for bit, record variables, the 64-bit offset format,
 * and NetCDF-4 with zlib and chunking, whole and in blocks.
 */
import assert from "node:assert/strict";
import { openNetcdf, withNetcdf } from "../../../api/netcdf/open.ts";
import { stopNetcdf4Worker } from "../../../api/netcdf/netcdf4_source.ts";
import { placeCfTimeAxis, readCfTimeAxis } from "../../../api/netcdf/cf_time_axis.ts";
import { readCfSeries } from "../../../api/netcdf/cf_series.ts";
import { describeCfGrid, readCfGridBlocks } from "../../../api/netcdf/cf_grid.ts";
import { listCfVariables } from "../../../api/netcdf/cf_variables.ts";
import { NetcdfError } from "../../../api/netcdf/errors.ts";
import type { CfDateTime } from "../../../core/time/mod.ts";
import { calendarInstant, decimalYear, periodOfKey } from "../../../core/mod.ts";

const DIR = new URL("../../../fixtures/netcdf/", import.meta.url);
const REF = JSON.parse(await Deno.readTextFile(new URL("reference.json", DIR)));
const path = (f: string) => new URL(f, DIR).pathname;
const nulls = (xs: ArrayLike<number>) => Array.from(xs, (x) => (Number.isNaN(x) ? null : x));

function sameDate(got: CfDateTime, want: number[], label: string) {
  const [y, m, d, hh, mm, ss, us] = want;
  assert.deepEqual([got.year, got.month, got.day], [y, m, d], label);
  assert.ok(Math.abs(got.seconds - (hh * 3600 + mm * 60 + ss + us / 1e6)) < 1e-3, label);
}

Deno.test("CF time of files on every calendar agrees with xarray/cftime day for day", async () => {
  let checked = 0;
  for (const c of REF.calendars) {
    await withNetcdf(path(c.file), async (src) => {
      assert.equal(src.header.format, "netcdf3_classic");
      const day = await readCfTimeAxis(src, "day");
      assert.equal(day.dates.length, c.day.dates.length);
      day.dates.forEach((d, i) => sameDate(d, c.day.dates[i], `${c.file} day[${i}]`));
      const time = await readCfTimeAxis(src, "time");
      assert.equal(time.boundsVariable, "time_bnds");
      time.dates.forEach((d, i) => sameDate(d, c.time.dates[i], `${c.file} time[${i}]`));
      time.bounds!.forEach(([a, b], i) => {
        sameDate(a, c.time.bounds[i][0], `${c.file} time_bnds[${i}][0]`);
        sameDate(b, c.time.bounds[i][1], `${c.file} time_bnds[${i}][1]`);
      });
      checked += day.dates.length + 3 * time.dates.length;
      // The monthly means land on the same month of sunlag's axis, values as xarray decodes.
      const s = await readCfSeries(src, "monthly_value");
      assert.deepEqual(nulls(s.values), c.monthly_value);
      for (let i = 0; i < s.values.length; i++) {
        const [y, m] = c.time.bounds[i][0];
        const inst = calendarInstant(s.time.decimalYears[i]);
        if (s.time.placement === "same_month") {
          assert.equal(s.time.decimalYears[i], periodOfKey(y * 12 + m - 1, "monthly").middle);
        } else {
          assert.equal(s.time.placement, "exact", c.file);
          if (c.calendar !== "julian" && !(y < 1583)) assert.equal(inst.month, m);
        }
      }
    });
  }
  assert.ok(checked > 1500, `${checked} dates checked`);
});

Deno.test("placeCfTimeAxis(): daily noleap keeps dates; daily 360_day is refused, naming 30 February", async () => {
  await withNetcdf(path("cal_noleap.nc"), async (src) => {
    const a = placeCfTimeAxis(await readCfTimeAxis(src, "day"));
    assert.equal(a.placement, "same_date");
    assert.equal(a.decimalYears[0], decimalYear(2000, 2, 25, 0.5));
    assert.equal(a.decimalYears[4], decimalYear(2000, 3, 1, 0.5)); // noleap has no 29 February
  });
  await withNetcdf(path("cal_360_day.nc"), async (src) => {
    const axis = await readCfTimeAxis(src, "day");
    assert.throws(() => placeCfTimeAxis(axis), (e: unknown) => {
      assert.ok(e instanceof NetcdfError);
      assert.equal(e.code, "bad_coordinate");
      assert.match(e.message, /2000-02-30/);
      return true;
    });
  });
});

Deno.test("packed variables decode as xarray open_dataset decodes them", async () => {
  await withNetcdf(path("packed.nc"), async (src) => {
    for (
      const [name, v] of Object.entries(REF.packed.variables) as [
        string,
        { dtype: string; values: (number | null)[] },
      ][]
    ) {
      const s = await readCfSeries(src, name);
      assert.equal(s.decodedType, v.dtype, name);
      assert.deepEqual(nulls(s.values), v.values, name);
    }
  });
});

Deno.test("record variables and the 64-bit offset format", async () => {
  await withNetcdf(path("record.nc"), async (src) => {
    assert.equal(src.header.dimensions[0].unlimited, true);
    assert.deepEqual(nulls(await src.read("temp")), REF.record.temp);
    assert.deepEqual(nulls(await src.read("count")), REF.record.count);
    assert.deepEqual(nulls(await src.read("station_height")), REF.record.station_height);
    assert.deepEqual(nulls(await src.read("temp", 4, 3)), REF.record.temp.slice(12, 21));
    const t = await readCfTimeAxis(src, "time");
    t.dates.forEach((d, i) => sameDate(d, REF.record.time[i], `record time[${i}]`));
  });
  await withNetcdf(path("record_single.nc"), async (src) => {
    // One record variable: records are not padded to 4 bytes (NetCDF classic format spec).
    assert.deepEqual(nulls(await src.read("count")), REF.record_single.count);
    assert.deepEqual(nulls(await src.read("count", 5, 2)), REF.record_single.count.slice(5));
  });
  await withNetcdf(path("offset64.nc"), async (src) => {
    assert.equal(src.header.format, "netcdf3_64bit_offset");
    const s = await readCfSeries(src, "ssn");
    assert.deepEqual(nulls(s.values), REF.offset64.ssn);
    s.time.dates.forEach((d, i) => sameDate(d, REF.offset64.time[i], `offset64 time[${i}]`));
  });
});

Deno.test("NetCDF-4 (zlib, chunked): field, packed field, series, attributes, blocks", async () => {
  const ref = REF.field_nc4;
  try {
    await withNetcdf(path("field_nc4.nc"), async (src) => {
      assert.equal(src.header.format, "netcdf4");
      const title = src.header.attributes.find((a) => a.name === "title");
      assert.equal(title?.value, ref.title);
      assert.equal(src.header.attributes.find((a) => a.name === "comment")?.value, ref.comment);
      const list = listCfVariables(src.header);
      assert.deepEqual(list.find((v) => v.name === "tas")?.dimensions, ["time", "lat", "lon"]);
      assert.equal(list.find((v) => v.name === "time_bnds")?.role, "bounds");
      assert.equal(list.find((v) => v.name === "tsi")?.time_dimension, "time");
      for (const name of ["tas", "tas_packed"]) {
        const g = await describeCfGrid(src, name);
        assert.deepEqual(g.shape, ref.shape);
        assert.equal(g.decodedType, ref[name].dtype);
        assert.deepEqual(Array.from(g.latitude.values), ref.lat);
        assert.deepEqual(Array.from(g.longitude.values), ref.lon);
        assert.equal(g.time.placement, "same_month");
        g.time.dates.forEach((d, i) => sameDate(d, ref.time[i], `nc4 time[${i}]`));
        // Blocks of 5 time steps (chunks are 5 and 6 deep), concatenated, equal xarray's values.
        const all: (number | null)[] = [];
        let next = 0;
        for await (const b of readCfGridBlocks(src, g, 5)) {
          assert.equal(b.start, next);
          next += b.rows;
          all.push(...nulls(b.values));
        }
        assert.equal(next, ref.shape[0]);
        assert.deepEqual(all, ref[name].values, name);
      }
      const s = await readCfSeries(src, "tsi");
      assert.deepEqual(nulls(s.values), ref.tsi);
    });
  } finally {
    stopNetcdf4Worker();
  }
});

Deno.test("readCfSeries() and describeCfGrid() refuse variables of the wrong shape", async () => {
  try {
    await withNetcdf(path("field_nc4.nc"), async (src) => {
      await assert.rejects(readCfSeries(src, "tas"), { code: "wrong_dimensions", variable: "tas" });
      await assert.rejects(readCfSeries(src, "lat"), { code: "wrong_dimensions" });
      await assert.rejects(readCfSeries(src, "nope"), { code: "unknown_variable" });
      await assert.rejects(describeCfGrid(src, "tsi"), { code: "wrong_dimensions" });
    });
    await withNetcdf(path("record.nc"), async (src) => {
      await assert.rejects(readCfSeries(src, "temp"), /station=3/);
    });
  } finally {
    stopNetcdf4Worker();
  }
});

Deno.test("openNetcdf() refuses what is not NetCDF and files cut short", async () => {
  const tmp = await Deno.makeTempFile({ suffix: ".nc" });
  try {
    await Deno.writeTextFile(tmp, "time,value\n2001-01,1\n");
    await assert.rejects(openNetcdf(tmp), { code: "not_netcdf" });
    const bytes = await Deno.readFile(path("packed.nc"));
    await Deno.writeFile(tmp, bytes.subarray(0, bytes.length - 40));
    await assert.rejects(openNetcdf(tmp), { code: "truncated" });
    await Deno.writeFile(tmp, bytes.subarray(0, 100));
    await assert.rejects(openNetcdf(tmp), (e: unknown) => e instanceof NetcdfError);
    const cdf5 = Uint8Array.from([...bytes]);
    cdf5[3] = 5;
    await Deno.writeFile(tmp, cdf5);
    await assert.rejects(openNetcdf(tmp), { code: "unsupported_format" });
    const nc4 = await Deno.readFile(path("field_nc4.nc"));
    await Deno.writeFile(tmp, nc4.subarray(0, 3000));
    await assert.rejects(
      withNetcdf(tmp, async (src) => {
        for (const v of src.header.variables) await src.read(v.name);
      }),
      (e: unknown) => e instanceof NetcdfError,
    );
  } finally {
    await Deno.remove(tmp);
    stopNetcdf4Worker();
  }
});
