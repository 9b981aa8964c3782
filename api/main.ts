/**
 * Entry point: `deno task start`. Opens the store named by `SUNLAG_STORE` (default an
 * embedded SQLite file under ./data/), marks runs interrupted by a previous stop as failed,
 * loads the demo data into an empty store (unless `SUNLAG_DEMO=0`), starts the worker pool
 * and serves on `HOST:PORT` (default 127.0.0.1:8080). Refuses to start on a non-loopback
 * address without an admin key (or `SUNLAG_OPEN_NETWORK=1`) and a list of allowed hosts.
 *
 * @module
 */
import { readConfig, startupRefusal } from "./config.ts";
import { openStoreFromSpec } from "./store/mod.ts";
import { createService } from "./app.ts";
import { WorkerPool } from "./workers/pool.ts";
import { InThreadExecutor } from "./runs/service.ts";
import { loadDemo } from "./demo.ts";

const t0 = performance.now();
const config = readConfig(Deno.env.toObject());
const refusal = startupRefusal(config);
if (refusal) {
  console.error(JSON.stringify({ level: "error", event: "refused_to_start", reason: refusal }));
  Deno.exit(1);
}
const store = await openStoreFromSpec(config.store);
const interrupted = await store.failInterrupted(
  "The service stopped while this run was queued or running; submit it again.",
);
if (interrupted) {
  console.log(JSON.stringify({ event: "interrupted_runs_failed", count: interrupted }));
}

if (config.demo) {
  const page = await store.listSeries({ limit: 1, offset: 0 });
  if (page.total === 0) {
    const ids = await loadDemo(store);
    console.log(JSON.stringify({ event: "demo_loaded", series: ids.length }));
  }
}

const executor = config.workers > 0 ? new WorkerPool(config.workers) : new InThreadExecutor();
const { app } = createService({ store, config, executor });

Deno.serve({
  hostname: config.host,
  port: config.port,
  onListen: ({ hostname, port }) => {
    console.log(JSON.stringify({
      event: "listening",
      url: `http://${hostname}:${port}/`,
      docs: `http://${hostname}:${port}/v1/docs`,
      store: store.kind,
      workers: config.workers,
      keys_required: config.adminKey !== null,
      allowed_hosts: config.allowedHosts,
      startup_ms: Math.round(performance.now() - t0),
    }));
  },
}, app.fetch);
