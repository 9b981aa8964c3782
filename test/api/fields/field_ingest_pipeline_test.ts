/**
 * The field upload's pipeline (api/fields/ingest.ts): blocks are read, hashed and written at
 * the same time, and on a SQLite file store the writes go through the store's writer worker.
 * A field of several blocks gets the same content id on a file store as in memory, reads back
 * exactly, and an upload that fails after some blocks were written (one still in flight) leaves
 * nothing stored.
 *
 * @module
 */
import assert from "node:assert/strict";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { BLOCK_VALUES } from "../../../api/fields/ingest.ts";
import { NetcdfError } from "../../../api/netcdf/errors.ts";
import { gridNetcdf, uploadTasField } from "./grid_file.ts";

const NT = 200, LAT = 90, LON = 180;
const lat = Array.from({ length: LAT }, (_, i) => -89 + 2 * i);
const lon = Array.from({ length: LON }, (_, i) => 1 + 2 * i);

/** Invented values (a smooth pattern with a seasonal cycle), with a few missing cells. */
function values(bad?: number): Float32Array {
  const v = new Float32Array(NT * LAT * LON);
  for (let t = 0; t < NT; t++) {
    for (let y = 0; y < LAT; y++) {
      for (let x = 0; x < LON; x++) {
        v[(t * LAT + y) * LON + x] = 280 + 20 * Math.cos(lat[y] / 60) +
          5 * Math.sin((2 * Math.PI * t) / 12) + 0.01 * x;
      }
    }
  }
  for (let k = 0; k < v.length; k += 99_991) v[k] = NaN;
  if (bad !== undefined) v[bad] = Infinity;
  return v;
}

const upload = uploadTasField;

Deno.test("storeNetcdfField() pipelines blocks into a SQLite file store: same id, same values, nothing left from a failure", async (t) => {
  assert.ok(NT * LAT * LON > 3 * BLOCK_VALUES, "the field spans several blocks");
  const v = values();
  const file = gridNetcdf({ startYear: 1990, nTime: NT, lat, lon, values: v, variable: "tas" });
  const dir = await Deno.makeTempDir({ prefix: "sunlag-ingest-" });
  const disk = await openSqliteStore({ path: `${dir}/store.db` });
  const memory = await openSqliteStore({ path: ":memory:" });
  try {
    await t.step("the same field gets the same id on a file store and in memory", async () => {
      const a = await upload(disk, file), b = await upload(memory, file);
      assert.equal(a.field.id, b.field.id);
      assert.equal(a.created, true);
      assert.equal(a.report.missing_values, b.report.missing_values);
      assert.ok(a.report.missing_values > 0);
      const back = await disk.readFieldSteps(a.field.id, 0, NT);
      // NetCDF-3 float → float32 is exact: every value back as written, NaN where missing
      assert.equal(back.length, v.length);
      let differ = 0;
      for (let i = 0; i < v.length; i++) if (!Object.is(back[i], v[i])) differ++;
      assert.equal(differ, 0);
    });
    await t.step("a failure in the last block leaves no field and no staged block", async () => {
      // an infinite value in the last time step: refused after the earlier blocks were written
      const bad = gridNetcdf({
        startYear: 1990,
        nTime: NT,
        lat,
        lon,
        values: values(NT * LAT * LON - 5),
        variable: "tas",
      });
      const before = (await disk.listFields({ limit: 10, offset: 0 })).total;
      await assert.rejects(() => upload(disk, bad), NetcdfError);
      assert.equal((await disk.listFields({ limit: 10, offset: 0 })).total, before);
      assert.equal(await disk.dropStagedFields(-1), 0, "staged blocks were left");
    });
  } finally {
    await disk.close();
    await memory.close();
    await Deno.remove(dir, { recursive: true });
  }
});
