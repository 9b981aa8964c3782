/**
 * The application's type and the pieces the routes share with it (zod issues as field
 * errors, the OpenAPI document), kept apart from `app.ts` so routes never import the module
 * that imports them.
 *
 * @module
 */
import type { OpenAPIHono } from "@hono/zod-openapi";
import { toPointer } from "./problems.ts";
import { SERVICE_VERSION } from "./version.ts";

export type AppEnv = { Variables: { requestId: string } };
export type App = OpenAPIHono<AppEnv>;

/** Map zod issues to field errors with JSON Pointers. */
export function zodErrors(
  issues: readonly { path: readonly PropertyKey[]; message: string }[],
  where: "body" | "query" | "path" | "header",
) {
  // A union reports one issue per branch at the same place: merge them into one entry.
  const byPointer = new Map<string, string[]>();
  for (const i of issues) {
    const p = toPointer(i.path);
    const list = byPointer.get(p) ?? [];
    if (!list.includes(i.message)) list.push(i.message);
    byPointer.set(p, list);
  }
  return [...byPointer].map(([pointer, messages]) => ({
    pointer,
    message: messages.join("; or "),
    ...(where === "body" ? {} : { in: where }),
  }));
}

/** The OpenAPI 3.1 document of the app. */
export function openApiDocument(app: App) {
  return app.getOpenAPI31Document({
    openapi: "3.1.0",
    info: {
      title: "sunlag",
      version: SERVICE_VERSION,
      description:
        "Solar activity records turned into climate-ready numbers: stored series, recorded and replayable runs. " +
        "Correlation is not attribution; reconstructions before the satellite era are model-dependent; " +
        "results do not replace peer-reviewed assessment.",
    },
    servers: [{ url: "/" }],
  });
}
