/**
 * Adapter of the "cycle-fits" analysis: detection from the shared cycle adapter, the shape
 * fitted to every complete cycle (core/cycles/cycle_sequence_fit.ts), the Waldmeier relation
 * across cycles (waldmeier_relation.ts), and the result.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import {
  completeCycleWindows,
  type CycleRow,
  cycleSequenceCurve,
  type CycleWindow,
  fitCycleSequence,
  type HathawayFit,
  waldmeierRelation,
} from "../../../core/cycles/mod.ts";
import { coefficientOfDetermination } from "../../../core/stats/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { analyseCycles } from "../common/cycle_detection.ts";
import { CAUTION_CYCLE_REVIEW, CAUTION_SCALE } from "../common/cycle_cautions.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { sunspotInput } from "../common/sunspot_input.ts";
import type { CycleFitsParams } from "./request.ts";
import type { CycleFitsResultIn } from "./result.ts";

type Cycles = CycleFitsResultIn["cycles"];

/**
 * The Waldmeier relation over the cycles of positive amplitude (an activity measure), or null
 * with fewer than 3 of them.
 */
function relation(all: { riseMonths: number; amplitude: number }[], scale: number) {
  const points = all.filter((p) => p.amplitude > 0 && Number.isFinite(p.riseMonths));
  if (points.length < 3) return null;
  const w = waldmeierRelation(points, scale);
  return {
    n: w.n,
    form: "rise_months = intercept + slope / (amplitude × amplitude_scale)",
    intercept: {
      value: w.intercept.value,
      standard_error: undefinedAsNull(w.intercept.standardError),
    },
    slope: { value: w.slope.value, standard_error: undefinedAsNull(w.slope.standardError) },
    correlation_rise_amplitude: w.correlation,
    residual_sd_months: undefinedAsNull(w.sigma),
    published: {
      intercept: w.published.intercept,
      slope: w.published.slope,
      rms_difference: w.published.rmsDifference,
      source: "Hathaway 2010, Living Rev. Sol. Phys. 7, 1, eq. 7 (version 1 scale)",
    },
  };
}

/** One fitted cycle as JSON, beside what the smoothed series shows for it. */
function fittedCycleJson(
  r: CycleRow,
  f: HathawayFit,
  rSquared: number | null,
  p: { res: "monthly" | "annual"; units: string; width: CycleFitsParams["width"] },
): Cycles[number] {
  const inf = f.autocorrelationInflation;
  const se = f.standardErrors;
  const ar1 = (x: number | null) => (x === null ? null : x * inf);
  return {
    index: r.index,
    number: r.number,
    window: {
      start: formatIsoTime(r.start.time, p.res),
      end: formatIsoTime(r.end!.time, p.res),
      points: f.n,
    },
    t0: {
      date: formatIsoTime(f.t0, "monthly"),
      decimal_year: f.t0,
      standard_error_years: undefinedAsNull(se.t0),
      standard_error_years_ar1: ar1(se.t0),
    },
    a: {
      value: f.a,
      units: `(${p.units}) month-3`,
      standard_error: undefinedAsNull(se.a),
      standard_error_ar1: ar1(se.a),
    },
    b: {
      value: f.b,
      units: "month",
      derived: p.width === "amplitude_dependent",
      standard_error: undefinedAsNull(se.b),
      standard_error_ar1: ar1(se.b),
    },
    c: f.c,
    maximum: {
      date: formatIsoTime(f.maximum.time, "monthly"),
      decimal_year: f.maximum.time,
      value: f.maximum.value,
      time_standard_error_years: undefinedAsNull(f.maximum.timeSE),
      value_standard_error: undefinedAsNull(f.maximum.valueSE),
    },
    rise_months: f.riseMonths,
    observed: {
      maximum_date: formatIsoTime(r.maximum!.time, p.res),
      amplitude: r.amplitude,
      rise_months: r.riseTime! * 12,
    },
    residual_sd: f.sigma,
    r_squared: rSquared,
    residual_lag1: f.residualLag1,
    autocorrelation_inflation: inf,
    dof: f.dof,
  };
}

/** The sum of the fitted curves over the span of the fitted cycles. */
function fittedOutput(t: Float64Array, w: CycleWindow[], fits: HathawayFit[]) {
  const time = Array.from(t.slice(w[0].start, w[w.length - 1].end));
  return { time, value: Array.from(cycleSequenceCurve(fits, time)) };
}

const CAUTIONS = [
  "Standard errors assume the shape function is right; residuals of monthly values are " +
  "autocorrelated, so the AR(1)-inflated errors are the safer ones.",
  CAUTION_SCALE,
  CAUTION_CYCLE_REVIEW,
];

/** Fit the shape to every complete cycle of the series. */
export function computeCycleFits(params: CycleFitsParams, ctx: RunContext): CycleFitsResultIn {
  const an = analyseCycles(ctx, params);
  const { grid, series: s } = an;
  const { rows: complete, windows } = completeCycleWindows(grid, an.rows);
  if (complete.length === 0) {
    throw new InputProblem(
      "/series",
      "no complete cycle to fit: the series holds fewer than two cycle minima",
      { complete_cycles: 0 },
    );
  }
  ctx.progress(0.1); // inputs checked; the fits follow
  const { fits } = withInputPointers(
    { "*": "/series" },
    () =>
      fitCycleSequence(grid.time, grid.value, windows, {
        width: params.width,
        amplitudeScale: an.amplitudeScale,
        passes: params.overlap === "backfit" ? 2 : 0,
        shouldStop: ctx.cancelled,
      }),
  );
  const opts = { res: grid.resolution, units: s.units, width: params.width };
  const cycles = complete.map((r, k) => {
    const w = windows[k];
    const r2 = coefficientOfDetermination(grid.value.subarray(w.start, w.end), fits[k].rss);
    return fittedCycleJson(r, fits[k], r2, opts);
  });
  const waldmeier = {
    observed: relation(
      complete.map((r) => ({ riseMonths: r.riseTime! * 12, amplitude: r.amplitude! })),
      an.amplitudeScale,
    ),
    fitted: relation(
      fits.map((f) => ({ riseMonths: f.riseMonths, amplitude: f.maximum.value })),
      an.amplitudeScale,
    ),
  };
  const warnings = [...an.warnings];
  if (!waldmeier.observed) warnings.push("the Waldmeier relation needs at least 3 complete cycles");
  return {
    input: sunspotInput(s),
    model: {
      function: "F(t) = a (t - t0)^3 / [exp((t - t0)^2 / b^2) - c], t in months",
      source: "Hathaway, Wilson & Reichmann 1994, Sol. Phys. 151, 177",
      width: params.width,
      overlap: params.overlap,
      amplitude_scale: an.amplitudeScale,
      solver: "Levenberg-Marquardt (ml-levenberg-marquardt) with the analytic Jacobian",
    },
    cycles,
    waldmeier,
    outputs: {
      fitted: {
        name: `${s.name} (fitted cycle shapes)`,
        quantity: s.quantity,
        units: s.units,
        ...fittedOutput(grid.time, windows, fits),
        description: "sum of the fitted Hathaway et al. (1994) curves of the complete cycles",
      },
    },
    warnings,
    cautions: CAUTIONS,
  };
}
