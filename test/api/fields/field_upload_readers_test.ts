/**
 * A NetCDF-4 field's blocks decoded by one reader worker or by two at once (api/netcdf/
 * netcdf4_source.ts), decoded in place (api/netcdf/cf_grid.ts) and stored with the automatic
 * WAL checkpoint deferred (api/store/sqlite.ts) give the field the same content id, byte for
 * byte, as the NetCDF-3 classic file it was converted from, and as the upload gave before these
 * changes (the id pinned below was computed on the code before them from the same invented
 * field). The NetCDF-4 file is made from the NetCDF-3 one by `nccopy -k nc4 -d 4 -c ...`
 * (Debian netcdf-bin: zlib level 4, one time step per chunk, values and attributes unchanged).
 *
 * @module
 */
import assert from "node:assert/strict";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { BLOCK_VALUES } from "../../../api/fields/ingest.ts";
import { NETCDF4_POOL, stopNetcdf4Worker } from "../../../api/netcdf/netcdf4_source.ts";
import { gridNetcdf, uploadTasField } from "./grid_file.ts";

const NT = 400, LAT = 90, LON = 180;
const lat = Array.from({ length: LAT }, (_, i) => -89 + 2 * i);
const lon = Array.from({ length: LON }, (_, i) => 1 + 2 * i);

/** The id of this field as uploaded before reads were parallel and decoded in place. */
const PINNED_ID = "field:sha256:d6c882dec688d6aafe29e9433444fc33d836d6c5975574ac61eb2e47fe2c6a21";

function values(): Float32Array {
  const v = new Float32Array(NT * LAT * LON);
  for (let t = 0; t < NT; t++) {
    for (let y = 0; y < LAT; y++) {
      for (let x = 0; x < LON; x++) {
        v[(t * LAT + y) * LON + x] = 280 + 20 * Math.cos(lat[y] / 60) +
          5 * Math.sin((2 * Math.PI * t) / 12) + 0.01 * ((x * 7 + y * 3 + t) % 100);
      }
    }
  }
  for (let k = 3; k < v.length; k += 77_777) v[k] = NaN;
  return v;
}

const upload = uploadTasField;

async function toNetcdf4(classic: Uint8Array): Promise<Uint8Array> {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-readers-" });
  try {
    await Deno.writeFile(`${dir}/in.nc`, classic);
    const done = await new Deno.Command("nccopy", {
      args: ["-k", "nc4", "-d", "4", "-c", `time/1,lat/${LAT},lon/${LON}`, "in.nc", "out.nc"],
      cwd: dir,
    }).output();
    assert.ok(done.success, new TextDecoder().decode(done.stderr));
    return await Deno.readFile(`${dir}/out.nc`);
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
}

Deno.test("a NetCDF-4 field read by one or two reader workers keeps its content id", async () => {
  assert.ok(NT * LAT * LON > 4 * BLOCK_VALUES, "the field spans several blocks");
  const classic = gridNetcdf({
    startYear: 1990,
    nTime: NT,
    lat,
    lon,
    values: values(),
    variable: "tas",
  });
  const nc4 = await toNetcdf4(classic);
  const dir = await Deno.makeTempDir({ prefix: "sunlag-readers-" });
  const saved = NETCDF4_POOL.readers;
  try {
    const ids: Record<string, string> = {};
    const memory = await openSqliteStore({ path: ":memory:" });
    ids.classic = (await upload(memory, classic)).field.id;
    await memory.close();
    for (const readers of [1, 2]) {
      stopNetcdf4Worker();
      NETCDF4_POOL.readers = readers;
      const disk = await openSqliteStore({ path: `${dir}/store${readers}.db` });
      try {
        const out = await upload(disk, nc4);
        ids[`netcdf4, ${readers} reader(s)`] = out.field.id;
        assert.equal(out.report.format, "netcdf4");
        assert.ok(out.report.missing_values > 0);
        // nothing staged is left behind
        assert.equal(await disk.dropStagedFields(-1), 0);
        const back = await disk.readFieldSteps(out.field.id, NT - 1, NT);
        assert.equal(back.length, LAT * LON);
      } finally {
        await disk.close();
      }
    }
    assert.deepEqual(ids, {
      classic: PINNED_ID,
      "netcdf4, 1 reader(s)": PINNED_ID,
      "netcdf4, 2 reader(s)": PINNED_ID,
    });
  } finally {
    NETCDF4_POOL.readers = saved;
    stopNetcdf4Worker();
    await Deno.remove(dir, { recursive: true });
  }
});
