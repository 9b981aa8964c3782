/**
 * Chart of the "lag-correlations" analysis: r against lag with its Fisher-z 95 % interval
 * (N_eff), the surrogate significance envelope (±1.96 × the surrogates' standard deviation at
 * each lag, a pointwise ~95 % band), the family-wise 95 % threshold of the best |r| over the
 * window, and the best lag marked.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import type { LagCorrelationResultOut } from "./result.ts";

/** What was removed from both series before correlating, in words. */
function preprocessing(r: LagCorrelationResultOut): string {
  const trend = r.preprocess === "high_pass"
    ? `variations slower than ${r.high_pass_cutoff_years} years`
    : `the ${r.preprocess === "mean" ? "mean" : `${r.preprocess} trend`}`;
  return r.seasonal_cycle.deseasonalise ? `the monthly climatology, then ${trend}` : trend;
}

function fmt(v: number | null, digits = 3): string {
  return v === null ? "n/a" : v.toPrecision(digits);
}

/** The layers: surrogate envelope, family-wise threshold, zero, interval, r, best lag. */
function layers(r: LagCorrelationResultOut): Layer[] {
  const lag = r.lags.map((row) => row.lag);
  const sd = r.lags.map((row) => row.null_sd);
  const out: Layer[] = [];
  if (sd.some((v) => v !== null)) {
    out.push({
      type: "band",
      label: "surrogate null: ±1.96 SD (pointwise ~95 %)",
      x: lag,
      lower: sd.map((v) => (v === null ? null : -1.96 * v)),
      upper: sd.map((v) => (v === null ? null : 1.96 * v)),
      color: "muted",
      opacity: 0.25,
    });
  }
  const fw = r.monte_carlo?.family_wise_threshold_95 ?? null;
  if (fw !== null) {
    out.push({
      type: "hline",
      y: fw,
      label: "family-wise 95 % threshold of max |r|",
      color: 1,
      text: `+${fw.toFixed(3)}`,
    });
    out.push({ type: "hline", y: -fw, color: 1, text: `−${fw.toFixed(3)}` });
  }
  out.push({ type: "hline", y: 0, color: "foreground", dash: "solid" });
  if (r.lags.some((row) => row.ci_lower !== null && row.ci_upper !== null)) {
    out.push({
      type: "band",
      label: "Fisher-z 95 % interval (N_eff)",
      x: lag,
      lower: r.lags.map((row) => row.ci_lower),
      upper: r.lags.map((row) => row.ci_upper),
      color: 0,
    });
  }
  out.push({
    type: "line",
    label: r.statistic === "r_full" ? "r (ccf normalisation)" : "r",
    x: lag,
    y: r.lags.map((row) => row[r.statistic]),
    color: 0,
  });
  out.push({
    type: "points",
    label: `best lag ${r.best.lag} ${r.lag_unit}`,
    x: [r.best.lag],
    y: [r.best[r.statistic]],
    marker: "diamond",
    size: 80,
    color: 3,
  });
  return out;
}

/** What was removed from both series before correlating, in words. */
export function preprocessText(r: LagCorrelationResultOut): string {
  switch (r.preprocess) {
    case "mean":
      return "mean removed";
    case "linear":
      return "linear trend removed";
    case "quadratic":
      return "quadratic trend removed";
    case "high_pass":
      return `variations slower than ${r.high_pass_cutoff_years} years removed (Gaussian high-pass)`;
  }
}

/** A signed lag: "−36", "0", "+36". */
function signed(k: number): string {
  return k > 0 ? `+${k}` : k < 0 ? `−${-k}` : "0";
}

/** The lag window in words: "lags −36 to +36 months". */
export function lagWindowText(r: LagCorrelationResultOut): string {
  const lo = r.lags[0].lag, hi = r.lags[r.lags.length - 1].lag;
  return `lags ${signed(lo)} to ${signed(hi)} ${r.lag_unit}`;
}

/** The best lag's r and p-values, naming the r the tests used. */
function bestNote(r: LagCorrelationResultOut): string {
  const b = r.best;
  const rText = r.statistic === "r_full"
    ? `r (ccf normalisation) = ${fmt(b.r_full)} (overlap r = ${fmt(b.r)})`
    : `r = ${fmt(b.r)}`;
  return `Best lag ${b.lag} ${r.lag_unit}: ${rText}, analytic p = ${fmt(b.p_analytic)}, ` +
    `Monte Carlo p = ${fmt(b.p_monte_carlo)}, family-wise p = ${fmt(b.p_family_wise)}.`;
}

export const lagCorrelationChart: KindChart<LagCorrelationResultOut> = {
  build(run, r) {
    if (r.lags.length === 0) return null;
    const unit = r.lag_unit;
    const mc = r.monte_carlo;
    const method = `${preprocessText(r)}, ${lagWindowText(r)}`;
    return {
      title: runTitle(`Lagged correlation of climate with solar, ${method}`, run),
      description: runDescription(
        run,
        `Correlation at lags ${r.lags[0].lag} to ${r.lags[r.lags.length - 1].lag} ${unit}` +
          (mc ? `, with ${mc.surrogates} ${mc.method} surrogates for significance.` : ".") +
          ` Removed before correlating: ${preprocessing(r)}.`,
      ),
      x: { label: `Lag (${unit}; > 0: climate follows solar)`, kind: "linear" },
      y: { label: "Correlation r" },
      layers: layers(r),
      ...runNotes(
        run,
        [bestNote(r), `Sign convention: ${r.sign_convention}.`],
        [
          `Both series: ${method} (> 0: climate follows solar); ${r.resolution} axis ` +
          `${r.start_period} to ${r.end_period}, ${r.n} periods.`,
        ],
      ),
    };
  },
};
