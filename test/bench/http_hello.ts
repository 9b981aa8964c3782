/**
 * Baseline for test/bench/http_bench.sh: a Hono hello-world on Deno.serve, the ceiling any
 * route of the service can reach on this machine. Usage: deno run -A http_hello.ts PORT
 *
 * @module
 */
import { Hono } from "hono";

const app = new Hono();
app.get("/", (c) => c.text("Hello, world"));

Deno.serve(
  { hostname: "127.0.0.1", port: Number(Deno.args[0] ?? 18431), onListen() {} },
  app.fetch,
);
