/**
 * The uncertainty of a sunspot-number series, as the back-extension of an irradiance
 * reconstruction propagates it: a part correlated over decades (the calibration, or scale, of
 * the composite, which changes with its observers and their counting practice) and a part
 * independent between values (the counting noise of each value).
 *
 * When a series carries its own one-sigma uncertainties they are used as the independent part
 * (a series gives no error correlations). When it carries none, the documented model below is
 * used. Its form follows published analyses; its numbers are a stated modelling choice:
 *
 * - Independent part: Poisson-like errors, σ ∝ √R with a coefficient that depends on time and
 *   on the observers (Dudok de Wit, Lefèvre & Clette 2016, Sol. Phys. 291, 2709: the form is
 *   from their abstract; the coefficients here are from memory and our choice). For a value
 *   that averages d days, σ = α(t)·√(R/d).
 * - Correlated part: a relative scale error s(t)·R, the same for the values of one era and
 *   drifting slowly (correlation e^{−Δt/τ} with τ = {@link SUNSPOT_SCALE_CORRELATION_YEARS}
 *   years). The eras are those of the construction of the series (Clette et al. 2014, Space
 *   Sci. Rev. 186, 35; Clette & Lefèvre 2016, Sol. Phys. 291, 2629: from memory for the exact
 *   years). The relative SDs grow back in time to the order of the disagreement between
 *   recalibrated sunspot and group-number series in each era (Clette et al. 2014; Usoskin et al.
 *   2016, Sol. Phys. 291, 2685, from memory): 5 % since 1981 to 40 % before 1749. They are not
 *   a published error budget; they make the band grow back in time by a stated amount, and the
 *   request can scale them.
 *
 * @module
 */
import type { CalendarResolution } from "../time/mod.ts";
import { InputError } from "../errors.ts";
import { periodSums } from "../series/period_means.ts";
import { MEAN_YEAR_DAYS } from "../series/period_key.ts";

/** One era of the sunspot-number uncertainty model. */
export interface SunspotUncertaintyEra {
  /** First decimal year of the era (null: open start). */
  from: number | null;
  /** Relative one-sigma scale (calibration) error s, a fraction of R. */
  relativeScaleSd: number;
  /** Poisson-like coefficient α of a daily value: σ = α·√R. */
  poissonCoefficient: number;
  /** What the era is. */
  basis: string;
}

/**
 * The eras of the model, oldest first (years from Clette et al. 2014, from memory; s and α a
 * stated modelling choice, see the module documentation).
 */
export const SUNSPOT_UNCERTAINTY_ERAS: readonly SunspotUncertaintyEra[] = [
  {
    from: null,
    relativeScaleSd: 0.4,
    poissonCoefficient: 6,
    basis: "before 1749: yearly values only, from scattered observations",
  },
  {
    from: 1749,
    relativeScaleSd: 0.25,
    poissonCoefficient: 4,
    basis: "1749–1817: monthly values from sparse observations, partly interpolated",
  },
  {
    from: 1818,
    relativeScaleSd: 0.15,
    poissonCoefficient: 2,
    basis: "1818–1848: daily values from few observers",
  },
  {
    from: 1849,
    relativeScaleSd: 0.1,
    poissonCoefficient: 1.5,
    basis: "1849–1946: continuous daily observations of one reference observatory and helpers",
  },
  {
    from: 1947,
    relativeScaleSd: 0.07,
    poissonCoefficient: 1,
    basis: "1947–1980: after the change of counting practice (spot weighting), corrected in " +
      "version 2 with a residual uncertainty",
  },
  {
    from: 1981,
    relativeScaleSd: 0.05,
    poissonCoefficient: 1,
    basis: "since 1981: a network of stations scaled to a pilot station",
  },
];

/** Correlation time τ of the scale error, years (a modelling choice: about two cycles). */
export const SUNSPOT_SCALE_CORRELATION_YEARS = 20;

