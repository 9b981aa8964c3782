/**
 * A spectrum over time in a result: values and standard uncertainties per wavelength band and
 * time cell, with the band bounds and units, served as JSON, as long-form CSV and as
 * NetCDF-CF (api/netcdf/spectrum_dataset.ts) by `GET /v1/runs/{id}/spectrum`.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { nums, numsOrNull } from "./result_parts.ts";

/** Band (or range) bounds, nm. */
export const BandBounds = z.object({
  lower: z.number().openapi({ description: "nm, included" }),
  upper: z.number().openapi({ description: "nm, excluded" }),
}).openapi("WavelengthBounds");

export const SpectrumBlock = z.object({
  name: z.string(),
  quantity: z.enum(["spectral_irradiance", "band_irradiance"]),
  units: z.string().openapi({
    description: "Units of every band's values (W m-2 nm-1 for a band mean per nm, W m-2 for " +
      "irradiance over the band)",
  }),
  bands: z.array(BandBounds),
  time: nums.openapi({ description: "Cell middles, decimal years" }),
  value: z.array(numsOrNull).openapi({
    description: "Per band, the value at each time; null where the band has no value",
  }),
  uncertainty: z.array(numsOrNull).openapi({
    description: "Per band, the standard uncertainty (1σ) at each time",
  }),
  interval: z.string().openapi({ description: 'e.g. "95 % prediction interval"' }),
  interval_quantiles: nums.openapi({
    description: "Per band, the multiplier of `uncertainty` for the interval's bounds (when " +
      "`lower`/`upper` are absent)",
  }),
  lower: z.array(numsOrNull).optional().openapi({
    description: "Per band, the interval's lower bound at each time, when the interval is not " +
      "value ± quantile × uncertainty (an ensemble's quantiles)",
  }),
  upper: z.array(numsOrNull).optional().openapi({
    description: "Per band, the interval's upper bound at each time (with `lower`)",
  }),
  description: z.string(),
}).openapi("SpectrumOverTime");

/** A spectrum block as computed. */
export type SpectrumBlockIn = z.input<typeof SpectrumBlock>;
