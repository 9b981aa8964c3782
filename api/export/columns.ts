/**
 * The column vocabulary of every CSV the service writes (stored series and run outputs), so
 * a script reads them all the same way:
 *
 * - `time`: ISO 8601 (UTC), the period holding the point at the series' resolution (a day,
 *   month or year), or the instant for irregular series. Run outputs whose axis is not
 *   calendar time (years from an epoch, model years) name that axis instead and have no ISO
 *   column.
 * - `decimal_year`: the exact stored time as a decimal year on the proleptic Gregorian
 *   calendar.
 * - `value`: in the units stated in the `# units:` line.
 * - `uncertainty`: the 1σ standard uncertainty (one standard deviation), same units.
 * - `lower`, `upper`: the bounds of the interval named, with its level, in the `# interval:`
 *   line (e.g. "95 % prediction interval").
 *
 * @module
 */

/** First column: ISO 8601 time. */
export const TIME_COLUMN = "time";
/** Second column: the decimal year. */
export const DECIMAL_YEAR_COLUMN = "decimal_year";

/** What the `uncertainty` column holds, in the words of the `# columns:` line. */
export const UNCERTAINTY_MEANING =
  "uncertainty = 1σ standard uncertainty (one standard deviation), same units";

/** What `lower` and `upper` hold, given the interval's name (which states its level). */
export function intervalMeaning(interval: string | undefined): string {
  return `lower, upper = bounds of the ${interval ?? "interval (level not stated)"}, same units`;
}
