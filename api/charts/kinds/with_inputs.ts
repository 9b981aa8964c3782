/**
 * Charts of kinds derived from an input series of the same quantity (cycle forecasts): the
 * generic chart of their outputs drawn over the observed input.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../../store/types.ts";
import { chartOverInputs } from "../over_inputs.ts";

/** Cycle forecasts: the forecast curve and band after the last two cycles observed. */
export const cycleForecastChart = (run: RunRecord, inputs: StoredSeries[]) =>
  chartOverInputs(run, inputs, 22);
