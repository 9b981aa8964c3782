/**
 * `POST /v1/series/spectral`: a spectral record uploaded as one NetCDF file (a (time,
 * wavelength) variable with `wavelength_bnds`), stored as one series per band; the answer
 * lists the bands with their series ids exactly as a spectral model request takes them.
 * Every band is checked before any is stored, so a bad file stores nothing.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import type { Store } from "../store/types.ts";
import type { Config } from "../config.ts";
import { ProblemError } from "../problems.ts";
import { problems } from "../schemas/common.ts";
import { principalOf } from "../auth/authenticate.ts";
import { holderOf, isLimited } from "../auth/principal.ts";
import { checkStorage } from "../limits/quotas.ts";
import { storedFromNormalised } from "../series_codec.ts";
import { isNetcdfMediaType, NETCDF_CONTENT, NETCDF_MEDIA_TYPE } from "../netcdf/http.ts";
import { ingestSpectralUpload, SpectralUploadQuery } from "../netcdf/spectral_upload.ts";

const SpectralUploadAnswer = z.object({
  bands: z.array(z.object({
    lower: z.number().openapi({ description: "nm" }),
    upper: z.number().openapi({ description: "nm" }),
    series: z.string().openapi({ description: "Id of the band's stored series" }),
  })).openapi({ description: "As the `bands` of a spectral model request" }),
  created: z.number().int().openapi({ description: "Bands stored now (others existed)" }),
  report: z.record(z.string(), z.unknown()),
}).openapi("SpectralUploadAnswer");

export function registerSpectralUploadRoutes(
  app: App,
  deps: { store: Store; config: Config },
): void {
  const { store } = deps;
  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/series/spectral",
      tags: ["Series"],
      summary: "Upload a spectral record as NetCDF: one series per wavelength band",
      description: "The body is a NetCDF-3 or NetCDF-4 file with a variable along a CF time " +
        "coordinate and one wavelength dimension whose coordinate has `bounds` " +
        "(wavelength_bnds, in nm, µm or m), in units of spectral irradiance (W m-2 nm-1 and " +
        "scales of it, stored as spectral_irradiance) or W m-2 per band (band_irradiance). " +
        "CF time on any calendar, `_FillValue`/`missing_value` and packing are decoded as for " +
        "series. Each band is stored as a series (content-addressed); the answer's `bands` go " +
        "straight into POST /v1/irradiance/spectral-models.",
      request: {
        query: SpectralUploadQuery,
        body: { required: true, content: NETCDF_CONTENT },
      },
      responses: {
        201: {
          description: "Stored",
          content: { "application/json": { schema: SpectralUploadAnswer } },
        },
        ...problems(401, 403, 413, 415, 422, 429),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const principal = principalOf(c);
      const ct = (c.req.header("content-type") ?? "").split(";")[0].trim().toLowerCase();
      if (!isNetcdfMediaType(ct)) {
        throw new ProblemError(
          "unsupported-media-type",
          `Upload a spectral record as ${NETCDF_MEDIA_TYPE}; the request said "${
            ct || "(no Content-Type)"
          }" (band by band, use POST /v1/series for each band)`,
          {},
          { Accept: NETCDF_MEDIA_TYPE },
        );
      }
      const outcome = await ingestSpectralUpload(c, deps.config.bodyLimitBytes);
      const stored = await Promise.all(
        outcome.bands.map((b) => storedFromNormalised(b.series, null)),
      );
      if (isLimited(principal)) {
        const points = stored.reduce((s, x) => s + x.n, 0);
        await checkStorage(store, principal.owner!, points * 24, deps.config.quotas);
      }
      let created = 0;
      for (const s of stored) {
        if ((await store.putSeries(s, holderOf(principal))).created) created++;
      }
      return c.json({
        bands: outcome.bands.map((b, k) => ({
          lower: b.lower,
          upper: b.upper,
          series: stored[k].id,
        })),
        created,
        report: outcome.report,
      }, 201);
    }) as never,
  );
}
