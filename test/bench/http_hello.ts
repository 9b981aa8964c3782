/**
 * Baseline for test/bench/http_bench.sh: a Hono hello-world on Deno.serve, the ceiling any
 * route of the service can reach on this machine; `/bytes/N` answers N bytes, the ceiling for a
 * body of that size. Usage: deno run -A http_hello.ts PORT
 *
 * @module
 */
import { Hono } from "hono";

const app = new Hono();
app.get("/", (c) => c.text("Hello, world"));
// The same hello-world answering a fixed body of n bytes (made once), to compare routes whose
// bodies are large with the ceiling for that many bytes.
const bodies = new Map<number, Uint8Array<ArrayBuffer>>();
app.get("/bytes/:n", (c) => {
  const n = Math.min(1 << 24, Math.max(0, Number(c.req.param("n")) | 0));
  let b = bodies.get(n);
  if (!b) bodies.set(n, b = new Uint8Array(n).fill(0x20));
  return c.body(b, 200, { "Content-Type": "application/json" });
});

Deno.serve(
  { hostname: "127.0.0.1", port: Number(Deno.args[0] ?? 18431), onListen() {} },
  app.fetch,
);
