/**
 * Shared pieces of the irradiance run kinds: period schemas, time parsing, aligning series on
 * calendar cells, JSON-safe arrays and the standing cautions.
 *
 * @module
 */
export { camelKeys, camelName, snakeKeys, snakeName } from "./json_keys.ts";
import { z } from "@hono/zod-openapi";
import { parseIsoTime } from "../../core/time/parse_iso_time.ts";
import { cellMeans, type CellResolution, valuesAtKeys } from "../../core/irradiance/mod.ts";
import type { StoredSeries } from "../store/types.ts";
import { InputProblem } from "../runs/kind.ts";

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

/** Parse a time input to a decimal-year bound; `side` picks the start or end of an ISO period. */
export function timeBound(v: string | number, side: "start" | "end" | "middle", pointer: string) {
  if (typeof v === "number") return v;
  try {
    const p = parseIsoTime(v);
    return side === "start" ? p.start : side === "end" ? p.end : p.decimalYear;
  } catch (e) {
    throw new InputProblem(pointer, (e as Error).message);
  }
}

/** Parse a period input, checking start < end. */
export function parsePeriod(
  p: { start: string | number; end: string | number },
  pointer: string,
): { start: number; end: number } {
  const start = timeBound(p.start, "start", `${pointer}/start`);
  const end = timeBound(p.end, "end", `${pointer}/end`);
  if (!(end > start)) {
    throw new InputProblem(
      `${pointer}/end`,
      `period end (${end}) must be after its start (${start})`,
    );
  }
  return { start, end };
}

/** The cell resolution of a stored series, or a 422 for irregular axes. */
export function seriesResolution(s: StoredSeries, pointer: string): CellResolution {
  if (s.resolution === "irregular") {
    throw new InputProblem(
      pointer,
      `series ${s.id} ("${s.name}") has an irregular time axis; daily, monthly or annual series are needed`,
    );
  }
  return s.resolution;
}

/** Typical length of a cell in days. */
export function cellDays(r: CellResolution): number {
  return r === "daily" ? 1 : r === "monthly" ? 365.2425 / 12 : 365.2425;
}

/** Values of a series averaged into cells and read at given keys (NaN where missing). */
export function seriesAtKeys(
  s: StoredSeries,
  resolution: CellResolution,
  keys: ArrayLike<number>,
  period?: { start: number; end: number },
): Float64Array {
  let time: ArrayLike<number> = s.time, value: ArrayLike<number> = s.value;
  if (period) {
    const t: number[] = [], v: number[] = [];
    for (let i = 0; i < s.time.length; i++) {
      if (s.time[i] >= period.start && s.time[i] < period.end) {
        t.push(s.time[i]), v.push(s.value[i]);
      }
    }
    time = t;
    value = v;
  }
  return valuesAtKeys(cellMeans(time, value, resolution), keys);
}

/** A JSON-safe copy: non-finite numbers become null. */
export function nullable(x: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Number.isFinite(x[i]) ? x[i] : null;
  return out;
}

/** A JSON-safe number: null when not finite. */
export function num(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** Deep JSON-safe copy of plain data (typed arrays to arrays, non-finite to null). */
export function jsonSafe(v: unknown): unknown {
  if (typeof v === "number") return Number.isFinite(v) ? v : null;
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
    return nullable(v as unknown as ArrayLike<number>);
  }
  if (Array.isArray(v)) return v.map(jsonSafe);
  if (v && typeof v === "object") {
    const o: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) o[k] = jsonSafe(x);
    return o;
  }
  return v;
}

/** The quiet-Sun level of the current absolute scale (Kopp & Lean 2011). */
export const TSI_SCALE_2008_MINIMUM = 1360.8;

/** Warning when a quiet-Sun level is far from the current absolute scale. */
export function quietSunWarning(sq: number): string[] {
  if (Math.abs(sq - TSI_SCALE_2008_MINIMUM) <= 2) return [];
  return [
    `The quiet-Sun level ${sq.toFixed(2)} W m-2 is ${
      (sq - TSI_SCALE_2008_MINIMUM).toFixed(2)
    } W m-2 from 1360.8 W m-2, the 2008-minimum level on the current absolute scale (Kopp & Lean 2011); the TSI record may be on an older scale (about 1365.4 W m-2).`,
  ];
}

/** Warning when a cycle amplitude falls outside the published range 0.9–1.6 W m-2. */
export function cycleAmplitudeWarning(amp: number | null): string[] {
  if (amp === null || (amp >= 0.9 && amp <= 1.6)) return [];
  return [
    `The median solar-cycle amplitude of the reconstruction, ${
      amp.toFixed(3)
    } W m-2 (annual means, maximum minus preceding minimum), is outside the 0.9–1.6 W m-2 of measured cycles (about 0.1 %; Kopp 2016, IPCC AR6 §7.3.4.4).`,
  ];
}

/** Cautions shown beside every irradiance result. */
export const IRRADIANCE_CAUTIONS = [
  "Reconstructions before the satellite era (1978) are model-dependent: they extend a calibrated proxy model through empirical mappings, and their intervals hold only if the proxy relations did not change.",
  "These results do not replace peer-reviewed assessment of solar forcing.",
];

/** Check a sunspot-number series has a declared version. */
export function requireSunspotVersion(s: StoredSeries, pointer: string): string {
  if (s.quantity !== "sunspot_number" && s.quantity !== "sunspot_group_number") {
    throw new InputProblem(
      pointer,
      `series ${s.id} has quantity ${s.quantity}; a sunspot_number (or sunspot_group_number) series is needed`,
    );
  }
  if (!s.version) {
    throw new InputProblem(
      pointer,
      `series ${s.id} ("${s.name}") does not declare its version (e.g. "1" or "2" for the international sunspot number); version 2 differs from version 1 by a factor of about 1/0.6`,
    );
  }
  return s.version;
}
