/**
 * Specialised run charts by run kind. A kind without an entry gets the generic chart.
 *
 * @module
 */
import type { KindChart } from "../run_common.ts";
import { cyclesChart } from "./cycles.ts";
import { spectraChart } from "./spectra.ts";
import { cycleForecastChart } from "./with_inputs.ts";

/** Chart builders keyed by `run.kind`. */
export const KIND_CHARTS: Record<string, KindChart> = {
  "cycles": cyclesChart,
  "cycle-forecasts": cycleForecastChart,
  "spectra": spectraChart,
};

/** Kinds whose chart draws the run's input series too (the route loads them). */
export const KIND_INPUTS: ReadonlySet<string> = new Set([
  "cycles",
  "cycle-forecasts",
]);
