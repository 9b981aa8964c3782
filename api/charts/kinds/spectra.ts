/**
 * Chart of a "spectra" run: the periodogram against period (logarithmic axis, years) with the
 * false-alarm power levels (analytic Horne & Baliunas 1986 and Monte Carlo, at FAP 1 % and
 * 5 %) as horizontal lines, and the strongest peaks marked with their periods.
 *
 * @module
 */
import type { RunRecord } from "../../store/types.ts";
import type { ChartSpec, Layer } from "../chart.ts";
import { runDescription, runNotes } from "../run_common.ts";
import { numOrNull, obj, objects, str, strictNumbers } from "../read.ts";

function pct(f: number): string {
  return `${+(f * 100).toFixed(2)} %`;
}

/** Chart spec, or null when the result has no periodogram. */
export function spectraChart(run: RunRecord): ChartSpec | null {
  const r = run.result;
  const pg = obj(r?.periodogram);
  const period = strictNumbers(pg?.period), power = strictNumbers(pg?.power);
  if (!r || !period || !power || period.length !== power.length || period.length < 2) return null;
  // Increasing period for drawing.
  const order = period.map((_, i) => i).sort((a, b) => period[a] - period[b]);
  const x = order.map((i) => period[i]), y = order.map((i) => power[i]);
  const layers: Layer[] = [{ type: "line", label: "periodogram", x, y, color: 0, width: 1.3 }];
  const fa = obj(r.false_alarm);
  const levels = objects(fa?.levels) ?? [];
  const nullText = str(obj(fa?.null_hypothesis)?.monte_carlo) ?? "";
  const mcNull = /^red noise/.test(nullText)
    ? ", AR(1) red noise"
    : /^white noise/.test(nullText)
    ? ", white noise"
    : "";
  const dashFor = (f: number) => (f <= 0.011 ? "dashed" : "dotted") as "dashed" | "dotted";
  for (const lv of levels) {
    const f = numOrNull(lv.fap);
    if (f === null) continue;
    const a = numOrNull(lv.analytic), m = numOrNull(lv.monte_carlo);
    if (a !== null) {
      layers.push({
        type: "hline",
        y: a,
        label: `FAP ${pct(f)} (Horne & Baliunas)`,
        color: 1,
        dash: dashFor(f),
      });
    }
    if (m !== null) {
      layers.push({
        type: "hline",
        y: m,
        label: `FAP ${pct(f)} (Monte Carlo${mcNull})`,
        color: 2,
        dash: dashFor(f),
      });
    }
  }
  const peaks = (objects(r.peaks) ?? []).slice(0, 5);
  const px: number[] = [], py: number[] = [];
  const peakNotes: string[] = [];
  peaks.forEach((p, k) => {
    const per = numOrNull(p.period), pw = numOrNull(p.power);
    if (per === null || pw === null) return;
    px.push(per);
    py.push(pw);
    const u = numOrNull(p.period_uncertainty);
    if (k < 3) {
      layers.push({ type: "vline", x: per, text: `${per.toPrecision(3)} yr`, dash: "dotted" });
    }
    const fapA = numOrNull(p.false_alarm_analytic), fapM = numOrNull(p.false_alarm_monte_carlo);
    peakNotes.push(
      `${per.toPrecision(4)}${u !== null ? ` ± ${u.toPrecision(2)}` : ""} yr` +
        (fapA !== null ? `, FAP ${fapA === 0 ? "< 1e-300" : fapA.toExponential(1)} analytic` : "") +
        (fapM !== null ? `, ${fapM.toPrecision(2)} Monte Carlo` : ""),
    );
  });
  if (px.length) {
    layers.push({
      type: "points",
      label: "peaks",
      x: px,
      y: py,
      marker: "circle",
      size: 36,
      color: 3,
    });
  }
  const input = obj(r.input);
  const name = str(input?.name);
  const method = str(r.method) === "fft" ? "Tapered FFT periodogram" : "Lomb–Scargle periodogram";
  const powerUnits = str(obj(r.units)?.power) ?? "";
  return {
    title: `${method}${name ? ` of ${name}` : ""} · run ${run.id.slice(0, 8)}`,
    description: runDescription(
      run,
      `${method} against period, ${x.length} periods from ${x[0].toPrecision(3)} to ${
        x[x.length - 1].toPrecision(3)
      } years.`,
    ),
    x: { label: "Period (years, logarithmic)", kind: "log" },
    y: {
      label: powerUnits && powerUnits !== "1" ? `Power (${powerUnits})` : "Normalised power",
      includeZero: true,
    },
    layers,
    notes: [...(peakNotes.length ? [`Peaks: ${peakNotes.join("; ")}.`] : []), ...runNotes(run)],
  };
}