/** The era holding decimal year `t`. */
export function sunspotUncertaintyEra(t: number): SunspotUncertaintyEra {
  let e = SUNSPOT_UNCERTAINTY_ERAS[0];
  for (const era of SUNSPOT_UNCERTAINTY_ERAS) if (era.from !== null && t >= era.from) e = era;
  return e;
}

/** One-sigma uncertainty of each value of a sunspot series, by part. */
export interface SunspotValueUncertainty {
  /** The part correlated over decades (scale error), same units as R. */
  correlated: Float64Array;
  /** The part independent between values (counting noise). */
  independent: Float64Array;
}

/**
 * The modelled one-sigma uncertainty of each value of a sunspot-number series (module
 * documentation): correlated part s(t)·R·k, independent part α(t)·√(R/d)·k.
 *
 * @param time decimal years
 * @param value sunspot numbers (NaN for missing; negative values count as 0)
 * @param daysPerValue days each value averages (1 daily, about 30.44 monthly, 365.25 annual)
 * @param multiplier k, scales both parts @default 1
 * @returns {@link SunspotValueUncertainty} (NaN where the value is missing)
 * @throws {InputError} (field `value`) when lengths differ; (`daysPerValue`, `multiplier`)
 *   when not positive / negative
 * @example
 * ```ts
 * import { modelledSunspotUncertainty } from "./sunspot_number_uncertainty.ts";
 * import assert from "node:assert/strict";
 * const u = modelledSunspotUncertainty([1760.5, 2000.5], [100, 100], 365.25);
 * assert.ok(Math.abs(u.correlated[0] - 25) < 1e-12); // 25 % in 1749–1817
 * assert.ok(Math.abs(u.correlated[1] - 5) < 1e-12); // 5 % since 1981
 * assert.ok(u.independent[0] > u.independent[1]);
 * ```
 */
export function modelledSunspotUncertainty(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  daysPerValue: number,
  multiplier = 1,
): SunspotValueUncertainty {
  const n = time.length;
  if (value.length !== n) {
    throw new InputError(
      `Cannot model sunspot uncertainty: ${value.length} values but ${n} times`,
      { field: "value", reason: "length_mismatch", value: value.length },
    );
  }
  if (!(daysPerValue > 0)) {
    throw new InputError(
      `Cannot model sunspot uncertainty: daysPerValue must be > 0, got ${daysPerValue}`,
      { field: "daysPerValue", reason: "out_of_range", value: daysPerValue },
    );
  }
  if (!(multiplier >= 0) || !Number.isFinite(multiplier)) {
    throw new InputError(
      `Cannot model sunspot uncertainty: multiplier must be ≥ 0, got ${multiplier}`,
      { field: "multiplier", reason: "out_of_range", value: multiplier },
    );
  }
  const correlated = new Float64Array(n), independent = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = value[i];
    if (!Number.isFinite(r)) {
      correlated[i] = independent[i] = NaN;
      continue;
    }
    const era = sunspotUncertaintyEra(time[i]), rp = Math.max(0, r);
    correlated[i] = era.relativeScaleSd * rp * multiplier;
    independent[i] = era.poissonCoefficient * Math.sqrt(rp / daysPerValue) * multiplier;
  }
  return { correlated, independent };
}

/** The uncertainty of cell means of a sunspot series (result of {@link sunspotUncertaintyAtCells}). */
export interface SunspotCellUncertainty {
  /** SD of the correlated part of each cell mean (NaN where the cell has no value). */
  correlated: Float64Array;
  /** SD of the independent part of each cell mean. */
  independent: Float64Array;
  /** τ of the correlated part, years: correlation e^{−Δt/τ} between cells Δt apart. */
  correlationYears: number;
}

