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
import { MAX_ENSEMBLE_VALUES } from "../common/ensemble_members.ts";
import { MAX_REALIZATIONS } from "../../../core/irradiance/mod.ts";
import { periodCells } from "../irradiance_reconstructions/request.ts";

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
  realizations: z.number().int().min(0).max(MAX_REALIZATIONS).default(0).openapi({
    description: "Seeded ensemble members to draw (0 to 1,000; 0 = none). Each member draws " +
      "the sunspot number's error and the mapping parameters once for every band, the bands' " +
      "calibration coefficients and residual processes jointly with their cross-band " +
      "correlation; a member of an integral is the weighted sum of the member's bands. With " +
      "members every band and integral reports the ensemble's band. members × cells × (bands " +
      `+ integrals) is limited to ${MAX_ENSEMBLE_VALUES.toLocaleString("en")} in a JSON ` +
      "result: e.g. 100 members of 32 bands over 1700–2025 in annual cells",
  }),
  seed: z.number().int().min(0).max(4294967295).default(1).openapi({
    description: "Seed of the ensemble: member m draws from the random stream (seed, m)",
  }),
}).superRefine((v, ctx) => {
  const add = (i: Parameters<typeof ctx.addIssue>[0]) => ctx.addIssue(i);
  // a lower bound of the ensemble's size (one band) is known from the request alone: refuse
  // it before any run is queued (the adapter checks again with the model's bands)
  const cells = v.realizations > 0 ? periodCells(v.period, v.resolution) : null;
  if (cells !== null && v.realizations * cells > MAX_ENSEMBLE_VALUES) {
    add({
      code: "custom",
      path: ["realizations"],
      message:
        `${v.realizations} realizations × ${cells} ${v.resolution} cells = ${
          v.realizations * cells
        } member values per band, more than the ${MAX_ENSEMBLE_VALUES} a JSON result holds; ` +
        "ask for fewer realizations, a shorter period or coarser (monthly or annual) cells " +
        "(set by /realizations, /period, /resolution)",
    });
  }
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
