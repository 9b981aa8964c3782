/**
 * Chart of the "irradiance-models" analysis: the fitted TSI with its band over the measured
 * TSI it was calibrated on.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import { chartOverInputs } from "../../charts/over_inputs.ts";
import type { ModelResultOut } from "./result.ts";

export const modelChart: KindChart<ModelResultOut> = {
  needsInputs: true,
  build: (run, _result, inputs) => chartOverInputs(run, inputs, Infinity),
};
