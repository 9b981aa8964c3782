/**
 * The application's type and the pieces the routes share with it (the OpenAPI document; zod
 * issues as field errors live in `problems.ts`), kept apart from `app.ts` so routes never
 * import the module that imports them.
 *
 * @module
 */
import type { OpenAPIHono } from "@hono/zod-openapi";
import type { Principal } from "./auth/principal.ts";
import { SERVICE_VERSION } from "./version.ts";

export { zodErrors, zodFieldErrors } from "./problems.ts";

export type AppEnv = { Variables: { requestId: string; principal: Principal } };
export type App = OpenAPIHono<AppEnv>;

/** The OpenAPI 3.1 document of the app. */
export function openApiDocument(app: App) {
  if (!app.openAPIRegistry.definitions.some((d) => d.type === "component" && d.name === "bearer")) {
    app.openAPIRegistry.registerComponent("securitySchemes", "bearer", {
      type: "http",
      scheme: "bearer",
      description: "An API key (`sk_<id>_<secret>`) or the instance's admin key. Needed on an " +
        "instance started with SUNLAG_ADMIN_KEY; without a key only public items are readable.",
    });
  }
  return app.getOpenAPI31Document({
    security: [{ bearer: [] }, {}],
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
