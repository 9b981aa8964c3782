/**
 * Request of the "spectral-irradiance-models" analysis: a calibrated TSI model (its proxies,
 * quiet-Sun proxy levels, S_ref and sunspot → proxy mappings are reused), the proxy series,
 * the measured spectral record as one series per wavelength band with the band bounds, an
 * optional sunspot series for the per-band back-extension, the estimator, and wavelength
 * ranges to integrate.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { PeriodInput } from "../common/time_period.ts";
import { runRef } from "../common/run_ref.ts";
import { DEMO_SERIES, DEMO_SPECTRAL_BANDS, EXAMPLE_RUN_ID } from "../../schemas/examples.ts";
import { duplicateProxyTerms } from "../common/reconstruction_inputs.ts";
import {
  bandOrderIssues,
  rangeOrderIssues,
  Wavelength,
  WavelengthRange,
} from "../common/wavelength_bands.ts";

const BandRequest = z.object({
  lower: Wavelength.openapi({ description: "Lower band bound, nm (included)", example: 200 }),
  upper: Wavelength.openapi({ description: "Upper band bound, nm (excluded)", example: 210 }),
  series: SeriesRef.openapi({
    description: "The band's measured record: quantity spectral_irradiance (W m-2 nm-1, the " +
      "band mean) or band_irradiance (W m-2 over the band); every band of one quantity",
  }),
}).openapi("SpectralBand");

export const SpectralModelRequest = z.object({
  tsi_model: runRef(
    "Id of a succeeded /v1/irradiance/models run. Its terms (roles, quiet-Sun proxy levels), " +
      "S_ref and sunspot → proxy mappings are used for every band, so band coefficients add up " +
      "to comparable TSI coefficients; its coefficients are the TSI side of the integral check",
  ),
  proxies: z.array(z.object({
    term: z.string().min(1).max(40).openapi({ description: "A term name of the TSI model" }),
    series: SeriesRef,
  })).min(1).max(6).openapi({
    description: "The proxy series of every term of the TSI model (normally the same series " +
      "it was calibrated with)",
  }),
  bands: z.array(BandRequest).min(1).max(200).openapi({
    description: "The spectral record, one series per wavelength band, sorted by wavelength " +
      "and not overlapping (gaps between bands are allowed and reported)",
  }),
  sunspot_number: SeriesRef.optional().openapi({
    description: "Sunspot-number series of the TSI model's version, for each band's " +
      "back-extension residual process (TSI model's mappings, band record minus the band " +
      "model fed with mapped proxies); without it the model cannot be back-extended",
  }),
  method: z.enum(["prais_winsten", "ols"]).default("prais_winsten").openapi({
    description: "prais_winsten: regression with AR(1) errors; ols: ordinary least squares",
  }),
  folds: z.number().int().min(0).max(20).default(5).openapi({
    description: "Folds of the time-blocked cross-validation per band; 0 = none",
  }),
  period: PeriodInput.optional().openapi({ description: "Restrict calibration to this period" }),
  ranges: z.array(WavelengthRange).max(20).default([]).openapi({
    description: "Wavelength ranges whose integrated sensitivities are reported (the whole " +
      "covered range always is)",
  }),
}).superRefine((v, ctx) => {
  const add = (i: Parameters<typeof ctx.addIssue>[0]) => ctx.addIssue(i);
  bandOrderIssues(v.bands, add);
  rangeOrderIssues(v.ranges, add);
  duplicateProxyTerms(v.proxies, add);
}).openapi("SpectralModelRequest", {
  example: {
    tsi_model: EXAMPLE_RUN_ID,
    sunspot_number: DEMO_SERIES.SSN,
    proxies: [{ term: "mg_ii", series: DEMO_SERIES.MG }],
    bands: DEMO_SPECTRAL_BANDS.map((b) => ({ ...b })),
    ranges: [{ lower: 200, upper: 400 }],
  },
});

export type SpectralModelParams = z.output<typeof SpectralModelRequest>;
