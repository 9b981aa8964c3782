/**
 * Chart of a "lag-correlations" run: r against lag with its Fisher-z 95 % interval (N_eff),
 * the surrogate significance envelope (±1.96 × the surrogates' standard deviation at each lag,
 * a pointwise ~95 % band), the family-wise 95 % threshold of the best |r| over the window,
 * and the best lag marked.
 *
 * @module
 */
import type { RunRecord } from "../../store/types.ts";
import type { ChartSpec, Layer } from "../chart.ts";
import { runDescription, runNotes } from "../run_common.ts";
import { numOrNull, obj, objects, str } from "../read.ts";

function fmt(v: number | null, digits = 3): string {
  return v === null ? "n/a" : v.toPrecision(digits);
}

/** Chart spec, or null when the result is not a lag-correlation table. */
export function lagCorrelationChart(run: RunRecord): ChartSpec | null {
  const r = run.result;
  const rows = objects(r?.lags);
  if (!r || !rows || rows.length === 0) return null;
  const statistic = str(r.statistic) === "r_full" ? "r_full" : "r";
  const lag: number[] = [], rv: (number | null)[] = [];
  const lo: (number | null)[] = [], hi: (number | null)[] = [];
  const envLo: (number | null)[] = [], envHi: (number | null)[] = [];
  let hasEnv = false, hasCi = false;
  for (const row of rows) {
    const k = numOrNull(row.lag);
    if (k === null) return null;
    lag.push(k);
    rv.push(numOrNull(row[statistic]));
    const cl = numOrNull(row.ci_lower), cu = numOrNull(row.ci_upper);
    lo.push(cl);
    hi.push(cu);
    if (cl !== null && cu !== null) hasCi = true;
    const sd = numOrNull(row.null_sd);
    envLo.push(sd === null ? null : -1.96 * sd);
    envHi.push(sd === null ? null : 1.96 * sd);
    if (sd !== null) hasEnv = true;
  }
  const unit = str(r.lag_unit) ?? "steps";
  const mc = obj(r.monte_carlo);
  const fw = numOrNull(mc?.family_wise_threshold_95);
  const best = obj(r.best);
  const bestLag = numOrNull(best?.lag), bestR = numOrNull(best?.r);

  const layers: Layer[] = [];
  if (hasEnv) {
    layers.push({
      type: "band",
      label: "surrogate null: ±1.96 SD (pointwise ~95 %)",
      x: lag,
      lower: envLo,
      upper: envHi,
      color: "muted",
      opacity: 0.25,
    });
  }
  if (fw !== null) {
    layers.push({
      type: "hline",
      y: fw,
      label: "family-wise 95 % threshold of max |r|",
      color: 1,
      text: `+${fw.toFixed(3)}`,
    });
    layers.push({ type: "hline", y: -fw, color: 1, text: `−${fw.toFixed(3)}` });
  }
  layers.push({ type: "hline", y: 0, color: "foreground", dash: "solid" });
  if (hasCi) {
    layers.push({
      type: "band",
      label: "Fisher-z 95 % interval (N_eff)",
      x: lag,
      lower: lo,
      upper: hi,
      color: 0,
    });
  }
  layers.push({
    type: "line",
    label: statistic === "r_full" ? "r (ccf normalisation)" : "r",
    x: lag,
    y: rv,
    color: 0,
  });
  if (bestLag !== null && bestR !== null) {
    layers.push({
      type: "points",
      label: `best lag ${bestLag} ${unit}`,
      x: [bestLag],
      y: [bestR],
      marker: "diamond",
      size: 80,
      color: 3,
    });
  }
  const summary = bestLag !== null
    ? `Best lag ${bestLag} ${unit}: r = ${fmt(bestR)}, analytic p = ${
      fmt(numOrNull(best?.p_analytic))
    }, ` +
      `Monte Carlo p = ${fmt(numOrNull(best?.p_monte_carlo))}, family-wise p = ${
        fmt(numOrNull(best?.p_family_wise))
      }.`
    : "";
  const sign = str(r.sign_convention);
  const notes = [
    ...(summary ? [summary] : []),
    ...(sign ? [`Sign convention: ${sign}.`] : []),
    ...runNotes(run),
  ];
  return {
    title: `Lagged correlation of climate with solar · run ${run.id.slice(0, 8)}`,
    description: runDescription(
      run,
      `Correlation at lags ${lag[0]} to ${lag[lag.length - 1]} ${unit}` +
        (mc
          ? `, with ${numOrNull(mc.surrogates) ?? "?"} ${
            str(mc.method) ?? ""
          } surrogates for significance.`
          : "."),
    ),
    x: { label: `Lag (${unit}; > 0: climate follows solar)`, kind: "linear" },
    y: { label: "Correlation r" },
    layers,
    notes,
  };
}
