/**
 * The pure CF layer against outside references:
 * - cfMaskAndScale() against xarray 2023.01 `open_dataset` (Debian python3-xarray) on the
 *   stored values of fixtures/netcdf/packed.nc (fixtures/netcdf/make_reference.py);
 * - calendarAxis() against xarray `convert_calendar(..., align_on="date")` and cftime month
 *   bounds (fixtures/netcdf/regrid_xarray.py);
 * - encodeNetcdf3() read back by netcdfjs 4.0.0 (a reader written by others) and byte-stable.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { NetCDFReader } from "netcdfjs";
import {
  calendarAxis,
  cfDecodedType,
  cfMaskAndScale,
  type CfPackingAttributes,
  encodeNetcdf3,
  ncNumber,
  ncText,
  netcdf3Chunks,
  type NetcdfType,
  planNetcdf3,
} from "../../../core/cf/mod.ts";
import {
  cfDateFromDayNumber,
  cfDayNumber,
  CfTimeError,
  decimalYear,
  inferResolution,
  parseCfTimeUnits,
} from "../../../core/time/mod.ts";
import { periodOfKey } from "../../../core/series/mod.ts";

const REF = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/netcdf/reference.json", import.meta.url)),
);
const REGRID = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/netcdf/regrid_xarray.json", import.meta.url)),
);

const NUMPY_TYPE: Record<string, NetcdfType> = {
  int8: "byte",
  int16: "short",
  int32: "int",
  float32: "float",
  float64: "double",
};

Deno.test("cfMaskAndScale() agrees bit for bit with xarray open_dataset (mask and scale)", () => {
  const vars = REF.packed.variables as Record<string, {
    stored_type: string;
    raw: number[];
    attributes: Record<string, string | number[]>;
    attribute_types: Record<string, string>;
    dtype: string;
    values: (number | null)[];
  }>;
  assert.equal(Object.keys(vars).length, 6);
  for (const [name, v] of Object.entries(vars)) {
    const attrs: CfPackingAttributes = {};
    for (const [k, a] of Object.entries(v.attributes)) {
      (attrs as Record<string, unknown>)[k] = a;
    }
    const type = NUMPY_TYPE[v.stored_type];
    const d = cfMaskAndScale(v.raw, type, attrs);
    assert.equal(d.type, v.dtype, `${name}: xarray decodes to ${v.dtype}`);
    assert.equal(cfDecodedType(type, attrs), v.dtype);
    const got = Array.from(d.values, (x) => (Number.isNaN(x) ? null : x));
    assert.deepEqual(got, v.values, name);
    assert.ok(got.includes(null) || name === "tsi_f64" || name === "tsi_scale_only", name);
  }
});

Deno.test("cfMaskAndScale() edge cases", async (t) => {
  await t.step(
    "NaN _FillValue is ignored (NaN is already missing); no attributes: unchanged",
    () => {
      const d = cfMaskAndScale([1, NaN, 3], "double", { _FillValue: NaN });
      assert.equal(d.type, "float64");
      assert.deepEqual(Array.from(d.values), [1, NaN, 3]);
      assert.equal(cfMaskAndScale(Int32Array.of(5), "int", {}).type, "int");
    },
  );
  await t.step("_Unsigned false on NetCDF-4 ubyte makes it signed", () => {
    const d = cfMaskAndScale(Uint8Array.of(255, 1), "ubyte", { _Unsigned: "false" });
    assert.deepEqual(Array.from(d.values), [-1, 1]);
  });
  await t.step("decodes into a Float32Array of the same length, or refuses another length", () => {
    const out = new Float32Array(2);
    cfMaskAndScale(Int16Array.of(10, -1), "short", { scale_factor: 0.5, _FillValue: -1 }, out);
    assert.deepEqual(Array.from(out), [5, NaN]);
    assert.throws(() => cfMaskAndScale([1], "short", {}, new Float32Array(2)), RangeError);
  });
});

Deno.test("calendarAxis() keeps the months xarray convert_calendar keeps, with cftime bounds", () => {
  const input = REGRID.monthly_input as { date: number[]; value: number }[];
  const time = input.map((p) => {
    const [y, m] = p.date;
    return periodOfKey(y * 12 + m - 1, "monthly").middle;
  });
  assert.equal(inferResolution(time), "monthly");
  for (const target of ["noleap", "all_leap", "360_day"] as const) {
    const ref = REGRID.targets[target];
    const axis = calendarAxis(time, "monthly", target);
    const u = parseCfTimeUnits(REGRID.units, target);
    assert.equal(axis.kept.length, ref.monthly_kept.length, target);
    assert.deepEqual(axis.dropped, []);
    for (let k = 0; k < axis.kept.length; k++) {
      const i = axis.kept[k];
      const x = ref.monthly_kept[k];
      assert.equal(input[i].value, x.value, `${target}: value kept`);
      const mid = cfDateFromDayNumber(target, Math.floor(axis.time[k]));
      assert.deepEqual([mid.year, mid.month], x.date.slice(0, 2), `${target}: same month`);
      const [a, b] = ref.month_bounds[`${x.date[0]}-${String(x.date[1]).padStart(2, "0")}`];
      assert.equal(axis.start![k] - u.referenceDay, a, `${target} ${x.date}: start`);
      assert.equal(axis.end![k] - u.referenceDay, b, `${target} ${x.date}: end`);
    }
    assert.match(axis.method, /same month/);
  }
});

Deno.test("calendarAxis() on daily data: noleap drops 29 February as xarray does, 360_day refuses", () => {
  const days: number[] = [];
  for (
    let d = cfDayNumber("proleptic_gregorian", 1999, 12, 1);
    days.length < REGRID.daily_input_count;
    d++
  ) {
    const c = cfDateFromDayNumber("proleptic_gregorian", d);
    days.push(decimalYear(c.year, c.month, c.day, 0.5));
  }
  assert.equal(inferResolution(days), "daily");
  for (const target of ["noleap", "all_leap"] as const) {
    const axis = calendarAxis(days, "daily", target);
    const ref = REGRID.targets[target].daily_kept as { date: number[]; value: number }[];
    assert.equal(axis.kept.length, ref.length, target);
    for (let k = 0; k < ref.length; k++) {
      const c = cfDateFromDayNumber(target, axis.start![k]);
      assert.deepEqual([c.year, c.month, c.day], ref[k].date);
      assert.equal(1360 + 0.25 * axis.kept[k], ref[k].value);
      assert.equal(axis.end![k] - axis.start![k], 1);
    }
    assert.equal(axis.dropped.length, REGRID.daily_input_count - ref.length);
  }
  assert.throws(() => calendarAxis(days, "daily", "360_day"), (e: unknown) => {
    assert.ok(e instanceof CfTimeError);
    assert.equal(e.code, "not_representable");
    assert.equal(e.field, "calendar");
    return true;
  });
  assert.throws(() => calendarAxis([2000.1, 2000.2], "irregular", "360_day"), CfTimeError);
});

Deno.test("calendarAxis() on real-world calendars keeps the same days", () => {
  const time = [
    periodOfKey(1600 * 12 + 2, "monthly").middle,
    periodOfKey(1600 * 12 + 3, "monthly").middle,
  ];
  for (const cal of ["standard", "julian", "proleptic_gregorian"] as const) {
    const a = calendarAxis(time, "monthly", cal);
    assert.equal(a.start![0], cfDayNumber("proleptic_gregorian", 1600, 3, 1));
    assert.equal(a.end![0], cfDayNumber("proleptic_gregorian", 1600, 4, 1));
  }
  // Gregorian 1600-03-01 is Julian 1600-02-20.
  assert.deepEqual(cfDateFromDayNumber("julian", cfDayNumber("proleptic_gregorian", 1600, 3, 1)), {
    year: 1600,
    month: 2,
    day: 20,
  });
  const inst = calendarAxis([2000.25, 2000.5], "irregular", "standard");
  assert.equal(inst.start, null);
  assert.ok(Math.abs(inst.time[1] - cfDayNumber("standard", 2000, 7, 2)) < 1e-6);
});

Deno.test("encodeNetcdf3() writes files netcdfjs reads back exactly, byte-stable", async (t) => {
  const ds = {
    dimensions: [{ name: "time", size: 5 }, { name: "bnds", size: 2 }, {
      name: "realization",
      size: 3,
    }, { name: "nchar", size: 3 }],
    attributes: [ncText("Conventions", "CF-1.10"), ncNumber("answer", "int", 42)],
    variables: [
      {
        name: "time",
        type: "double" as const,
        dimensions: ["time"],
        attributes: [ncText("units", "days since 1850-01-01"), ncText("calendar", "noleap")],
        data: [15.5, 45, 74.5, 105, 135.5],
      },
      {
        name: "time_bnds",
        type: "double" as const,
        dimensions: ["time", "bnds"],
        data: [0, 31, 31, 59, 59, 90, 90, 120, 120, 151],
      },
      {
        name: "tsi",
        type: "float" as const,
        dimensions: ["time"],
        attributes: [ncNumber("_FillValue", "float", NaN)],
        data: [1361, 1360.5, NaN, 1361.25, 1360.75],
      },
      {
        name: "members",
        type: "short" as const,
        dimensions: ["realization", "time"],
        data: { rows: 3, row: (i: number) => [i, i + 1, i + 2, i + 3, -i] },
      },
      { name: "flag", type: "byte" as const, dimensions: ["time"], data: [1, -1, 0, 127, -128] },
      { name: "label", type: "char" as const, dimensions: ["nchar"], data: "abc" },
    ],
  };
  const bytes = encodeNetcdf3(ds);
  await t.step("netcdfjs reads dimensions, attributes and values", () => {
    const r = new NetCDFReader(bytes);
    assert.equal(r.version, "classic format");
    assert.deepEqual(r.dimensions.map((d) => [d.name, d.size]), [["time", 5], ["bnds", 2], [
      "realization",
      3,
    ], ["nchar", 3]]);
    assert.equal(r.getAttribute("Conventions"), "CF-1.10");
    assert.equal(r.getAttribute("answer"), 42);
    assert.deepEqual(r.getDataVariable("time"), [15.5, 45, 74.5, 105, 135.5]);
    assert.deepEqual(r.getDataVariable("time_bnds"), [0, 31, 31, 59, 59, 90, 90, 120, 120, 151]);
    const tsi = r.getDataVariable("tsi") as number[];
    assert.deepEqual(tsi.map((x) => (Number.isNaN(x) ? null : x)), [
      1361,
      1360.5,
      null,
      1361.25,
      1360.75,
    ]);
    // netcdfjs returns the zero padding to 4 bytes as extra elements: compare the first n.
    const first = (name: string, n: number) =>
      (r.getDataVariable(name) as number[]).flat().slice(0, n); // bytes come as [x]
    assert.deepEqual(first("members", 15), [0, 1, 2, 3, 0, 1, 2, 3, 4, -1, 2, 3, 4, 5, -2]);
    assert.deepEqual(first("flag", 5), [1, 255, 0, 127, 128]); // netcdfjs reads bytes unsigned
    assert.equal(r.getDataVariableAsString("label"), "abc");
  });
  await t.step("same input, same bytes; chunks concatenate to the file", () => {
    assert.deepEqual(encodeNetcdf3(ds), bytes);
    const chunks = [...netcdf3Chunks(ds)];
    assert.equal(chunks.reduce((s, c) => s + c.length, 0), bytes.length);
    assert.equal(planNetcdf3(ds).totalBytes, bytes.length);
    assert.equal(bytes.length % 4, 0);
  });
  await t.step("NaN payloads do not change the bytes", () => {
    const odd = new Float64Array(new BigUint64Array([0x7ff8000000000123n]).buffer)[0];
    assert.ok(Number.isNaN(odd));
    const ds2 = {
      ...ds,
      variables: ds.variables.map((v) =>
        v.name === "tsi" ? { ...v, data: [1361, 1360.5, odd, 1361.25, 1360.75] } : v
      ),
    };
    assert.deepEqual(encodeNetcdf3(ds2), bytes);
  });
  await t.step("refuses what the format cannot hold, naming it", () => {
    const bad = (patch: object, re: RegExp) =>
      assert.throws(() => encodeNetcdf3({ ...ds, ...patch }), re);
    bad({ dimensions: [...ds.dimensions, { name: "time", size: 2 }] }, /defined twice/);
    bad(
      { variables: [{ name: "x", type: "int", dimensions: ["nope"], data: [1] }] },
      /unknown dimension "nope"/,
    );
    bad({ variables: [{ name: "x y", type: "int", dimensions: [], data: [1] }] }, /name "x y"/);
    bad({
      variables: [{ name: "x", type: "short", dimensions: ["time"], data: [1, 2, 3, 4, 40000] }],
    }, /40000/);
    bad(
      { variables: [{ name: "x", type: "int", dimensions: ["time"], data: [1] }] },
      /needs 5 values, got 1/,
    );
    bad(
      { variables: [{ name: "x", type: "int", dimensions: ["time"], data: [1, 2, 3, 4, NaN] }] },
      /NaN/,
    );
    assert.throws(
      () => [
        ...netcdf3Chunks({
          ...ds,
          variables: [{
            name: "m",
            type: "float",
            dimensions: ["realization", "time"],
            data: { rows: 3, row: () => [1] },
          }],
        }),
      ],
      /row 0/,
    );
  });
});

Deno.test("encodeNetcdf3() round-trips random doubles and floats through netcdfjs", () => {
  fc.assert(
    fc.property(
      fc.array(fc.double({ noNaN: true }), { minLength: 1, maxLength: 40 }),
      (xs) => {
        const ds = {
          dimensions: [{ name: "n", size: xs.length }],
          variables: [
            { name: "d", type: "double" as const, dimensions: ["n"], data: xs },
            { name: "f", type: "float" as const, dimensions: ["n"], data: xs.map(Math.fround) },
          ],
        };
        const r = new NetCDFReader(encodeNetcdf3(ds));
        assert.deepEqual(r.getDataVariable("d"), xs.map((x) => (Object.is(x, -0) ? -0 : x)));
        assert.deepEqual(r.getDataVariable("f"), xs.map(Math.fround));
      },
    ),
    { numRuns: 200 },
  );
});
