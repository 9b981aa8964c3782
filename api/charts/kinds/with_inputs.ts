/**
 * Charts of kinds derived from an input series of the same quantity (smoothing, cycle
 * forecasts, the fit of an irradiance model): the generic chart of their outputs drawn over the
 * observed input series.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../../store/types.ts";
import type { ChartSpec } from "../chart.ts";
import { defaultRunChart } from "../default_chart.ts";
import { inputBackdrop } from "../run_common.ts";
import { outputsOf } from "../read.ts";

/** The generic chart with the matching input series behind it (from `yearsBefore` the outputs). */
function overInputs(yearsBefore: number) {
  return (run: RunRecord, inputs: StoredSeries[]): ChartSpec | null => {
    const outs = outputsOf(run.result);
    if (!outs.length) return null;
    const first = outs[0][1];
    const spec = defaultRunChart(run);
    const t0 = first.time.length ? first.time[0] - yearsBefore : -Infinity;
    spec.layers = [...inputBackdrop(inputs, first.quantity, first.units, t0), ...spec.layers];
    return spec;
  };
}

/** Smoothing: the smoothed series over the raw one. */
export const smoothingChart = overInputs(Infinity);

/** Cycle forecasts: the forecast curve and band after the last two cycles observed. */
export const cycleForecastChart = overInputs(22);

/** Irradiance model: the fitted TSI over the measured TSI it was calibrated on. */
export const irradianceModelChart = overInputs(Infinity);
