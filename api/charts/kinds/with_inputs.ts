/**
 * Charts of kinds derived from an input series of the same quantity (the fit of an irradiance
 * model): the generic chart of their outputs drawn over the observed input.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../../store/types.ts";
import { chartOverInputs } from "../over_inputs.ts";

/** Irradiance model: the fitted TSI over the measured TSI it was calibrated on. */
export const irradianceModelChart = (run: RunRecord, inputs: StoredSeries[]) =>
  chartOverInputs(run, inputs, Infinity);
