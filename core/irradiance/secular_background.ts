/**
 * An optional, explicitly labelled secular (long-term) TSI background scenario.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { type Reconstruction, SOURCE_NONE } from "./proxy_reconstruction.ts";

/** A period in decimal years, end exclusive. */
export interface YearPeriod {
  start: number;
  end: number;
}

/** Scenario parameters for {@link secularBackground}. */
export interface SecularBackgroundScenario {
  /** Length of the centred running mean of sunspot number, years. */
  windowYears: number;
  /** Period of the reference (e.g. grand) minimum. */
  referenceMinimum: YearPeriod;
  /** Later period whose background exceeds the reference by `deltaTsi`. */
  laterPeriod: YearPeriod;
  /** Background change from the reference minimum to the later period, W m-2. */
  deltaTsi: number;
  /** Calibration period of the model, where the background is zero on average. */
  calibrationPeriod: YearPeriod;
}

/** Result of {@link secularBackground}. */
export interface SecularBackground {
  /** Background at each input time, W m-2 (NaN where the running mean is undefined). */
  value: Float64Array;
  /** W m-2 per unit of running-mean sunspot number. */
  scale: number;
  /** Running-mean sunspot number averaged over the reference, later and calibration periods. */
  referenceMean: number;
  laterMean: number;
  calibrationMean: number;
}

function periodMean(
  t: ArrayLike<number>,
  v: Float64Array,
  p: YearPeriod,
  field: "referenceMinimum" | "laterPeriod" | "calibrationPeriod",
  what: string,
): number {
  let s = 0, c = 0;
  for (let i = 0; i < t.length; i++) {
    if (t[i] >= p.start && t[i] < p.end && Number.isFinite(v[i])) (s += v[i]), c++;
  }
  if (c === 0) {
    throw new InputError(
      `Cannot build secular background: the ${what} [${p.start}, ${p.end}) holds no sunspot data`,
      { field, reason: "no_overlap", value: [p.start, p.end] },
    );
  }
  return s / c;
}

/**
 * A secular background proportional to a long running mean of sunspot number:
 * B(t) = s·(M(t) − M̄_cal), M the centred running mean over `windowYears`, scaled so that
 * M̄_later − M̄_ref maps to `deltaTsi` (s = ΔTSI / (M̄_later − M̄_ref)) and zero on average over
 * the calibration period, where the proxy model already absorbs the level. This is a
 * scenario, not a measurement: published secular changes since the Maunder Minimum differ by
 * an order of magnitude (Yeo et al. 2020, Geophys. Res. Lett.), so it is never applied by default.
 * The running mean is over the points within ±window/2 (fewer at the ends of the record).
 *
 * @param time decimal years of the sunspot series (increasing)
 * @param sunspot sunspot numbers (NaN skipped)
 * @param scenario {@link SecularBackgroundScenario}
 * @returns {@link SecularBackground}
 * @throws {InputError} naming the field: `referenceMinimum`, `laterPeriod` or
 *   `calibrationPeriod` when that period holds no sunspot data (reason `no_overlap`),
 *   `windowYears` when not positive, `laterPeriod` (reason `constant`) when the reference and
 *   later means are equal, `sunspot` when the lengths differ
 * @example
 * ```ts
 * import { secularBackground } from "./secular_background.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 400 }, (_, i) => 1700 + i + 0.5);
 * const r = t.map((y) => (y < 1800 ? 20 : 80));
 * const b = secularBackground(t, r, {
 *   windowYears: 11, referenceMinimum: { start: 1700, end: 1780 },
 *   laterPeriod: { start: 1850, end: 2000 }, deltaTsi: 1.2,
 *   calibrationPeriod: { start: 1980, end: 2020 },
 * });
 * assert.ok(Math.abs(b.scale - 0.02) < 1e-12);
 * assert.ok(Math.abs(b.value[50] + 1.2) < 1e-9);
 * ```
 */
