/**
 * Plausibility checks of a reconstruction: how often a linear proxy model or an empirical
 * sunspot → proxy mapping is used far outside the range it was fitted on. Such cells are not
 * refused (the model may hold), but they are counted and reported, never silent (common
 * practice for empirical regressions: extrapolation beyond the calibration range is flagged).
 *
 * @module
 */
import { InputError } from "../errors.ts";

/**
 * Count the finite values lying outside [min − m·(max − min), max + m·(max − min)]: beyond the
 * calibration range of a proxy by more than a fraction `margin` of that range.
 *
 * @param values proxy values (NaN skipped)
 * @param min smallest value of the calibration points
 * @param max largest value of the calibration points (≥ min)
 * @param margin fraction of the range allowed either side @default 0.25
 * @returns the number of values far outside
 * @throws {InputError} (field `max`) when max < min, (field `margin`) when margin < 0
 * @example
 * ```ts
 * import { countFarOutsideRange } from "./extrapolation_checks.ts";
 * import assert from "node:assert/strict";
 * // range [0, 1], margin 0.25: −0.3 and 1.5 are far outside, 1.2 is not
 * assert.equal(countFarOutsideRange([-0.3, 0.5, 1.2, 1.5, NaN], 0, 1), 2);
 * ```
 */
export function countFarOutsideRange(
  values: ArrayLike<number>,
  min: number,
  max: number,
  margin = 0.25,
): number {
  if (!(max >= min)) {
    throw new InputError(`Cannot check the range: max (${max}) is below min (${min})`, {
      field: "max",
      reason: "out_of_range",
      value: max,
    });
  }
  if (!(margin >= 0)) {
    throw new InputError(`Cannot check the range: margin must be ≥ 0, got ${margin}`, {
      field: "margin",
      reason: "out_of_range",
      value: margin,
    });
  }
  const pad = margin * (max - min);
  let c = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isFinite(v) && (v < min - pad || v > max + pad)) c++;
  }
  return c;
}

/**
 * Count the selected cells whose sunspot number exceeds `factor` × the largest sunspot number
 * of a mapping's fit: where back-extension extrapolates the mapping to stronger activity.
 *
 * @param sunspot sunspot number per cell (NaN skipped)
 * @param selected per cell, nonzero where the cell was back-extended (same length)
 * @param sunspotMax largest sunspot number in the mapping fit
 * @param factor multiple of `sunspotMax` tolerated @default 1.25
 * @returns the number of selected cells beyond `factor·sunspotMax`
 * @throws {InputError} (field `selected`) when the lengths differ
 * @example
 * ```ts
 * import { countBeyondMappingRange } from "./extrapolation_checks.ts";
 * import assert from "node:assert/strict";
 * assert.equal(countBeyondMappingRange([100, 300, 300], [1, 1, 0], 200), 1);
 * ```
 */
export function countBeyondMappingRange(
  sunspot: ArrayLike<number>,
  selected: ArrayLike<number>,
  sunspotMax: number,
  factor = 1.25,
): number {
  if (selected.length !== sunspot.length) {
    throw new InputError(
      `Cannot check the mapping range: ${sunspot.length} sunspot values but ${selected.length} flags`,
      { field: "selected", reason: "length_mismatch", value: selected.length },
    );
  }
  let c = 0;
  for (let i = 0; i < sunspot.length; i++) {
    if (selected[i] && sunspot[i] > factor * sunspotMax) c++;
  }
  return c;
}
