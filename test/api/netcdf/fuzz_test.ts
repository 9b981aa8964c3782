/**
 * Fuzz: corrupted NetCDF-3 and NetCDF-4 files (bit flips, overwritten ranges, huge counts in
 * header fields, truncations) uploaded to `POST /v1/series` and read through the NetCDF layer.
 * Never a 500, never a hang (each case is timed out by the layer itself), memory bounded, and
 * nothing stored from a file that was refused. Seeded, so every run sees the same cases.
 */
import assert from "node:assert/strict";
import { makeTestApp } from "../helpers.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { encodeNetcdf3, ncText } from "../../../core/cf/mod.ts";
import { withNetcdf } from "../../../api/netcdf/open.ts";
import { readCfSeries } from "../../../api/netcdf/cf_series.ts";
import { NETCDF4_TIMEOUT_SECONDS, stopNetcdf4Worker } from "../../../api/netcdf/netcdf4_source.ts";
import { NetcdfError } from "../../../api/netcdf/errors.ts";
import { CfTimeError } from "../../../core/time/mod.ts";

const DIR = new URL("../../../fixtures/netcdf/", import.meta.url);

function sunlagFile(): Uint8Array {
  return encodeNetcdf3({
    dimensions: [{ name: "time", size: 40 }, { name: "bnds", size: 2 }],
    attributes: [ncText("Conventions", "CF-1.10")],
    variables: [
      {
        name: "time",
        type: "double",
        dimensions: ["time"],
        attributes: [
          ncText("units", "days since 1850-01-01"),
          ncText("calendar", "noleap"),
          ncText("bounds", "time_bnds"),
        ],
        data: Array.from({ length: 40 }, (_, i) => 365 * i + 182.5),
      },
      {
        name: "time_bnds",
        type: "double",
        dimensions: ["time", "bnds"],
        data: Array.from({ length: 80 }, (_, i) => 365 * Math.ceil(i / 2)),
      },
      {
        name: "tsi",
        type: "float",
        dimensions: ["time"],
        attributes: [ncText("units", "W m-2")],
        data: Array.from({ length: 40 }, (_, i) => 1361 + i / 100),
      },
    ],
  });
}

type Mutator = (b: Uint8Array, r: ReturnType<typeof randomStream>) => Uint8Array;

const MUTATORS: Mutator[] = [
  // flip a few bits
  (b, r) => {
    const c = b.slice();
    for (let k = r.int(1, 6); k > 0; k--) c[r.int(0, c.length - 1)] ^= 1 << r.int(0, 7);
    return c;
  },
  // overwrite a range with random bytes
  (b, r) => {
    const c = b.slice();
    const at = r.int(0, c.length - 1), n = r.int(1, 64);
    for (let i = at; i < Math.min(c.length, at + n); i++) c[i] = r.int(0, 255);
    return c;
  },
  // a huge count or size in a 4-byte field of the header (first 512 bytes)
  (b, r) => {
    const c = b.slice();
    const at = 4 * r.int(1, Math.min(127, (c.length >> 2) - 1));
    new DataView(c.buffer).setUint32(
      at,
      [0x7fffffff, 0xffffffff, 0x01000000, 0x00100000][r.int(0, 3)],
    );
    return c;
  },
  // cut short
  (b, r) => b.slice(0, r.int(0, b.length - 1)),
  // zero a range
  (b, r) => {
    const c = b.slice();
    const at = r.int(0, c.length - 1);
    c.fill(0, at, Math.min(c.length, at + r.int(1, 256)));
    return c;
  },
];

async function readEverything(path: string): Promise<void> {
  await withNetcdf(path, async (src) => {
    for (const v of src.header.variables) {
      try {
        await src.read(v.name);
        await readCfSeries(src, v.name);
      } catch (e) {
        if (!(e instanceof NetcdfError || e instanceof CfTimeError || e instanceof RangeError)) {
          throw e;
        }
      }
    }
  });
}

Deno.test("fuzz: corrupted NetCDF files never give a 500, a hang or a stored series", async () => {
  const saved = { ...NETCDF4_TIMEOUT_SECONDS };
  NETCDF4_TIMEOUT_SECONDS.open = 5;
  NETCDF4_TIMEOUT_SECONDS.read = 5;
  const svc = await makeTestApp();
  const tmp = await Deno.makeTempFile({ suffix: ".nc" });
  const r = randomStream(20240607);
  const seeds: [string, Uint8Array, number, string][] = [
    ["packed.nc", await Deno.readFile(new URL("packed.nc", DIR)), 90, "tsi_f32_fill"],
    ["record.nc", await Deno.readFile(new URL("record.nc", DIR)), 90, "count"],
    ["offset64.nc", await Deno.readFile(new URL("offset64.nc", DIR)), 40, "ssn"],
    ["cal_360_day.nc", await Deno.readFile(new URL("cal_360_day.nc", DIR)), 60, "monthly_value"],
    ["sunlag", sunlagFile(), 90, "tsi"],
    ["field_nc4.nc", await Deno.readFile(new URL("field_nc4.nc", DIR)), 50, "tsi"],
  ];
  const statuses = new Map<number, number>();
  let rssMax = 0, slowest = 0, cases = 0;
  try {
    const before = (await (await svc.get("/v1/series")).json()).total;
    for (const [name, bytes, n, variable] of seeds) {
      for (let k = 0; k < n; k++) {
        const m = MUTATORS[r.int(0, MUTATORS.length - 1)];
        const body = m(bytes, r);
        const t0 = performance.now();
        const res = await svc.app.request(
          `/v1/series?quantity=other&name=fuzz&variable=${variable}`,
          {
            method: "POST",
            headers: { "content-type": "application/x-netcdf" },
            body: body as Uint8Array<ArrayBuffer>,
          },
        );
        const text = await res.text();
        assert.notEqual(res.status, 500, `${name} case ${k}: ${text}`);
        assert.ok(
          [200, 201, 413, 415, 422].includes(res.status),
          `${name} case ${k}: ${res.status} ${text}`,
        );
        assert.ok(text.length < 8000, `${name} case ${k}: problem of ${text.length} bytes`);
        assert.doesNotMatch(text, /HDF5-DIAG|major:|minor:/);
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
        await Deno.writeFile(tmp, body);
        try {
          await readEverything(tmp);
        } catch (e) {
          assert.ok(
            e instanceof NetcdfError || e instanceof CfTimeError || e instanceof RangeError,
            `${name} case ${k}: ${e}`,
          );
        }
        slowest = Math.max(slowest, performance.now() - t0);
        rssMax = Math.max(rssMax, Deno.memoryUsage().rss);
        cases++;
      }
    }
    // A corrupted file that still parses may be stored (it is then a valid series); one that
    // was refused never is.
    const after = (await (await svc.get("/v1/series")).json()).total;
    assert.ok(after - before <= (statuses.get(201) ?? 0));
    assert.ok(rssMax < 1.5 * 1024 ** 3, `rss ${Math.round(rssMax / 2 ** 20)} MB`);
    console.log(
      `fuzz: ${cases} cases, statuses ${JSON.stringify(Object.fromEntries(statuses))}, ` +
        `slowest ${Math.round(slowest)} ms, peak rss ${Math.round(rssMax / 2 ** 20)} MB`,
    );
  } finally {
    Object.assign(NETCDF4_TIMEOUT_SECONDS, saved);
    await Deno.remove(tmp);
    await svc.close();
    stopNetcdf4Worker();
  }
});
