/**
 * Entry point: `deno task start`. Opens the store named by `SUNLAG_STORE` (default an
 * embedded SQLite file under ./data/), sets up the run queue (in this process for SQLite;
 * pg-boss on the store's database for PostgreSQL), fails the runs nobody will finish, loads
 * the demo data into an empty store (unless `SUNLAG_DEMO=0`), and then, by `SUNLAG_ROLE`:
 * `all` (default) serves HTTP on `HOST:PORT` (default 127.0.0.1:8080) and computes runs;
 * `api` only serves; `worker` only computes queued runs. Refuses to
 * start on a non-loopback address without an admin key (or `SUNLAG_OPEN_NETWORK=1`) and a list
 * of allowed hosts.
 *
 * @module
 */
import { readConfig, startupRefusal } from "./config.ts";
import { openStoreFromSpec } from "./store/mod.ts";
import { createService } from "./app.ts";
import { WorkerPool } from "./workers/pool.ts";
import { InThreadExecutor, processHolder, RunService } from "./runs/service.ts";
import { loadDemo } from "./demo.ts";
import { openTransport } from "./queue/mod.ts";
import { RUN_KINDS } from "./analyses/registry.ts";
import { seriesCodec } from "./series_codec.ts";
import { machineSpeedFactor } from "./runs/estimate.ts";
import { productEngine, setProductEngineSetting } from "./workers/openblas_product.ts";

const t0 = performance.now();
const config = readConfig(Deno.env.toObject());
const refusal = startupRefusal(config);
if (refusal) {
  console.error(JSON.stringify({ level: "error", event: "refused_to_start", reason: refusal }));
  Deno.exit(1);
}
const store = await openStoreFromSpec(config.store);
const holder = processHolder();
const transport = await openTransport(config, holder);
// The embedded service's queue died with the previous process: everything left open is
// orphaned. With a shared queue only runs whose worker's lease expired long ago are.
const orphaned = await store.failOrphaned(
  "The service stopped while this run was queued or running; submit it again.",
  { all: transport.queue.volatile, graceSeconds: 600 },
);
if (orphaned) console.log(JSON.stringify({ event: "orphaned_runs_failed", count: orphaned }));

if (config.demo && config.role !== "worker") {
  const page = await store.listSeries({ limit: 1, offset: 0 });
  if (page.total === 0) {
    const ids = await loadDemo(store);
    const fields = (await store.listFields({ limit: 1, offset: 0 })).total;
    console.log(JSON.stringify({ event: "demo_loaded", series: ids.length, fields }));
  }
}

// the product engine of the field-significance chunks, here (in-thread compute) and in workers;
// loaded here too, so that a native library stays mapped while workers come and go
setProductEngineSetting(config.blas);
const productEngineName = productEngine().name;
const pool = config.workers > 0
  ? new WorkerPool(config.workers, undefined, { blas: config.blas })
  : null;
const executor = pool ?? new InThreadExecutor();
/**
 * Warm the compute workers up (api/workers/warm_up.ts) in the background once this process
 * is ready, so that the first user's run does not pay for compiling the hot code. Started
 * earlier, the warm-up competes with start-up for the cores and delays the health check.
 */
function warmWorkers(): void {
  pool?.warmUp().then((timings) => {
    console.log(
      JSON.stringify({ event: "workers_warm", ms: Math.round(performance.now() - t0), timings }),
    );
  });
}
// the estimates' machine-speed factor, measured now rather than on the first request
const speedFactor = Math.round(machineSpeedFactor() * 100) / 100;

if (config.role === "worker") {
  const runs = new RunService(store, RUN_KINDS, seriesCodec, executor, {
    asyncSeconds: config.asyncSeconds,
    wallSeconds: config.runWallSeconds,
  }, transport);
  await runs.startWorking(Math.max(1, config.workers));
  console.log(JSON.stringify({
    event: "worker_ready",
    holder,
    queue: transport.queue.engine,
    store: store.kind,
    workers: config.workers,
    product_engine: productEngineName,
    startup_ms: Math.round(performance.now() - t0),
  }));
  warmWorkers();
} else {
  const { app } = createService({
    store,
    config,
    executor,
    transport,
    role: config.role === "api" ? "api" : "all",
  });
  Deno.serve({
    hostname: config.host,
    port: config.port,
    onListen: ({ hostname, port }) => {
      console.log(JSON.stringify({
        event: "listening",
        url: `http://${hostname}:${port}/`,
        docs: `http://${hostname}:${port}/v1/docs`,
        role: config.role,
        queue: transport.queue.engine,
        store: store.kind,
        workers: config.workers,
        product_engine: productEngineName,
        speed_factor: speedFactor,
        keys_required: config.adminKey !== null,
        allowed_hosts: config.allowedHosts,
        startup_ms: Math.round(performance.now() - t0),
      }));
      warmWorkers();
    },
  }, app.fetch);
}
