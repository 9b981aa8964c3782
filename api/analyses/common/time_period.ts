/**
 * Times and periods in requests: an ISO 8601 time or a decimal year, and a period whose ISO
 * bounds name whole periods (so "1986" to "1996" is eleven whole years). Parsed by the time
 * model (core/time); problems name the field.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { parseIsoTime } from "../../../core/time/mod.ts";
import { InputProblem } from "../../runs/kind.ts";

/** A time as an ISO 8601 string (YYYY, YYYY-MM, YYYY-MM-DD, date-time) or a decimal year. */
export const TimeInput = z.union([z.string().min(4).max(40), z.number().min(-10000).max(10000)])
  .openapi({
    description: "ISO 8601 time (YYYY, YYYY-MM, YYYY-MM-DD or date-time) or a decimal year",
    example: "1996-08",
  });

/** A period [start, end): ISO times name whole periods ("1996" to "2000" = 1996.0–2001.0). */
export const PeriodInput = z.object({
  start: TimeInput,
  end: TimeInput,
}).openapi({
  description: "A period. An ISO start means the start of the period it names, an ISO end the " +
    "end of the period it names (so 1986 to 1996 covers eleven whole years); decimal years are " +
    "taken as they are, end exclusive.",
});

/** A parsed period, decimal years, end exclusive. */
export interface YearSpan {
  start: number;
  end: number;
}

/**
 * A time input as a decimal year: a number as it is; an ISO time as the start, end or middle of
 * the period it names (a 422 at `pointer` when it does not parse).
 */
export function timeBound(
  v: string | number,
  side: "start" | "end" | "middle",
  pointer: string,
): number {
  if (typeof v === "number") return v;
  try {
    const p = parseIsoTime(v);
    return side === "start" ? p.start : side === "end" ? p.end : p.decimalYear;
  } catch (e) {
    if (e instanceof RangeError) throw new InputProblem(pointer, e.message, { value: v });
    throw e;
  }
}

/** Parse a period input, checking start < end (a 422 at `pointer`/start, /end otherwise). */
export function parsePeriod(
  p: { start: string | number; end: string | number },
  pointer: string,
): YearSpan {
  const start = timeBound(p.start, "start", `${pointer}/start`);
  const end = timeBound(p.end, "end", `${pointer}/end`);
  if (!(end > start)) {
    throw new InputProblem(
      `${pointer}/end`,
      `period end (${end}) must be after its start (${start})`,
      { start, end },
    );
  }
  return { start, end };
}
