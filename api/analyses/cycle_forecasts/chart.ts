/**
 * Chart of the "cycle-forecasts" analysis: the forecast curve and its band drawn after the
 * observed input series of the last two cycles (22 years before the cycle's start).
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import { chartOverInputs } from "../../charts/over_inputs.ts";
import type { CycleForecastsResultOut } from "./result.ts";

export const cycleForecastsChart: KindChart<CycleForecastsResultOut> = {
  needsInputs: true,
  build: (run, _result, inputs) => chartOverInputs(run, inputs, 22),
};
