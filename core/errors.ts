/**
 * The one error type core functions throw for bad input: a `RangeError` that carries the
 * offending argument's name, the element index and value where there is one, and a
 * machine-readable reason. Callers map it to their own vocabulary (the API to RFC 9457
 * problems with JSON Pointers) from these fields, never from the wording of the message.
 *
 * @module
 */

/** Machine-readable reasons for a refused input (extend as functions need). */
export type InputErrorReason =
  | "empty"
  | "too_few_points"
  | "not_finite"
  | "out_of_range"
  | "not_increasing"
  | "length_mismatch"
  | "not_regular"
  | "no_overlap"
  | "overlap"
  | "constant"
  | "collinear"
  | "unsupported"
  | "invalid";

/** What an {@link InputError} says about the offending input. */
export interface InputErrorDetail {
  /** Name of the offending argument or option of the function, e.g. `"window"`, `"climate"`. */
  field: string;
  /** Why it was refused. */
  reason: InputErrorReason;
  /** Index of the offending element, when one element is at fault. */
  index?: number;
  /** The offending value (a number, string or small array), when useful to the caller. */
  value?: unknown;
}

/**
 * A refused input of a core function. `message` is for people; `field`, `reason`, `index` and
 * `value` are for programs.
 *
 * @example
 * ```ts
 * import { InputError } from "./errors.ts";
 * const e = new InputError("Cannot smooth: window must be odd, got 4", {
 *   field: "window",
 *   reason: "invalid",
 *   value: 4,
 * });
 * if (!(e instanceof RangeError) || e.field !== "window" || e.value !== 4) throw new Error();
 * ```
 */
export class InputError extends RangeError {
  readonly field: string;
  readonly reason: InputErrorReason;
  readonly index?: number;
  readonly value?: unknown;
  constructor(message: string, detail: InputErrorDetail) {
    super(message);
    this.name = "InputError";
    this.field = detail.field;
    this.reason = detail.reason;
    if (detail.index !== undefined) this.index = detail.index;
    if (detail.value !== undefined) this.value = detail.value;
  }
}
