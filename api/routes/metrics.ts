/**
 * `GET /metrics` in the Prometheus text exposition format (prom-client): HTTP requests and
 * their durations in this process, its memory, runs by status in the store, and the run queue (depth,
 * oldest waiting run, active runs, workers seen), which every instance reads from the shared
 * store so any of them can be scraped.
 *
 * @module
 */
import { Gauge, Registry } from "prom-client";
import type { App } from "../app_env.ts";
import type { Store } from "../store/types.ts";
import type { RunQueue } from "../queue/types.ts";

const STATUSES = ["queued", "running", "succeeded", "failed", "cancelled"] as const;

/** Upper bounds of the request-duration histogram's buckets, seconds. */
const DURATION_BOUNDS = [0.001, 0.005, 0.01, 0.05, 0.1, 0.5, 1, 5, 30];

/** A metric's values in the shape prom-client's registry formats (`Registry.registerMetric`). */
interface MetricValues {
  name: string;
  help: string;
  type: "counter" | "histogram";
  aggregator: "sum";
  values: {
    value: number;
    labels: Record<string, string | number>;
    metricName?: string;
    sharedLabels?: Record<string, string>;
  }[];
}

/**
 * The request counter and the request-duration histogram, counted in plain numbers and handed to
 * the registry as values when scraped, where it formats them as it formats its own counters
 * and histograms (the same lines, in the same order). Written by hand because prom-client's
 * `inc` and `observe` hash their label objects on every call: 0.8 µs per request together
 * (deno bench), a tenth of a cached GET's time on the request thread; this takes a few dozen
 * nanoseconds.
 */
export class RequestMetrics {
  readonly #counts = new Map<string, { method: string; status: string; n: number }>();
  readonly #durations = new Map<string, { buckets: Float64Array; sum: number; count: number }>();

  constructor(registry: Registry) {
    const counts = this.#counts, durations = this.#durations;
    const counter = {
      name: "sunlag_http_requests_total",
      help: "HTTP requests answered by this process, by method and status code",
      type: "counter",
      get(): MetricValues {
        return {
          name: this.name,
          help: this.help,
          type: "counter",
          aggregator: "sum",
          values: [...counts.values()].map((c) => ({
            value: c.n,
            labels: { method: c.method, status: c.status },
          })),
        };
      },
    };
    const histogram = {
      name: "sunlag_http_request_duration_seconds",
      help: "Time to answer an HTTP request in this process",
      type: "histogram",
      get(): MetricValues {
        const name = this.name;
        const values: MetricValues["values"] = [];
        for (const [method, d] of durations) {
          const sharedLabels = { method };
          let acc = 0;
          DURATION_BOUNDS.forEach((le, i) => {
            acc += d.buckets[i];
            values.push({ value: acc, labels: { le }, metricName: `${name}_bucket`, sharedLabels });
          });
          values.push(
            { value: d.count, labels: { le: "+Inf" }, metricName: `${name}_bucket`, sharedLabels },
            { value: d.sum, labels: {}, metricName: `${name}_sum`, sharedLabels },
            { value: d.count, labels: {}, metricName: `${name}_count`, sharedLabels },
          );
        }
        return { name, help: this.help, type: "histogram", aggregator: "sum", values };
      },
    };
    // deno-lint-ignore no-explicit-any
    registry.registerMetric(counter as any);
    // deno-lint-ignore no-explicit-any
    registry.registerMetric(histogram as any);
  }

  observe(method: string, status: number, seconds: number): void {
    const key = method + status;
    const c = this.#counts.get(key);
    if (c) c.n++;
    else this.#counts.set(key, { method, status: String(status), n: 1 });
    let d = this.#durations.get(method);
    if (!d) {
      this.#durations.set(
        method,
        d = { buckets: new Float64Array(DURATION_BOUNDS.length), sum: 0, count: 0 },
      );
    }
    d.sum += seconds;
    d.count++;
    // the first bucket whose upper bound is at or above the duration (none past the last)
    for (let i = 0; i < DURATION_BOUNDS.length; i++) {
      if (seconds <= DURATION_BOUNDS[i]) {
        d.buckets[i]++;
        break;
      }
    }
  }
}

/** The service's metrics; `observe` is called once per HTTP request. */
export class ServiceMetrics {
  readonly registry = new Registry();
  readonly #requests: RequestMetrics;

  constructor(store: Store, queue: RunQueue) {
    const registers = [this.registry];
    this.#requests = new RequestMetrics(this.registry);
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
    this.#requests.observe(method, status, seconds);
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
