/**
 * Zipped Zarr v2 stores that Debian's python3-xarray 2023.01 and python3-zarr 2.13 wrote
 * (fixtures/zarr/make_field_zarr.py: fixtures/netcdf/field_nc4.nc re-written with
 * `to_zarr(zarr.storage.ZipStore(...))`, Blosc/LZ4, chunks of 5 time steps), read through the
 * same CF layer as NetCDF: the decoded values, times and coordinates equal what xarray decodes
 * (fixtures/netcdf/reference.json, field_nc4), whole and in blocks; damaged or unusable stores
 * are NetcdfErrors.
 */
import assert from "node:assert/strict";
import { openNetcdf, withNetcdf } from "../../../api/netcdf/open.ts";
import { readCfSeries } from "../../../api/netcdf/cf_series.ts";
import { describeCfGrid, readCfGridBlocks } from "../../../api/netcdf/cf_grid.ts";
import { listCfVariables } from "../../../api/netcdf/cf_variables.ts";
import { NetcdfError } from "../../../api/netcdf/errors.ts";
import type { CfDateTime } from "../../../core/time/mod.ts";

const ZIP = new URL("../../../fixtures/zarr/field.zarr.zip", import.meta.url).pathname;
const REF = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/netcdf/reference.json", import.meta.url)),
).field_nc4;
const nulls = (xs: ArrayLike<number>) => Array.from(xs, (x) => (Number.isNaN(x) ? null : x));

function sameDate(got: CfDateTime, want: number[], label: string) {
  const [y, m, d, hh, mm, ss, us] = want;
  assert.deepEqual([got.year, got.month, got.day], [y, m, d], label);
  assert.ok(Math.abs(got.seconds - (hh * 3600 + mm * 60 + ss + us / 1e6)) < 1e-3, label);
}

Deno.test("a zipped Zarr store xarray wrote decodes as xarray decodes the NetCDF file", async () => {
  await withNetcdf(ZIP, async (src) => {
    assert.equal(src.header.format, "zarr_v2_zip");
    assert.equal(src.header.attributes.find((a) => a.name === "title")?.value, REF.title);
    const list = listCfVariables(src.header);
    assert.deepEqual(list.find((v) => v.name === "tas")?.dimensions, ["time", "lat", "lon"]);
    assert.equal(list.find((v) => v.name === "time_bnds")?.role, "bounds");
    for (const name of ["tas", "tas_packed"]) {
      const g = await describeCfGrid(src, name);
      assert.deepEqual(g.shape, REF.shape);
      assert.deepEqual(Array.from(g.latitude.values), REF.lat);
      assert.deepEqual(Array.from(g.longitude.values), REF.lon);
      assert.equal(g.time.placement, "same_month");
      g.time.dates.forEach((d, i) => sameDate(d, REF.time[i], `time[${i}]`));
      // blocks of 7 rows cross the store's chunks of 5
      const all: (number | null)[] = [];
      for await (const b of readCfGridBlocks(src, g, 7)) all.push(...nulls(b.values));
      assert.deepEqual(all, REF[name].values, name);
    }
    const s = await readCfSeries(src, "tsi");
    assert.deepEqual(nulls(s.values), REF.tsi);
  });
});

