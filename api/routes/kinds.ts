/**
 * One POST route per run kind, generated from `RUN_KINDS`: validate with the kind's zod
 * schema (defaults filled), then hand over to the run machinery.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import type { RunKind } from "../runs/kind.ts";
import type { RunService } from "../runs/service.ts";
import { problems, RunSchema } from "../schemas/common.ts";
import { requireJson } from "./media.ts";
import { findUnknownFields } from "./unknown_fields.ts";
import { ProblemError } from "../problems.ts";
import { runViewBytes, runViewParts } from "./runs.ts";
import type { Store } from "../store/types.ts";
import type { Config } from "../config.ts";
import { principalOf } from "../auth/authenticate.ts";
import { holderOf, isLimited, viewerOf } from "../auth/principal.ts";
import { checkStorage } from "../limits/quotas.ts";

const PreferHeader = z.object({
  prefer: z.string().optional().openapi({
    description: "`respond-async` asks for a 202 and background execution",
    example: "respond-async",
  }),
});

/** The run schema of one analysis: the generic run with its kind and typed result. */
export function runSchemaOf(kind: RunKind) {
  const name = kind.kind.split(/[^a-z0-9]+/i).map((w) => w[0].toUpperCase() + w.slice(1))
    .join("");
  return RunSchema.extend({
    kind: z.literal(kind.kind),
    result: kind.result.nullable().openapi({
      description: "The result once the run has succeeded, else null",
    }),
  }).openapi(`${name}Run`);
}

export function registerKindRoutes(
  app: App,
  deps: { runs: RunService; kinds: readonly RunKind[]; store?: Store; config?: Config },
): void {
  for (const kind of deps.kinds) {
    const schema = runSchemaOf(kind);
    const route = createRoute({
      method: "post",
      path: kind.path,
      tags: [kind.tag],
      summary: kind.summary,
      description: kind.description,
      middleware: [requireJson()] as const,
      request: {
        headers: PreferHeader,
        body: { required: true, content: { "application/json": { schema: kind.request } } },
      },
      responses: {
        201: {
          description: "Run recorded (synchronous)",
          content: { "application/json": { schema } },
        },
        202: {
          description: "Run accepted; poll `Location` or its `/events`",
          content: { "application/json": { schema } },
        },
        ...problems(400, 401, 403, 413, 415, 422, 429, 500),
      },
    });
    // deno-lint-ignore no-explicit-any
    app.openapi(route, async (c: any) => {
      const params = c.req.valid("json") as Record<string, unknown>;
      const unknown = findUnknownFields(await c.req.json(), params);
      if (unknown.errors.length) {
        const count = unknown.errors.length + unknown.omitted;
        throw new ProblemError(
          "validation",
          `The request names ${count} field(s) this analysis does not take: ` +
            unknown.errors.slice(0, 5).map((e) => e.pointer).join(", ") +
            (count > 5 ? ", ..." : ""),
          { errors: unknown.errors, errors_omitted: unknown.omitted },
        );
      }
      const principal = principalOf(c);
      const limited = isLimited(principal);
      // A new run is refused while its owner is over the storage quota.
      if (limited && deps.store && deps.config) {
        await checkStorage(deps.store, principal.owner!, 0, deps.config.quotas);
      }
      const prefer = (c.req.header("prefer") ?? "").toLowerCase();
      const outcome = await deps.runs.submit(kind, params, {
        preferAsync: /\brespond-async\b/.test(prefer),
        viewer: viewerOf(principal),
        holder: holderOf(principal),
        limited,
      });
      c.header("Location", `/v1/runs/${outcome.run.id}`);
      if (outcome.status === 202) c.header("Preference-Applied", "respond-async");
      // the result's one serialisation, spliced into the run's JSON
      if (outcome.stored) {
        // the result's bytes as they are (no joined copy), the last byte once stored
        const parts = runViewParts(outcome.run, { saved_series: outcome.saved_series });
        const length = parts.reduce((n, p) => n + p.length, 0);
        return c.body(lastByteWhenStored(parts, outcome.stored, c.get("requestId")), {
          status: outcome.status,
          headers: { "Content-Type": "application/json", "Content-Length": String(length) },
        });
      }
      const body = runViewBytes(outcome.run, { saved_series: outcome.saved_series });
      return c.body(body, {
        status: outcome.status,
        headers: { "Content-Type": "application/json" },
      });
    });
  }
}

/**
 * A response body that sends the bytes of `parts` (joined) but their last byte at once, and the
 * last byte once `stored` resolves: the run is stored while its response travels, and a client
 * never receives a whole response for a run that is not stored. If storing fails the body ends
 * short of its `Content-Length` (the client sees an incomplete response, not a success) and the
 * error is logged with the request id. The parts are sent as they are, not copied; the last one
 * must not be empty.
 *
 * @example
 * ```ts
 * import { lastByteWhenStored } from "./kinds.ts";
 * import assert from "node:assert/strict";
 * const parts = ['{"a":', "1", "}"].map((s) => new TextEncoder().encode(s));
 * const text = await new Response(lastByteWhenStored(parts, Promise.resolve(), "r")).text();
 * assert.equal(text, '{"a":1}');
 * const failed = new Response(lastByteWhenStored(parts, Promise.reject(new Error("disk")), "r"));
 * await assert.rejects(failed.text());
 * ```
 */
export function lastByteWhenStored(
  parts: readonly Uint8Array[],
  stored: Promise<void>,
  requestId: string | undefined,
): ReadableStream<Uint8Array> {
  const last = parts[parts.length - 1];
  let logged = false;
  const logFailure = (e: unknown) => {
    if (logged) return;
    logged = true;
    console.error(JSON.stringify({
      level: "error",
      event: "run_store_failed",
      request_id: requestId,
      error: String((e as Error)?.stack ?? e),
    }));
  };
  let sent = false;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (!sent) {
        sent = true;
        for (const p of parts.slice(0, -1)) if (p.length) controller.enqueue(p);
        if (last.length > 1) controller.enqueue(last.subarray(0, last.length - 1));
        return;
      }
      try {
        await stored;
      } catch (e) {
        logFailure(e);
        controller.error(e);
        return;
      }
      controller.enqueue(last.subarray(last.length - 1));
      controller.close();
    },
    // the client went away: a failure to store is logged all the same
    cancel() {
      stored.catch(logFailure);
    },
  });
}
