/**
 * `GET /metrics` in the Prometheus text exposition format (prom-client): HTTP requests and
 * their durations in this process, its memory, runs by status in the store, and the run queue (depth,
 * oldest waiting run, active runs, workers seen), which every instance reads from the shared
 * store so any of them can be scraped.
 *
 * @module
 */
import { Counter, Gauge, Histogram, Registry } from "prom-client";
import type { App } from "../app_env.ts";
import type { Store } from "../store/types.ts";
import type { RunQueue } from "../queue/types.ts";

const STATUSES = ["queued", "running", "succeeded", "failed", "cancelled"] as const;

/** The service's metrics; `observe` is called once per HTTP request. */
export class ServiceMetrics {
  readonly registry = new Registry();
  readonly #requests: Counter<"method" | "status">;
  readonly #duration: Histogram<"method">;

  constructor(store: Store, queue: RunQueue) {
    const registers = [this.registry];
    this.#requests = new Counter({
      name: "sunlag_http_requests_total",
      help: "HTTP requests answered by this process, by method and status code",
      labelNames: ["method", "status"],
      registers,
    });
    this.#duration = new Histogram({
      name: "sunlag_http_request_duration_seconds",
      help: "Time to answer an HTTP request in this process",
      labelNames: ["method"],
      buckets: [0.001, 0.005, 0.01, 0.05, 0.1, 0.5, 1, 5, 30],
      registers,
    });
    new Gauge({
      name: "sunlag_runs",
      help: "Runs in the store by status",
      labelNames: ["status"],
      registers,
      async collect() {
        for (const status of STATUSES) {
          const page = await store.listRuns({ status, limit: 1, offset: 0 });
          this.set({ status }, page.total);
        }
      },
    });
    let stats: Promise<Awaited<ReturnType<RunQueue["stats"]>>> | null = null;
    const queueStats = () => {
      // One queue query per scrape, shared by the four gauges below.
      stats ??= queue.stats().finally(() => setTimeout(() => stats = null, 0));
      return stats;
    };
    const gauge = (name: string, help: string, pick: (s: Awaited<typeof stats>) => number) =>
      new Gauge({
        name,
        help,
        labelNames: ["engine"],
        registers,
        async collect() {
          this.set({ engine: queue.engine }, pick(await queueStats()));
        },
      });
    new Gauge({
      name: "sunlag_process_memory_bytes",
      help: "Memory of this process (Deno.memoryUsage): rss is the resident set of the whole " +
        "process (compute workers included), heap_used and heap_total the request thread's heap",
      labelNames: ["kind"],
      registers,
      collect() {
        const m = Deno.memoryUsage();
        this.set({ kind: "rss" }, m.rss);
        this.set({ kind: "heap_used" }, m.heapUsed);
        this.set({ kind: "heap_total" }, m.heapTotal);
        this.set({ kind: "external" }, m.external);
      },
    });
    gauge("sunlag_queue_depth", "Runs waiting for a worker", (s) => s!.depth);
    gauge("sunlag_queue_active", "Runs being computed", (s) => s!.active);
    gauge(
      "sunlag_queue_oldest_seconds",
      "Age of the oldest waiting run (0 when none waits)",
      (s) => s!.oldest_seconds ?? 0,
    );
    gauge(
      "sunlag_queue_workers_seen",
      "Worker processes seen in the last 30 s",
      (s) => s!.workers_seen,
    );
  }

  observe(method: string, status: number, seconds: number): void {
    this.#requests.inc({ method, status: String(status) });
    this.#duration.observe({ method }, seconds);
  }
}

export function registerMetricsRoutes(app: App, metrics: ServiceMetrics): void {
  app.get("/metrics", async (c) => {
    const body = await metrics.registry.metrics();
    return c.body(body, 200, {
      "Content-Type": metrics.registry.contentType,
      "Cache-Control": "no-store",
    });
  });
}