async function zipOf(entries: Record<string, string | Uint8Array>): Promise<Uint8Array> {
  // a stored (uncompressed) zip written by Python's zipfile, the format zarr's ZipStore uses
  const dir = await Deno.makeTempDir();
  try {
    for (const [name, body] of Object.entries(entries)) {
      const p = `${dir}/${name}`;
      await Deno.mkdir(p.slice(0, p.lastIndexOf("/")), { recursive: true });
      if (typeof body === "string") await Deno.writeTextFile(p, body);
      else await Deno.writeFile(p, body);
    }
    const out = `${dir}.zip`;
    const py = "import sys, zipfile, os\n" +
      "z = zipfile.ZipFile(sys.argv[2], 'w')\n" +
      "for root, _, files in os.walk(sys.argv[1]):\n" +
      "    for f in files:\n" +
      "        p = os.path.join(root, f); z.write(p, os.path.relpath(p, sys.argv[1]))\n" +
      "z.close()\n";
    const done = await new Deno.Command("python3", { args: ["-c", py, dir, out] }).output();
    assert.ok(done.success, new TextDecoder().decode(done.stderr));
    const bytes = await Deno.readFile(out);
    await Deno.remove(out);
    return bytes;
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
}

const zarray = (o: Record<string, unknown> = {}) =>
  JSON.stringify({
    zarr_format: 2,
    shape: [3],
    chunks: [3],
    dtype: "<f8",
    order: "C",
    fill_value: null,
    compressor: null,
    filters: null,
    ...o,
  });
const dims = (d: string[]) => JSON.stringify({ _ARRAY_DIMENSIONS: d, units: "K" });

Deno.test("zipped stores that cannot be used are NetcdfErrors naming why", async (t) => {
  const tmp = await Deno.makeTempFile({ suffix: ".zip" });
  const refused = async (bytes: Uint8Array, code: string, re: RegExp) => {
    await Deno.writeFile(tmp, bytes);
    await assert.rejects(
      withNetcdf(tmp, async (src) => {
        for (const v of src.header.variables) await src.read(v.name);
      }),
      (e: unknown) => e instanceof NetcdfError && e.code === code && re.test(e.message),
    );
  };
  try {
    await t.step("no array at the root", async () => {
      await refused(await zipOf({ "readme.txt": "hello" }), "corrupt", /no Zarr array/);
    });
    await t.step("no _ARRAY_DIMENSIONS", async () => {
      await refused(
        await zipOf({ "x/.zarray": zarray(), "x/.zattrs": "{}" }),
        "corrupt",
        /_ARRAY_DIMENSIONS/,
      );
    });
    await t.step("Fortran order", async () => {
      await refused(
        await zipOf({ "x/.zarray": zarray({ order: "F" }), "x/.zattrs": dims(["time"]) }),
        "unsupported_format",
        /Fortran/,
      );
    });
    await t.step("a huge declared chunk", async () => {
      await refused(
        await zipOf({
          "x/.zarray": zarray({ shape: [1e9], chunks: [1e9] }),
          "x/.zattrs": dims(["time"]),
        }),
        "too_large",
        /chunks of/,
      );
    });
    await t.step("Zarr v3 metadata", async () => {
      await refused(
        await zipOf({ "x/.zarray": zarray({ zarr_format: 3 }), "x/.zattrs": dims(["time"]) }),
        "unsupported_format",
        /Zarr format 3/,
      );
    });
    await t.step("a string array", async () => {
      await refused(
        await zipOf({ "x/.zarray": zarray({ dtype: "<U8" }), "x/.zattrs": dims(["time"]) }),
        "not_numeric",
        /dtype/,
      );
    });
    await t.step("a chunk that is not what the metadata says", async () => {
      await refused(
        await zipOf({
          "x/.zarray": zarray({ compressor: { id: "zlib", level: 1 } }),
          "x/.zattrs": dims(["time"]),
          "x/0": "not zlib data",
        }),
        "corrupt",
        /could not be read/,
      );
    });
    await t.step("a cut zip", async () => {
      const bytes = await Deno.readFile(ZIP);
      await refused(bytes.subarray(0, bytes.length - 200), "corrupt", /zip/);
    });
  } finally {
    await Deno.remove(tmp);
  }
});

Deno.test("openNetcdf() names zipped Zarr among what it reads", async () => {
  const tmp = await Deno.makeTempFile({ suffix: ".txt" });
  try {
    await Deno.writeTextFile(tmp, "time,value\n");
    await assert.rejects(openNetcdf(tmp), /zipped Zarr/);
  } finally {
    await Deno.remove(tmp);
  }
});

Deno.test("POST /v1/fields takes the zipped Zarr store: the same content as the NetCDF file, so the same field", async () => {
  const { makeTestApp } = await import("../helpers.ts");
  const { stopNetcdf4Worker } = await import("../../../api/netcdf/netcdf4_source.ts");
  const svc = await makeTestApp();
  try {
    const up = async (file: string, type: string) => {
      const res = await svc.app.request("/v1/fields?variable=tas_packed&quantity=temperature", {
        method: "POST",
        headers: { "content-type": type },
        body: await Deno.readFile(new URL(`../../../fixtures/${file}`, import.meta.url)),
      });
      return { status: res.status, json: await res.json() };
    };
    const zz = await up("zarr/field.zarr.zip", "application/zip");
    assert.equal(zz.status, 201, JSON.stringify(zz.json));
    assert.equal(zz.json.report.format, "zarr_v2_zip");
    assert.equal(zz.json.field.info.calendar, "noleap");
    assert.equal(zz.json.field.missing, 1);
    // the field's id is the SHA-256 of its decoded content: the NetCDF file gives the same one
    const nc = await up("netcdf/field_nc4.nc", "application/x-netcdf");
    assert.equal(nc.status, 200, JSON.stringify(nc.json));
    assert.equal(nc.json.field.id, zz.json.field.id);
    assert.equal(nc.json.report.format, "netcdf4");
    const bad = await svc.app.request("/v1/fields", {
      method: "POST",
      headers: { "content-type": "application/zip" },
      body: new TextEncoder().encode("PK\x03\x04 not really a zip"),
    });
    assert.ok(bad.status === 422 || bad.status === 415, String(bad.status));
    assert.equal((await svc.store.listFields({ limit: 5, offset: 0 })).total, 1);
  } finally {
    await svc.close();
    stopNetcdf4Worker();
  }
});

Deno.test("fuzz: corrupted zipped Zarr fields never give a 500 or a hang", async () => {
  const { makeTestApp } = await import("../helpers.ts");
  const { randomStream } = await import("../../../core/random/mod.ts");
  const svc = await makeTestApp();
  const original = await Deno.readFile(ZIP);
  const rng = randomStream(20261202, 0);
  const statuses = new Map<number, number>();
  try {
    for (let k = 0; k < 40; k++) {
      const bytes = original.slice();
      for (let f = rng.int(1, 8); f > 0; f--) bytes[rng.int(0, bytes.length - 1)] = rng.int(0, 255);
      const cut = rng.uniform() < 0.2 ? rng.int(0, bytes.length - 1) : bytes.length;
      const res = await svc.app.request("/v1/fields?variable=tas&quantity=temperature", {
        method: "POST",
        headers: { "content-type": "application/zip" },
        body: bytes.subarray(0, cut),
      });
      await res.body?.cancel();
      statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
      assert.ok([200, 201, 415, 422].includes(res.status), `case ${k}: ${res.status}`);
    }
  } finally {
    await svc.close();
  }
  assert.ok((statuses.get(422) ?? 0) > 0, JSON.stringify([...statuses]));
});
