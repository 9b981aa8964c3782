/**
 * Specialised run charts by run kind. A kind without an entry gets the generic chart.
 *
 * @module
 */
import type { KindChart } from "../run_common.ts";
import { cyclesChart } from "./cycles.ts";
import { irradianceReconstructionChart } from "./irradiance_reconstruction.ts";
import { spectraChart } from "./spectra.ts";
import { cycleForecastChart, irradianceModelChart } from "./with_inputs.ts";

/** Chart builders keyed by `run.kind`. */
export const KIND_CHARTS: Record<string, KindChart> = {
  "cycles": cyclesChart,
  "cycle-forecasts": cycleForecastChart,
  "irradiance-models": irradianceModelChart,
  "irradiance-reconstructions": irradianceReconstructionChart,
  "spectra": spectraChart,
};

/** Kinds whose chart draws the run's input series too (the route loads them). */
export const KIND_INPUTS: ReadonlySet<string> = new Set([
  "cycles",
  "cycle-forecasts",
  "irradiance-models",
]);
