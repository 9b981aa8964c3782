/**
 * Chart of the "spectra" analysis: the periodogram against period (logarithmic axis, years)
 * with the false-alarm power levels (analytic Horne & Baliunas 1986 and Monte Carlo, at FAP
 * 1 % and 5 %) as horizontal lines, and the strongest peaks marked with their periods.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import type { SpectraResultOut } from "./result.ts";

function pct(f: number): string {
  return `${+(f * 100).toFixed(2)} %`;
}

/** Horizontal lines at the power of each false-alarm level, by test. */
function levelLines(r: SpectraResultOut, mcNull: string): Layer[] {
  const layers: Layer[] = [];
  const dashFor = (f: number) => (f <= 0.011 ? "dashed" : "dotted") as "dashed" | "dotted";
  for (const lv of r.false_alarm?.levels ?? []) {
    const dash = dashFor(lv.fap);
    if (lv.analytic !== null) {
      const label = `FAP ${pct(lv.fap)} (Horne & Baliunas)`;
      layers.push({ type: "hline", y: lv.analytic, label, color: 1, dash });
    }
    if (lv.monte_carlo !== null) {
      const label = `FAP ${pct(lv.fap)} (Monte Carlo${mcNull})`;
      layers.push({ type: "hline", y: lv.monte_carlo, label, color: 2, dash });
    }
  }
  return layers;
}

/** Period lines of the three highest peaks, markers of the five highest, and their notes. */
function peakMarks(r: SpectraResultOut) {
  const lines: Layer[] = [], notes: string[] = [];
  const x: number[] = [], y: number[] = [];
  r.peaks.slice(0, 5).forEach((p, k) => {
    x.push(p.period);
    y.push(p.power);
    if (k < 3) {
      lines.push({
        type: "vline",
        x: p.period,
        text: `${p.period.toPrecision(3)} yr`,
        dash: "dotted",
      });
    }
    const u = p.period_uncertainty, fapA = p.false_alarm_analytic, fapM = p.false_alarm_monte_carlo;
    notes.push(
      `${p.period.toPrecision(4)}${u !== null ? ` ± ${u.toPrecision(2)}` : ""} yr` +
        (fapA !== null ? `, FAP ${fapA === 0 ? "< 1e-300" : fapA.toExponential(1)} analytic` : "") +
        (fapM !== null ? `, ${fapM.toPrecision(2)} Monte Carlo` : ""),
    );
  });
  const points: Layer[] = x.length
    ? [{ type: "points", label: "peaks", x, y, marker: "circle", size: 36, color: 3 }]
    : [];
  return { lines, points, notes };
}

export const spectraChart: KindChart<SpectraResultOut> = {
  build(run, r) {
    const { period, power } = r.periodogram;
    if (period.length < 2) return null;
    // Increasing period for drawing.
    const order = period.map((_, i) => i).sort((a, b) => period[a] - period[b]);
    const x = order.map((i) => period[i]), y = order.map((i) => power[i]);
    const mcNull = r.method === "fft" || r.false_alarm.null_hypothesis.monte_carlo === null
      ? ""
      : run.params.monte_carlo_null === "permutation"
      ? ", white noise"
      : ", AR(1) red noise";
    const peaks = peakMarks(r);
    const method = r.method === "fft" ? "Tapered FFT periodogram" : "Lomb–Scargle periodogram";
    const powerUnits = r.units.power;
    return {
      title: runTitle(`${method}${r.input.name ? ` of ${r.input.name}` : ""}`, run),
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
      layers: [
        { type: "line", label: "periodogram", x, y, color: 0, width: 1.3 },
        ...levelLines(r, mcNull),
        ...peaks.lines,
        ...peaks.points,
      ],
      ...runNotes(run, peaks.notes.length ? [`Peaks: ${peaks.notes.join("; ")}.`] : []),
    };
  },
};
