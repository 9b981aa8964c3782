/**
 * Specialised run charts by run kind. A kind without an entry gets the generic chart.
 *
 * @module
 */
import type { KindChart } from "../run_common.ts";
import { lagCorrelationChart } from "./lag_correlations.ts";

/** Chart builders keyed by `run.kind`. */
export const KIND_CHARTS: Record<string, KindChart> = {
  "lag-correlations": lagCorrelationChart,
};
