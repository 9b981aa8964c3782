/**
 * One timed field upload through the API (`POST /v1/fields`, the body streamed from the file as a
 * client would send it) into a SQLite file store: decode on the file's calendar, hash, store in
 * blocks. Prints one JSON line: wall and CPU seconds (all threads, the HDF5 worker included),
 * the process's peak resident memory (VmHWM), the stored field's shape.
 *
 *   deno run -A test/bench/field_upload_run.ts FILE [--warm] [--readers=N]
 *
 * Without --warm the clock includes loading the HDF5 reader (the first NetCDF-4 upload of a
 * fresh process; it loads while the body is written to a temporary file).
 *
 * @module
 */
import { createService } from "../../api/app.ts";
import { testConfig } from "../../api/config.ts";
import { openSqliteStore } from "../../api/store/sqlite.ts";
import { InThreadExecutor } from "../../api/runs/service.ts";
import { stopNetcdf4Worker } from "../../api/netcdf/mod.ts";
import { NETCDF4_POOL, warmNetcdf4 } from "../../api/netcdf/netcdf4_source.ts";
import process from "node:process";

const [file, ...flags] = Deno.args;
const flag = (name: string) => flags.find((f) => f.startsWith(`--${name}=`))?.split("=")[1];
// NetCDF-4 reader workers (default: the service's)
if (flag("readers")) NETCDF4_POOL.readers = Number(flag("readers"));
// --warm: the readers loaded before the clock starts, as in a service after its first
// NetCDF-4 read (the peer's `import xarray` is outside its clock too)
if (flags.includes("--warm")) await warmNetcdf4();
const dir = await Deno.makeTempDir({ prefix: "sunlag-upload-bench-" });
const store = await openSqliteStore({ path: `${dir}/store.db` });
const { app } = createService({
  store,
  config: testConfig({ fieldLimitBytes: 400 * 2 ** 20 }),
  executor: new InThreadExecutor(),
  role: "api",
});

function peakRss(): number {
  const status = Deno.readTextFileSync("/proc/self/status");
  return Number(/VmHWM:\s+(\d+) kB/.exec(status)?.[1] ?? NaN) * 1024;
}

const size = (await Deno.stat(file)).size;
const body = (await Deno.open(file)).readable;
const c0 = process.cpuUsage();
const t0 = performance.now();
const res = await app.request("/v1/fields?variable=tas", {
  method: "POST",
  headers: { "content-type": "application/x-netcdf", "content-length": String(size) },
  body,
});
const answer = await res.json();
const seconds = (performance.now() - t0) / 1000;
const cpu = process.cpuUsage(c0);
if (res.status !== 201) throw new Error(JSON.stringify(answer));
console.log(JSON.stringify({
  seconds,
  cpuSeconds: (cpu.user + cpu.system) / 1e6,
  peakBytes: peakRss(),
  fileBytes: size,
  shape: [answer.field.n_time, answer.field.n_lat, answer.field.n_lon],
  id: answer.field.id,
}));
stopNetcdf4Worker();
await store.close();
await Deno.remove(dir, { recursive: true });
