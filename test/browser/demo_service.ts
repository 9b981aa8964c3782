/**
 * The service as the browser tests meet it: listening on 127.0.0.1 (a free port), an in-memory
 * store with the SYNTHETIC demo data, and a pool of two Web Workers. Run this file directly to
 * browse the same service by hand: `deno run -A test/browser/demo_service.ts`.
 *
 * @module
 */
import { createService, type Service } from "../../api/app.ts";
import { type Config, testConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import { loadDemo } from "../../api/demo.ts";

export interface DemoService {
  /** Base URL, e.g. http://127.0.0.1:43117 */
  url: string;
  service: Service;
  /** Ids of the demo series. */
  demoIds: string[];
  close(): Promise<void>;
}

/**
 * Start the service with the demo data on a free port of 127.0.0.1 (any port is an allowed
 * `Host`); `config` overrides the test defaults (e.g. an admin key).
 */
export async function startDemoService(
  port = 0,
  config: Partial<Config> = {},
): Promise<DemoService> {
  const store = await openStoreFromSpec("sqlite::memory:");
  const demoIds = await loadDemo(store);
  const pool = new WorkerPool(2);
  const service = createService({
    store,
    config: testConfig({ workers: 2, allowedHosts: ["127.0.0.1", "localhost"], ...config }),
    executor: pool,
  });
  const server = Deno.serve(
    { hostname: "127.0.0.1", port, onListen: () => {} },
    service.app.fetch,
  );
  return {
    url: `http://127.0.0.1:${server.addr.port}`,
    service,
    demoIds,
    async close() {
      await server.shutdown();
      await service.runs.settle();
      pool.terminate();
      await store.close();
    },
  };
}

if (import.meta.main) {
  const port = Number(Deno.args[0] ?? 8099);
  const svc = await startDemoService(port);
  console.log(`serving ${svc.url}/ with ${svc.demoIds.length} demo series`);
}