/**
 * The uncertainty of the cell means of a sunspot series: the correlated part is the mean of the
 * values' correlated SDs (it does not average out within a cell), the independent part
 * √(Σσᵢ²)/n over the n values present in the cell. Non-finite σ of a present value counts as 0.
 *
 * @param time decimal years of the values
 * @param value the values (NaN for missing)
 * @param uncertainty per-value parts ({@link modelledSunspotUncertainty}, or a series' own σ as
 *   the independent part with a zero correlated part)
 * @param resolution the cells' calendar resolution
 * @param keys the cells' period keys (core/series/period_key.ts)
 * @param correlationYears τ of the correlated part @default SUNSPOT_SCALE_CORRELATION_YEARS
 * @returns {@link SunspotCellUncertainty}
 * @throws {InputError} (field `uncertainty`) when lengths differ; (`correlationYears`) when not
 *   positive
 * @example
 * ```ts
 * import { sunspotUncertaintyAtCells } from "./sunspot_number_uncertainty.ts";
 * import assert from "node:assert/strict";
 * const u = sunspotUncertaintyAtCells(
 *   [2000.1, 2000.6], [100, 100],
 *   { correlated: Float64Array.of(5, 5), independent: Float64Array.of(3, 4) },
 *   "annual", [2000],
 * );
 * assert.equal(u.correlated[0], 5);
 * assert.equal(u.independent[0], 2.5); // √(9 + 16)/2
 * ```
 */
export function sunspotUncertaintyAtCells(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  uncertainty: SunspotValueUncertainty,
  resolution: CalendarResolution,
  keys: ArrayLike<number>,
  correlationYears = SUNSPOT_SCALE_CORRELATION_YEARS,
): SunspotCellUncertainty {
  const n = time.length;
  if (uncertainty.correlated.length !== n || uncertainty.independent.length !== n) {
    throw new InputError(
      `Cannot average sunspot uncertainty into cells: the parts do not have ${n} values`,
      { field: "uncertainty", reason: "length_mismatch" },
    );
  }
  if (!(correlationYears > 0) || !Number.isFinite(correlationYears)) {
    throw new InputError(
      `Cannot average sunspot uncertainty into cells: correlationYears must be > 0, got ${correlationYears}`,
      { field: "correlationYears", reason: "out_of_range", value: correlationYears },
    );
  }
  const finiteOr0 = (v: number) => (Number.isFinite(v) ? v : 0);
  const corr = new Float64Array(n), indep = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const present = Number.isFinite(value[i]);
    corr[i] = present ? finiteOr0(uncertainty.correlated[i]) : NaN;
    indep[i] = finiteOr0(uncertainty.independent[i]);
  }
  const a = periodSums(time, corr, resolution);
  const b = periodSums(time, value, resolution, indep);
  const m = keys.length;
  const correlated = new Float64Array(m).fill(NaN), independent = new Float64Array(m).fill(NaN);
  for (let i = 0; i < m; i++) {
    const j = keys[i] - a.firstKey;
    if (j < 0 || j >= a.count.length || a.count[j] === 0) continue;
    correlated[i] = a.sum[j] / a.count[j];
    independent[i] = Math.sqrt(b.sumSquaredUncertainty![j]) / b.count[j];
  }
  return { correlated, independent, correlationYears };
}

/**
 * The lag-1 correlation of the correlated (scale) error between consecutive cells:
 * e^{−Δt/τ} with Δt the years between the cell middles ((d_{i−1} + d_i)/2 days), the
 * exponential correlation of a continuous-time AR(1) (Ornstein–Uhlenbeck) process.
 *
 * @param days cell lengths in days
 * @param correlationYears τ in years (> 0)
 * @returns per cell, the correlation with the previous cell (0 for the first)
 * @example
 * ```ts
 * import { scaleErrorLag1 } from "./sunspot_number_uncertainty.ts";
 * import assert from "node:assert/strict";
 * const r = scaleErrorLag1([365.2425, 365.2425], 20);
 * assert.ok(Math.abs(r[1] - Math.exp(-1 / 20)) < 1e-15);
 * ```
 */
export function scaleErrorLag1(days: ArrayLike<number>, correlationYears: number): Float64Array {
  const out = new Float64Array(days.length);
  for (let i = 1; i < days.length; i++) {
    out[i] = Math.exp(-(days[i - 1] + days[i]) / 2 / MEAN_YEAR_DAYS / correlationYears);
  }
  return out;
}
