/**
 * The generic chart of a run's outputs drawn over the observed input series of the same
 * quantity: for analyses derived from one input (a smoothing over its raw values, a forecast
 * after the observed record, a fitted model over the record it was calibrated on).
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../store/types.ts";
import type { ChartSpec } from "./chart.ts";
import { defaultRunChart } from "./default_chart.ts";
import { inputBackdrop } from "./run_common.ts";
import { outputsOf } from "./read.ts";

/**
 * The generic chart with the matching input series behind it, from `yearsBefore` years before
 * the first output time (Infinity: all of it). Null when the run has no outputs.
 */
export function chartOverInputs(
  run: RunRecord,
  inputs: StoredSeries[],
  yearsBefore: number,
): ChartSpec | null {
  const outs = outputsOf(run.result);
  if (!outs.length) return null;
  const first = outs[0][1];
  const spec = defaultRunChart(run);
  const t0 = first.time.length ? first.time[0] - yearsBefore : -Infinity;
  spec.layers = [...inputBackdrop(inputs, first.quantity, first.units, t0), ...spec.layers];
  return spec;
}
