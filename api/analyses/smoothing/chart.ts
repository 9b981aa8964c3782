/**
 * Chart of the "smoothing" analysis: the smoothed series over the raw one.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import { chartOverInputs } from "../../charts/over_inputs.ts";
import type { SmoothingResultOut } from "./result.ts";

export const smoothingChart: KindChart<SmoothingResultOut> = {
  needsInputs: true,
  build: (run, _result, inputs) => chartOverInputs(run, inputs, Infinity),
};
