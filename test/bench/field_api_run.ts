/**
 * The field-significance workload of field_case.ts (5° field, 2,592 cells, 600 months, lags
 * 0..24, 1,000 phase surrogates, best-lag statistic) through the API, as a user runs it: the
 * field uploaded as NetCDF (`POST /v1/fields`), the predictor as a series, then `POST
 * /v1/solar-signal-maps` computed on a pool of 2 Web Workers (the service's default on 2 cores)
 * over an in-memory store. Prints one JSON line: seconds of the run (from the request to the
 * stored result; the upload timed apart), peak resident memory, and the result's field
 * significance (to compare with field_run.ts and the numpy peer).
 *
 *   deno run -A test/bench/field_api_run.ts [auto | off]
 *
 * The argument is the service's `SUNLAG_BLAS` (default auto: OpenBLAS where it loads).
 *
 * @module
 */
import { createService } from "../../api/app.ts";
import { testConfig } from "../../api/config.ts";
import { openSqliteStore } from "../../api/store/sqlite.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import { encodeNetcdf3 } from "../../core/cf/netcdf3_write.ts";
import { ncText } from "../../core/cf/netcdf_model.ts";
import { fieldCase, MAX_LAG, N_LAT, N_LON, N_TIME, SEED, SURROGATES } from "./field_case.ts";

function peakRss(): number {
  const status = Deno.readTextFileSync("/proc/self/status");
  return Number(/VmHWM:\s+(\d+) kB/.exec(status)?.[1] ?? NaN) * 1024;
}

const { field, x } = fieldCase();
const START = 1950;
const days = (k: number) => {
  const y = START + Math.floor(k / 12), m = k % 12;
  return ((Date.UTC(y, m, 1) + Date.UTC(y, m + 1, 1)) / 2 - Date.UTC(1850, 0, 1)) / 86_400_000;
};
const nc = encodeNetcdf3({
  dimensions: [
    { name: "time", size: N_TIME },
    { name: "lat", size: N_LAT },
    { name: "lon", size: N_LON },
  ],
  variables: [
    {
      name: "time",
      type: "double",
      dimensions: ["time"],
      attributes: [ncText("units", "days since 1850-01-01"), ncText("calendar", "standard")],
      data: Float64Array.from({ length: N_TIME }, (_, k) => days(k)),
    },
    {
      name: "lat",
      type: "double",
      dimensions: ["lat"],
      attributes: [ncText("units", "degrees_north")],
      data: field.lat,
    },
    {
      name: "lon",
      type: "double",
      dimensions: ["lon"],
      attributes: [ncText("units", "degrees_east")],
      data: field.lon,
    },
    {
      name: "tas",
      type: "float",
      dimensions: ["time", "lat", "lon"],
      attributes: [ncText("units", "K")],
      data: field.values,
    },
  ],
});

const store = await openSqliteStore({ path: ":memory:" });
const blas = Deno.args[0] === "off" ? "off" : "auto";
const pool = new WorkerPool(2, undefined, { blas });
const { app, runs } = createService({
  store,
  config: testConfig({ workers: 2, blas }),
  executor: pool,
});
const t0 = performance.now();
const up = await app.request("/v1/fields?quantity=temperature_anomaly", {
  method: "POST",
  headers: { "content-type": "application/x-netcdf" },
  body: new Uint8Array(nc),
});
const fieldId = (await up.json()).field.id;
const uploadSeconds = (performance.now() - t0) / 1000;
const month = (k: number) =>
  `${START + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, "0")}`;
const s = await app.request("/v1/series", {
  method: "POST",
  headers: { "content-type": "application/json" },
  body: JSON.stringify({
    name: "benchmark predictor",
    quantity: "tsi",
    units: "W m-2",
    time: Array.from({ length: N_TIME }, (_, k) => month(k)),
    value: Array.from(x, (v) => 1361 + v),
  }),
});
const solar = (await s.json()).series.id;
// warm-up: the workers compile their modules before the clock starts
await app.request("/v1/solar-signal-maps", {
  method: "POST",
  headers: { "content-type": "application/json" },
  body: JSON.stringify({ field: fieldId, solar, max_lag: 2, surrogates: 99 }),
});
const t1 = performance.now();
const res = await app.request("/v1/solar-signal-maps", {
  method: "POST",
  headers: { "content-type": "application/json", Prefer: "respond-async" },
  body: JSON.stringify({
    field: fieldId,
    solar,
    min_lag: 0,
    max_lag: MAX_LAG,
    preprocess: "mean",
    deseasonalise: false,
    surrogates: SURROGATES,
    seed: SEED,
  }),
});
const id = (await res.json()).id;
await runs.settle();
const seconds = (performance.now() - t1) / 1000;
const run = await (await app.request(`/v1/runs/${id}`)).json();
if (run.status !== "succeeded") throw new Error(JSON.stringify(run.error));
const mc = run.result.field_significance.monte_carlo;
console.log(JSON.stringify({
  variant: `api ${blas}`,
  resultDigest: run.result_digest,
  seconds,
  uploadSeconds,
  stages: { upload: uploadSeconds },
  peakBytes: peakRss(),
  pField: mc.p_field,
  observedFraction: mc.observed_fraction,
  observedBest: mc.observed_best,
  nullQ95: mc.null_best.q95,
}));
pool.terminate();
await store.close();
