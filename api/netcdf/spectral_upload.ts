/**
 * A NetCDF spectral record uploaded as one file: a (time, wavelength) variable with the
 * wavelength coordinate's bounds (`wavelength_bnds`) becomes one normalised series per band
 * (quantity spectral_irradiance for W m-2 nm-1 and its other scales, band_irradiance for
 * W m-2), each checked as any upload is (api/ingest/normalise.ts), and the band list a spectral
 * model request takes. Nothing is stored here; the route stores every band or none.
 *
 * @module
 */
import type { Context } from "hono";
import { z } from "@hono/zod-openapi";
import { attributeText } from "../../core/cf/netcdf_model.ts";
import { unitsForQuantity } from "../../core/series/quantities.ts";
import { type FieldError, ProblemError } from "../problems.ts";
import { checkMeta, ErrorList, finish, type SeriesMetaInput } from "../ingest/normalise.ts";
import type { NormalisedSeries } from "../ingest/types.ts";
import { readCfSpectrum } from "./cf_spectrum.ts";
import { describePlacement } from "./cf_time_axis.ts";
import { NetcdfError } from "./errors.ts";
import { withNetcdf, withTempUpload } from "./open.ts";
import { netcdfProblem, onlyTimeDataVariable } from "./http.ts";

/** Query of a spectral record upload. */
export const SpectralUploadQuery = z.object({
  variable: z.string().min(1).max(200).optional().openapi({
    description: "The (time, wavelength) variable; default: the only one in the file",
  }),
  name: z.string().min(1).max(160).optional().openapi({
    description: "Name of the record; each band's series is named '<name> <lower>-<upper> nm' " +
      "(default: the variable's long_name)",
  }),
  description: z.string().max(4000).optional(),
  source: z.string().max(2000).optional(),
}).strict();

/** What a spectral upload yields before anything is stored. */
export interface SpectralUploadOutcome {
  bands: { lower: number; upper: number; series: NormalisedSeries }[];
  report: Record<string, unknown>;
}

/** The quantity band series of these units are. */
function quantityOf(units: string): "spectral_irradiance" | "band_irradiance" | null {
  if (unitsForQuantity("spectral_irradiance", units).ok) return "spectral_irradiance";
  if (unitsForQuantity("band_irradiance", units).ok) return "band_irradiance";
  return null;
}

/**
 * Read a NetCDF spectral record upload into one normalised series per band.
 *
 * @throws {ProblemError} 415 (not NetCDF), 413 (too large), 422 (bad query, unusable file, a
 *   band that is not a series: the band's index and bounds named)
 */
export async function ingestSpectralUpload(
  c: Context,
  limitBytes: number,
): Promise<SpectralUploadOutcome> {
  const parsed = SpectralUploadQuery.safeParse(c.req.query());
  if (!parsed.success) {
    const errors: FieldError[] = parsed.error.issues.map((i) => ({
      pointer: "/" +
        (i.code === "unrecognized_keys"
          ? (i as { keys: string[] }).keys[0]
          : i.path.map(String).join("/")),
      in: "query",
      message: i.message,
    }));
    throw new ProblemError("validation", "The query of the spectral upload failed validation", {
      errors,
    });
  }
  const q = parsed.data;
  try {
    return await withTempUpload(
      c.req.raw.body,
      limitBytes,
      (path) =>
        withNetcdf(path, async (src) => {
          const name = q.variable ?? onlyTimeDataVariable(src, 1);
          const s = await readCfSpectrum(src, name);
          const units = (attributeText(s.attributes, "units") ?? "").trim();
          const quantity = quantityOf(units);
          if (!quantity) {
            throw new ProblemError(
              "validation",
              `Variable "${name}" has units "${
                units || "(none)"
              }", not spectral irradiance: W m-2 nm-1 (or mW m-2 nm-1, W m-2 um-1, W m-2 m-1) per nm, or W m-2 per band`,
              {
                errors: [{ pointer: "/variable", in: "query", message: "not spectral irradiance" }],
              },
            );
          }
          const title = q.name ?? attributeText(s.attributes, "long_name") ?? name;
          const bands = s.bands.map((b, k) => {
            const errors = new ErrorList();
            const label = `${b.lower}-${b.upper} nm`;
            const meta: SeriesMetaInput = {
              name: `${title} ${label}`.slice(0, 200),
              quantity,
              units,
              description: q.description ??
                `Band ${label} of variable "${name}" of an uploaded NetCDF spectral record`,
              source: q.source ?? attributeText(src.header.attributes, "source") ?? null,
              version: null,
            };
            const checked = checkMeta(meta, () => ({ pointer: "/variable", in: "query" }), errors);
            const r = finish(
              {
                time: s.time.decimalYears,
                value: s.values[k],
                uncertainty: null,
                where: (i) => ({ pointer: "", column: `${name}[${label}]`, row: i }),
                whole: { pointer: "/variable", in: "query", column: `${name}[${label}]` },
              },
              checked,
              "reject",
              errors,
            );
            if (!r.ok) {
              throw new ProblemError(
                "validation",
                `Band ${k} (${label}) of "${name}" is not a usable series: ${r.errors[0]?.message}`,
                { errors: r.errors.slice(0, 20), band: k },
              );
            }
            return { lower: b.lower, upper: b.upper, series: r.series };
          });
          return {
            bands,
            report: {
              format: src.header.format,
              variable: name,
              quantity,
              units,
              bands: bands.length,
              wavelength_variable: s.wavelengthVariable,
              bounds_variable: s.boundsVariable,
              calendar: s.time.calendar,
              time_units: s.time.units,
              time_placement: describePlacement(s.time.placement, s.time.calendar),
            },
          };
        }),
    );
  } catch (e) {
    if (e instanceof NetcdfError) throw netcdfProblem(e);
    throw e;
  }
}
