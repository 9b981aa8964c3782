/**
 * The request counter and duration histogram of /metrics, counted by hand, give the very lines
 * prom-client's own Counter and Histogram give for the same requests (Prometheus text format).
 */
import assert from "node:assert/strict";
import { Counter, Histogram, Registry } from "prom-client";
import { RequestMetrics } from "../../api/routes/metrics.ts";

Deno.test("RequestMetrics formats as prom-client's Counter and Histogram do", async () => {
  const ours = new Registry();
  const metrics = new RequestMetrics(ours);
  const theirs = new Registry();
  const counter = new Counter({
    name: "sunlag_http_requests_total",
    help: "HTTP requests answered by this process, by method and status code",
    labelNames: ["method", "status"],
    registers: [theirs],
  });
  const histogram = new Histogram({
    name: "sunlag_http_request_duration_seconds",
    help: "Time to answer an HTTP request in this process",
    labelNames: ["method"],
    buckets: [0.001, 0.005, 0.01, 0.05, 0.1, 0.5, 1, 5, 30],
    registers: [theirs],
  });
  assert.equal(await ours.metrics(), await theirs.metrics()); // nothing observed yet
  // durations on bucket bounds, between them, past the last, and zero
  const seen: [string, number, number][] = [
    ["GET", 200, 0.0004],
    ["GET", 304, 0.001],
    ["POST", 201, 0.75],
    ["GET", 200, 0.0011],
    ["HEAD", 200, 0],
    ["GET", 404, 31],
    ["DELETE", 204, 5],
    ["POST", 422, 0.05],
    ["GET", 200, 1e-7],
  ];
  for (let k = 0; k < 50; k++) {
    const [method, status, seconds] = seen[k % seen.length];
    const s = seconds * (1 + (k % 3) * 0.5);
    metrics.observe(method, status, s);
    counter.inc({ method, status: String(status) });
    histogram.observe({ method }, s);
  }
  const text = await ours.metrics();
  assert.equal(text, await theirs.metrics());
  assert.match(text, /^sunlag_http_requests_total\{method="GET",status="200"\} 17$/m);
  assert.match(text, /^sunlag_http_request_duration_seconds_count\{method="POST"\} 11$/m);
});
