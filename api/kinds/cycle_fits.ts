/**
 * Run kind "cycle-fits": the Hathaway, Wilson & Reichmann (1994) shape function fitted to every
 * complete cycle, with parameter uncertainties, and the Waldmeier relation across cycles
 * (core/cycles/cycle_shape_fit.ts, cycle_sequence_fit.ts, waldmeier_relation.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { snakeKeys } from "./json_keys.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { SeriesRef } from "../schemas/series_ref.ts";
import {
  fitCycleSequence,
  hathawayCurve,
  type HathawayFit,
  waldmeierRelation,
} from "../../core/cycles/mod.ts";
import {
  analyseCycles,
  CAUTION_CYCLE_REVIEW,
  CAUTION_SCALE,
  CycleDetectionFields,
  iso,
  num,
} from "./cycles_common.ts";

export const CycleFitsRequest = z.object({
  series: SeriesRef,
  ...CycleDetectionFields,
  width: z.enum(["free", "amplitude_dependent"]).default("free").openapi({
    description: "`free`: fit amplitude a, start t0 and width b; `amplitude_dependent`: fit a " +
      "and t0 with b = 27.12 + 25.15/(a·1e3)^(1/4) months (Hathaway et al. 1994)",
    example: "free",
  }),
  overlap: z.enum(["backfit", "none"]).default("backfit").openapi({
    description: "`backfit`: refit each cycle after removing its neighbours' fitted curves " +
      "(cycles overlap near minima), two passes; `none`: each cycle on its own",
    example: "backfit",
  }),
}).openapi("CycleFitsRequest");

function relation(all: { riseMonths: number; amplitude: number }[], scale: number) {
  // the relation is defined for positive amplitudes (activity measures)
  const points = all.filter((p) => p.amplitude > 0 && Number.isFinite(p.riseMonths));
  if (points.length < 3) return null;
  const w = waldmeierRelation(points, scale);
  return {
    n: w.n,
    form: "rise_months = intercept + slope / (amplitude × amplitude_scale)",
    intercept: w.intercept,
    slope: w.slope,
    correlation_rise_amplitude: w.correlation,
    residual_sd_months: w.sigma,
    published: {
      ...w.published,
      source: "Hathaway 2010, Living Rev. Sol. Phys. 7, 1, eq. 7 (version 1 scale)",
    },
  };
}

/** 1 − RSS/TSS over a window's defined values (share of the monthly variance the curve explains). */
function rSquared(v: Float64Array, w: { start: number; end: number }, rss: number): number | null {
  let n = 0, m = 0;
  for (let i = w.start; i < w.end; i++) {
    if (Number.isFinite(v[i])) {
      n++;
      m += v[i];
    }
  }
  if (n < 2) return null;
  m /= n;
  let tss = 0;
  for (let i = w.start; i < w.end; i++) if (Number.isFinite(v[i])) tss += (v[i] - m) ** 2;
  return tss > 0 ? 1 - rss / tss : null;
}

