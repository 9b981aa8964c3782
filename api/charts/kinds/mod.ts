/**
 * Specialised run charts by run kind. A kind without an entry gets the generic chart.
 *
 * @module
 */
import type { KindChart } from "../run_common.ts";
import { attributionsChart } from "./attributions.ts";
import { compositesChart } from "./composites.ts";
import { irradianceReconstructionChart } from "./irradiance_reconstruction.ts";
import { lagCorrelationChart } from "./lag_correlations.ts";
import { irradianceModelChart } from "./with_inputs.ts";

/** Chart builders keyed by `run.kind`. */
export const KIND_CHARTS: Record<string, KindChart> = {
  "attributions": attributionsChart,
  "composites": compositesChart,
  "irradiance-models": irradianceModelChart,
  "irradiance-reconstructions": irradianceReconstructionChart,
  "lag-correlations": lagCorrelationChart,
};

/** Kinds whose chart draws the run's input series too (the route loads them). */
export const KIND_INPUTS: ReadonlySet<string> = new Set([
  "irradiance-models",
]);
