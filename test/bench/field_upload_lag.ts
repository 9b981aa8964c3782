/**
 * How long the request thread is held during one field upload: a 10-ms timer runs while the
 * upload of test/bench/field_upload_medians.ts's file (decode, hash, store into a SQLite file
 * store; no HTTP) goes on, and its delays beyond 10 ms are what a health check would wait.
 * Prints one JSON line: the upload's wall milliseconds and the delays' p50, p99 and maximum.
 * Run it on two checkouts in alternation to compare them (the machine's other load shows too).
 *
 *   deno run -A test/bench/field_upload_lag.ts test/output/field_upload/field150.nc
 *
 * @module
 */
import { openSqliteStore } from "../../api/store/sqlite.ts";
import { withNetcdf, withTempUpload } from "../../api/netcdf/open.ts";
import { storeNetcdfField } from "../../api/fields/ingest.ts";
import { stopNetcdf4Worker } from "../../api/netcdf/mod.ts";

const file = Deno.args[0];
const dir = await Deno.makeTempDir({ prefix: "sunlag-upload-lag-" });
const store = await openSqliteStore({ path: `${dir}/store.db` });
const delays: number[] = [];
let last = performance.now();
const timer = setInterval(() => {
  const now = performance.now();
  delays.push(now - last - 10);
  last = now;
}, 10);
const t0 = performance.now();
await withTempUpload(
  (await Deno.open(file)).readable,
  400 * 2 ** 20,
  (path) => withNetcdf(path, (src) => storeNetcdfField(src, store, { variable: "tas" })),
);
const wall = performance.now() - t0;
clearInterval(timer);
delays.sort((a, b) => a - b);
const q = (p: number) =>
  Math.round(delays[Math.min(delays.length - 1, Math.floor(p * delays.length))]);
console.log(JSON.stringify({ wallMs: Math.round(wall), p50: q(0.5), p99: q(0.99), max: q(1) }));
stopNetcdf4Worker();
await store.close();
await Deno.remove(dir, { recursive: true });
