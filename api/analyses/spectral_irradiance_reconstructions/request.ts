/**
 * Request of the "spectral-irradiance-reconstructions" analysis: a spectral model run, the
 * proxies and sunspot series as for a TSI reconstruction, the period, resolution and level,
 * wavelength ranges to integrate, and the bands its chart draws over time.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { runRef } from "../common/run_ref.ts";
import { DEMO_SERIES, EXAMPLE_RUN_ID } from "../../schemas/examples.ts";
import { duplicateProxyTerms, ReconstructionInputFields } from "../common/reconstruction_inputs.ts";
import { rangeOrderIssues, Wavelength, WavelengthRange } from "../common/wavelength_bands.ts";

export const SpectralReconstructionRequest = z.object({
  model: runRef("Id of a succeeded /v1/irradiance/spectral-models run"),
  ...ReconstructionInputFields,
  ranges: z.array(WavelengthRange).max(20).default([]).openapi({
    description: "Wavelength ranges to integrate over (e.g. 200–400 nm), each an output series " +
      "in W m-2; the whole covered range always is. Parts of a range that no band covers are " +
      "left out and reported, never invented",
  }),
  chart_bands: z.array(Wavelength).max(8).default([]).openapi({
    description: "Wavelengths (nm) whose bands the chart draws over time; default: up to four " +
      "bands spread over the covered range",
  }),
}).superRefine((v, ctx) => {
  const add = (i: Parameters<typeof ctx.addIssue>[0]) => ctx.addIssue(i);
  duplicateProxyTerms(v.proxies, add);
  rangeOrderIssues(v.ranges, add);
}).openapi("SpectralReconstructionRequest", {
  example: {
    model: EXAMPLE_RUN_ID,
    sunspot_number: DEMO_SERIES.SSN,
    proxies: [{ term: "mg_ii", series: DEMO_SERIES.MG }],
    period: { start: "1700", end: "2025" },
    resolution: "annual",
    ranges: [{ lower: 200, upper: 400 }],
  },
});

export type SpectralReconstructionParams = z.output<typeof SpectralReconstructionRequest>;