export function secularBackground(
  time: ArrayLike<number>,
  sunspot: ArrayLike<number>,
  scenario: SecularBackgroundScenario,
): SecularBackground {
  const n = time.length;
  if (sunspot.length !== n) {
    throw new InputError("Cannot build secular background: time and sunspot differ in length", {
      field: "sunspot",
      reason: "length_mismatch",
      value: sunspot.length,
    });
  }
  const w = scenario.windowYears;
  if (!(w > 0) || !Number.isFinite(w)) {
    throw new InputError(`Cannot build secular background: windowYears must be > 0, got ${w}`, {
      field: "windowYears",
      reason: "out_of_range",
      value: w,
    });
  }
  const M = new Float64Array(n);
  let a = 0, b = 0, s = 0, c = 0;
  for (let i = 0; i < n; i++) {
    while (b < n && time[b] <= time[i] + w / 2) {
      if (Number.isFinite(sunspot[b])) (s += sunspot[b]), c++;
      b++;
    }
    while (time[a] < time[i] - w / 2) {
      if (Number.isFinite(sunspot[a])) (s -= sunspot[a]), c--;
      a++;
    }
    M[i] = c > 0 ? s / c : NaN;
  }
  const ref = periodMean(
    time,
    M,
    scenario.referenceMinimum,
    "referenceMinimum",
    "reference minimum period",
  );
  const later = periodMean(time, M, scenario.laterPeriod, "laterPeriod", "later period");
  const cal = periodMean(
    time,
    M,
    scenario.calibrationPeriod,
    "calibrationPeriod",
    "calibration period",
  );
  if (!(Math.abs(later - ref) > 1e-9)) {
    throw new InputError(
      "Cannot build secular background: the running mean is the same in the reference and later periods",
      { field: "laterPeriod", reason: "constant", value: later },
    );
  }
  const scale = scenario.deltaTsi / (later - ref);
  const value = new Float64Array(n);
  for (let i = 0; i < n; i++) value[i] = scale * (M[i] - cal);
  return { value, scale, referenceMean: ref, laterMean: later, calibrationMean: cal };
}

/**
 * A reconstruction with a background added to its values and interval bounds (the interval
 * width is unchanged: the band does not include the uncertainty of the scenario). A cell whose
 * background is missing (NaN) loses its value: value, SD and bounds become NaN and its source
 * {@link SOURCE_NONE}.
 *
 * @param rec the reconstruction (not changed)
 * @param background background per cell, W m-2 (same length)
 * @returns a new reconstruction
 * @throws {InputError} (field `background`) when the lengths differ
 * @example
 * ```ts
 * import { withSecularBackground } from "./secular_background.ts";
 * import assert from "node:assert/strict";
 * const rec = { value: Float64Array.of(1361, 1361), sd: Float64Array.of(0.1, 0.1),
 *   lower: Float64Array.of(1360.8, 1360.8), upper: Float64Array.of(1361.2, 1361.2),
 *   source: Uint8Array.of(1, 1) };
 * const b = withSecularBackground(rec, [0.5, NaN]);
 * assert.equal(b.value[0], 1361.5);
 * assert.ok(Number.isNaN(b.sd[1]) && b.source[1] === 0);
 * ```
 */
export function withSecularBackground<
  R extends Pick<Reconstruction, "value" | "sd" | "lower" | "upper" | "source">,
>(
  rec: R,
  background: ArrayLike<number>,
): R {
  const n = rec.value.length;
  if (background.length !== n) {
    throw new InputError(
      `Cannot add the background: ${background.length} values for ${n} cells`,
      { field: "background", reason: "length_mismatch", value: background.length },
    );
  }
  const out: R = {
    ...rec,
    value: Float64Array.from(rec.value),
    sd: Float64Array.from(rec.sd),
    lower: Float64Array.from(rec.lower),
    upper: Float64Array.from(rec.upper),
    source: Uint8Array.from(rec.source),
  };
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(out.value[i])) continue;
    const add = background[i];
    if (!Number.isFinite(add)) {
      out.value[i] =
        out.sd[i] =
        out.lower[i] =
        out.upper[i] =
          NaN;
      out.source[i] = SOURCE_NONE;
      continue;
    }
    out.value[i] += add;
    out.lower[i] += add;
    out.upper[i] += add;
  }
  return out;
}
