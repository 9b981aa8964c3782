/**
 * `GET /v1/runs/{id}/spectrum`: the spectrum over time that a run's result holds (a spectral
 * reconstruction: values and uncertainties per wavelength band and time cell), as JSON or as
 * long-form CSV (`?format=csv` or `Accept: text/csv`) or NetCDF-CF on a model calendar
 * (`?format=netcdf&calendar=noleap`). Immutable like every finished run.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import type { Store } from "../store/types.ts";
import type { Config } from "../config.ts";
import { principalOf } from "../auth/authenticate.ts";
import { mustSeeRun, sharedCacheable } from "../auth/access.ts";
import { RunIdString } from "../schemas/ids.ts";
import { ProblemError } from "../problems.ts";
import { problems } from "../schemas/common.ts";
import { wantsCsv } from "./format.ts";
import { notModified, setImmutableHeaders } from "./cache.ts";
import { SpectrumBlock } from "../analyses/common/spectrum_block.ts";
import { spectrumToCsv } from "../export/spectrum_csv.ts";
import {
  CalendarQuery,
  NETCDF_CONTENT,
  runSpectrumNetcdfResponse,
  wantsNetcdf,
} from "../netcdf/http.ts";

export function registerSpectrumRoutes(
  app: App,
  deps: { store: Store; config?: Config },
): void {
  const { store } = deps;
  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/spectrum",
      tags: ["Runs"],
      summary: "The spectrum over time of a spectral run, as JSON, long-form CSV " +
        "(`Accept: text/csv` or `?format=csv`: date, decimal_year, band_lower_nm, " +
        "band_upper_nm, value, uncertainty, lower, upper) or NetCDF-CF with a wavelength " +
        "coordinate and wavelength_bnds on any model calendar (`?format=netcdf&calendar=`)",
      request: {
        params: z.object({
          id: RunIdString.openapi({ param: { name: "id", in: "path" } }),
        }),
        query: z.object({
          format: z.enum(["json", "csv", "netcdf"]).optional(),
          calendar: CalendarQuery,
        }),
      },
      responses: {
        200: {
          description: "The spectrum",
          content: {
            "application/json": { schema: SpectrumBlock },
            "text/csv": { schema: z.string() },
            ...NETCDF_CONTENT,
          },
        },
        304: { description: "Not modified" },
        ...problems(404, 409, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const { id } = c.req.valid("param");
      const holding = await mustSeeRun(store, principalOf(c), id);
      const shared = sharedCacheable(principalOf(c), holding);
      const run = await store.getRun(id);
      if (!run) throw new ProblemError("not-found", `No run has id ${id}`);
      if (run.status !== "succeeded" || !run.result) {
        throw new ProblemError(
          "conflict",
          `Run ${id} has status ${run.status}; its spectrum exists once it has succeeded`,
          {},
          { "Cache-Control": "no-store" },
        );
      }
      const parsed = SpectrumBlock.safeParse(run.result.spectrum);
      if (!parsed.success) {
        throw new ProblemError(
          "not-found",
          `Run ${id} (kind ${run.kind}) has no spectrum; spectral reconstructions have one`,
        );
      }
      if (wantsNetcdf(c)) return runSpectrumNetcdfResponse(c, run, parsed.data);
      const csv = wantsCsv(c);
      const etag = `"run-${run.id}-${run.result_digest}-spectrum-${csv ? "csv" : "json"}"`;
      const nm = notModified(c, etag, shared);
      if (nm) return nm;
      setImmutableHeaders(c, etag, shared);
      c.header("Vary", "Accept");
      if (csv) {
        c.header("Content-Type", "text/csv; charset=utf-8");
        return c.body(spectrumToCsv(run, parsed.data));
      }
      return c.json({
        run_id: run.id,
        result_digest: run.result_digest,
        cautions: run.result.cautions ?? [],
        ...parsed.data,
      });
    }) as never,
  );
}
