/**
 * The bound on the size of a series operation's result: its per-period report grows with the
 * number of output periods, so a span that would give too many is refused before any work.
 *
 * @module
 */
import { InputProblem } from "../../runs/kind.ts";

/** Most output periods a series operation returns. */
export const MAX_PERIODS = 500_000;

/**
 * Refuse a span that would give more than {@link MAX_PERIODS} periods at a resolution.
 *
 * @param start first time, decimal years
 * @param end last time, decimal years
 * @param to target resolution
 * @param pointer the request field to name in the problem
 * @throws {InputProblem} when the span is too long
 */
export function checkPeriodCount(
  start: number,
  end: number,
  to: "daily" | "monthly" | "annual",
  pointer: string,
): void {
  const per = to === "daily" ? 366 : to === "monthly" ? 12 : 1;
  const n = Math.ceil((end - start) * per) + 1;
  if (n > MAX_PERIODS) {
    throw new InputProblem(
      pointer,
      `the series spans about ${n} ${to} periods, more than the ${MAX_PERIODS} one run returns; ` +
        "choose a coarser resolution or a shorter series",
      { periods: n, max_periods: MAX_PERIODS },
    );
  }
}