export const cycleFitsKind: RunKind<typeof CycleFitsRequest> = {
  kind: "cycle-fits",
  path: "/v1/cycle-fits",
  algorithmVersion: "2",
  tag: "Solar cycles",
  summary: "Cycle-shape fits with uncertainties and the Waldmeier relation",
  description: "Fits F(t) = a (t − t0)^3 / [exp((t − t0)^2 / b^2) − c], c = 0.71 (Hathaway, " +
    "Wilson & Reichmann 1994, Sol. Phys. 151, 177) to the monthly values of each complete " +
    "cycle of the table (as from POST /v1/cycles) by Levenberg–Marquardt least squares. " +
    "Parameter standard errors come from the Jacobian at the solution, (JᵀJ)⁻¹s², and are also " +
    "given inflated for the residuals' lag-1 autocorrelation. The Waldmeier relation (rise " +
    "time against amplitude) is fitted across cycles, both for the observed smoothed cycles and " +
    "for the fitted curves. For version 2 sunspot numbers, b(a) and the published relation are " +
    "evaluated on the version 1 scale (0.6 × the values).",
  request: CycleFitsRequest,
  result: LegacyResult,
  estimateSeconds: () => 1,
  compute(params, ctx) {
    const an = analyseCycles(ctx, params);
    const { grid, rows, series: s } = an;
    const res = grid.resolution;
    const complete = rows.filter((r) => !r.inProgress && r.maximum);
    if (complete.length === 0) {
      throw new InputProblem(
        "/series",
        "no complete cycle to fit: the series holds fewer than two cycle minima",
      );
    }
    const perYear = res === "monthly" ? 12 : 1;
    const idx = (t: number) => Math.round((t - grid.time[0]) * perYear);
    const windows = complete.map((r) => ({ start: idx(r.start.time), end: idx(r.end!.time) }));
    let fits: HathawayFit[];
    try {
      fits = fitCycleSequence(grid.time, grid.value, windows, {
        width: params.width,
        amplitudeScale: an.amplitudeScale,
        passes: params.overlap === "backfit" ? 2 : 0,
      }).fits;
    } catch (e) {
      if (e instanceof RangeError) throw new InputProblem("/series", e.message);
      throw e;
    }
    const cycles = complete.map((r, k) => {
      const f = fits[k];
      const inf = f.autocorrelationInflation;
      const se = f.standardErrors;
      return {
        index: r.index,
        number: r.number,
        window: { start: iso(r.start.time, res), end: iso(r.end!.time, res), points: f.n },
        t0: {
          date: iso(f.t0, "monthly"),
          decimal_year: f.t0,
          standard_error_years: num(se.t0),
          standard_error_years_ar1: se.t0 === null ? null : se.t0 * inf,
        },
        a: {
          value: f.a,
          units: `(${s.units}) month-3`,
          standard_error: num(se.a),
          standard_error_ar1: se.a === null ? null : se.a * inf,
        },
        b: {
          value: f.b,
          units: "month",
          derived: params.width === "amplitude_dependent",
          standard_error: num(se.b),
          standard_error_ar1: se.b === null ? null : se.b * inf,
        },
        c: f.c,
        maximum: {
          date: iso(f.maximum.time, "monthly"),
          decimal_year: f.maximum.time,
          value: f.maximum.value,
          time_standard_error_years: num(f.maximum.timeSE),
          value_standard_error: num(f.maximum.valueSE),
        },
        rise_months: f.riseMonths,
        observed: {
          maximum_date: iso(r.maximum!.time, res),
          amplitude: r.amplitude,
          rise_months: r.riseTime! * 12,
        },
        residual_sd: f.sigma,
        r_squared: rSquared(grid.value, windows[k], f.rss),
        residual_lag1: f.residualLag1,
        autocorrelation_inflation: inf,
        dof: f.dof,
      };
    });
    const warnings = [...an.warnings];
    const observed = relation(
      complete.map((r) => ({ riseMonths: r.riseTime! * 12, amplitude: r.amplitude! })),
      an.amplitudeScale,
    );
    const fitted = relation(
      fits.map((f) => ({ riseMonths: f.riseMonths, amplitude: f.maximum.value })),
      an.amplitudeScale,
    );
    if (!observed) warnings.push("the Waldmeier relation needs at least 3 complete cycles");
    // the summed model over the fitted span
    const i0 = windows[0].start, i1 = windows[windows.length - 1].end;
    const t = Array.from(grid.time.slice(i0, i1));
    const sum = new Float64Array(t.length);
    for (const f of fits) {
      const c = hathawayCurve(f, t);
      for (let i = 0; i < t.length; i++) sum[i] += c[i];
    }
    return {
      input: { id: s.id, name: s.name, quantity: s.quantity, version: s.version, n: s.n },
      model: {
        function: "F(t) = a (t - t0)^3 / [exp((t - t0)^2 / b^2) - c], t in months",
        source: "Hathaway, Wilson & Reichmann 1994, Sol. Phys. 151, 177",
        width: params.width,
        overlap: params.overlap,
        amplitude_scale: an.amplitudeScale,
        solver: "Levenberg-Marquardt (ml-levenberg-marquardt) with the analytic Jacobian",
      },
      cycles,
      waldmeier: snakeKeys({ observed, fitted }),
      outputs: {
        fitted: {
          name: `${s.name} (fitted cycle shapes)`,
          quantity: s.quantity,
          units: s.units,
          time: t,
          value: Array.from(sum),
          description: "sum of the fitted Hathaway et al. (1994) curves of the complete cycles",
        },
      },
      warnings,
      cautions: [
        "Standard errors assume the shape function is right; residuals of monthly values are " +
        "autocorrelated, so the AR(1)-inflated errors are the safer ones.",
        CAUTION_SCALE,
        CAUTION_CYCLE_REVIEW,
      ],
    };
  },
};
