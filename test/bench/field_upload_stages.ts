/**
 * Where a field upload's time goes: each stage of `POST /v1/fields` run alone, one after the
 * other, on the benchmark file (field_upload_make.py): the body copied to a temporary file
 * (the HDF5 reader loads meanwhile, as in the upload), open and describe, the NetCDF-4 reads (the h5wasm worker, blocks as the upload reads them),
 * the CF decode (mask and unpack), the missing-value check, SHA-256, and the SQLite block
 * writes (with `synchronous = FULL`, in this thread, as the store's writer worker does them). Wall
 * and CPU milliseconds of each (CPU of the whole process: the stages run one at a time). The
 * upload overlaps read, check/hash and
 * write, so its wall time is near the slowest of them plus what does not overlap. Prints one
 * JSON object.
 *
 *   deno run -A test/bench/field_upload_stages.ts FILE
 *
 * @module
 */
import { createHash } from "node:crypto";
import process from "node:process";
import { openNetcdf, withTempUpload } from "../../api/netcdf/open.ts";
import { describeCfGrid } from "../../api/netcdf/cf_grid.ts";
import { packingOf } from "../../api/netcdf/cf_variables.ts";
import { variableOf } from "../../api/netcdf/source.ts";
import { stopNetcdf4Worker } from "../../api/netcdf/mod.ts";
import { cfMaskAndScale } from "../../core/cf/cf_mask_and_scale.ts";
import { BLOCK_VALUES, checkFieldValues } from "../../api/fields/ingest.ts";
import { float32ToBytesLE } from "../../api/store/field_common.ts";
import { openSqliteStore } from "../../api/store/sqlite.ts";

const file = Deno.args[0];
const ms: Record<string, number> = {};
const cpuMs: Record<string, number> = {};
const timed = async <T>(name: string, f: () => T | Promise<T>): Promise<T> => {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const out = await f();
  ms[name] = (ms[name] ?? 0) + performance.now() - t0;
  const c = process.cpuUsage(c0);
  cpuMs[name] = (cpuMs[name] ?? 0) + (c.user + c.system) / 1000;
  return out;
};

const size = (await Deno.stat(file)).size;
await timed(
  "copy body to temp file",
  () => withTempUpload((Deno.openSync(file)).readable, 2 ** 30, () => Promise.resolve()),
);
const src = await timed("open", () => openNetcdf(file));
const grid = await timed("describe", () => describeCfGrid(src, "tas"));
const [nt, ny, nx] = grid.shape;
const per = ny * nx;
const rows = Math.max(1, Math.floor(BLOCK_VALUES / per));
const v = variableOf(src.header, "tas");
const dir = await Deno.makeTempDir({ prefix: "sunlag-stages-" });
const store = await openSqliteStore({ path: `${dir}/store.db`, offload: false });
const stage = await store.beginField({
  name: "tas",
  variable: "tas",
  quantity: "temperature",
  units: "K",
  description: null,
  source: null,
  resolution: "monthly",
  n_time: nt,
  n_lat: ny,
  n_lon: nx,
  start: 0,
  end: 1,
  block_rows: rows,
  missing: 0,
  info: {
    format: "netcdf4",
    calendar: "noleap",
    time_units: "",
    time_placement: "",
    standard_name: null,
    long_name: null,
    min: null,
    max: null,
  },
  created_at: new Date().toISOString(),
  time: new Float64Array(nt),
  lat: grid.latitude.values,
  lon: grid.longitude.values,
  lat_bounds: null,
  lon_bounds: null,
});
const hash = createHash("sha256");
let block = 0;
for (let start = 0; start < nt; start += rows) {
  const n = Math.min(rows, nt - start);
  const raw = await timed("read (h5wasm worker)", () => src.read("tas", start, n));
  const values = new Float32Array(n * per);
  await timed("decode (mask and unpack)", () => cfMaskAndScale(raw, v.type, packingOf(v), values));
  await timed("check (NaN, min, max)", () => checkFieldValues(values, "tas", start, per));
  await timed("sha-256", () => hash.update(float32ToBytesLE(values)));
  await timed("sqlite block write", () => store.putFieldBlock(stage, block++, start, n, values));
}
await timed("sqlite commit", () => store.commitField(stage, `field:sha256:${hash.digest("hex")}`));
await src.close();
stopNetcdf4Worker();
await store.close();
await Deno.remove(dir, { recursive: true });
console.log(JSON.stringify({
  fileMiB: size / 2 ** 20,
  blocks: block,
  loadAverage: Deno.loadavg()[0],
  ms: Object.fromEntries(Object.entries(ms).map(([k, x]) => [k, Math.round(x)])),
  cpuMs: Object.fromEntries(Object.entries(cpuMs).map(([k, x]) => [k, Math.round(x)])),
}));
