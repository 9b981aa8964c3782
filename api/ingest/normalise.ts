/**
 * The last step shared by every ingester: metadata checks, gap removal, ordering and
 * duplicate handling, limits, and resolution inference. Works on parsed points that still
 * carry the place they came from, so every error names its row, column or JSON Pointer.
 *
 * @module
 */
import {
  convertToCanonicalUnits,
  QUANTITIES,
  type Quantity,
  type UnitConversion,
  unitsForQuantity,
} from "../../core/series/quantities.ts";
import {
  inferResolution,
  type PeriodConvention,
  readPeriodConvention,
} from "../../core/time/mod.ts";
import {
  type DuplicatePolicy,
  type IngestError,
  type IngestResult,
  MAX_ERRORS,
  MAX_POINTS,
  type TimeGridReport,
  type UnitsReport,
} from "./types.ts";

/** Series metadata as given by the user (before checks). */
export interface SeriesMetaInput {
  name?: string | null;
  quantity?: string | null;
  units?: string | null;
  description?: string | null;
  source?: string | null;
  version?: string | null;
}

/** Where each metadata field lives in the request, for error pointers. */
export type MetaLocator = (field: keyof SeriesMetaInput) => Pick<IngestError, "pointer" | "in">;

/** Parsed points in input order. `value` NaN marks a missing value (a gap). */
export interface ParsedPoints {
  time: ArrayLike<number>;
  value: ArrayLike<number>;
  /** null when the series has no uncertainty. NaN where the value is missing. */
  uncertainty: ArrayLike<number> | null;
  /** Where point i came from, for error messages about its time. */
  where(i: number): Omit<IngestError, "message">;
  /** Where problems with the points as a whole point (too few, too many). */
  whole: Omit<IngestError, "message">;
}

/** Collects errors up to {@link MAX_ERRORS}, then counts the rest. */
export class ErrorList {
  readonly items: IngestError[] = [];
  private extra = 0;
  add(e: IngestError): void {
    if (this.items.length < MAX_ERRORS) this.items.push(e);
    else this.extra++;
  }
  get size(): number {
    return this.items.length + this.extra;
  }
  get full(): boolean {
    return this.items.length >= MAX_ERRORS;
  }
  /** Errors found beyond the listed ones. */
  get omitted(): number {
    return this.extra;
  }
  /** The listed errors. */
  done(): IngestError[] {
    return this.items;
  }
  /** The failed result: the listed errors, plus `e` when given, and the count left out. */
  failure(e?: IngestError): { ok: false; errors: IngestError[]; omitted: number } {
    if (e && !this.full) return { ok: false, errors: [...this.items, e], omitted: this.extra };
    return { ok: false, errors: this.items, omitted: this.extra + (e ? 1 : 0) };
  }
}

/** Check the metadata; returns the normalised fields or adds errors. */
export function checkMeta(
  meta: SeriesMetaInput,
  at: MetaLocator,
  errors: ErrorList,
):
  | {
    name: string;
    quantity: Quantity;
    units: string;
    description: string | null;
    source: string | null;
    version: string | null;
    /** How values convert to `units` (null when they are in it already). */
    conversion: UnitConversion | null;
  }
  | null {
  const name = (meta.name ?? "").trim();
  if (name === "") errors.add({ ...at("name"), message: "name is required" });
  else if (name.length > 200) {
    errors.add({
      ...at("name"),
      message: `name must be at most 200 characters, got ${name.length}`,
    });
  }
  const q = (meta.quantity ?? "").trim();
  let quantity: Quantity | null = null;
  if (q === "") {
    errors.add({
      ...at("quantity"),
      message: `quantity is required: one of ${QUANTITIES.join(", ")}`,
    });
  } else if (!(QUANTITIES as readonly string[]).includes(q)) {
    errors.add({
      ...at("quantity"),
      message: `unknown quantity "${q}": expected one of ${QUANTITIES.join(", ")}`,
    });
  } else quantity = q as Quantity;
  let units: string | null = null;
  let conversion: UnitConversion | null = null;
  if (meta.units === undefined || meta.units === null) {
    errors.add({ ...at("units"), message: 'units are required (UDUNITS string, e.g. "W m-2")' });
  } else if (quantity !== null) {
    const u = unitsForQuantity(quantity, meta.units);
    if (u.ok) [units, conversion] = [u.units, u.conversion];
    else errors.add({ ...at("units"), message: u.reason });
  }
  const opt = (v: string | null | undefined, field: keyof SeriesMetaInput, max: number) => {
    if (v === undefined || v === null || v.trim() === "") return null;
    if (v.length > max) {
      errors.add({ ...at(field), message: `${field} must be at most ${max} characters` });
    }
    return v;
  };
  const description = opt(meta.description, "description", 4000);
  const source = opt(meta.source, "source", 2000);
  const version = opt(meta.version === undefined ? undefined : meta.version?.trim(), "version", 40);
  if (quantity === null || units === null || name === "") return null;
  return { name, quantity, units, description, source, version, conversion };
}

/**
 * Finish an upload: drop gaps, enforce or resolve time order, check limits, convert units,
 * recognise a monthly or annual grid at the start or middle of its periods (stored at the
 * middle: readPeriodConvention), infer resolution.
 *
 * @param points parsed points in input order (missing values as NaN)
 * @param meta checked metadata (null when it had errors; errors are then returned)
 * @param duplicates "reject": times must strictly increase in input order (missing rows
 *   included); "mean": rows are sorted by time and rows sharing a time are averaged (value:
 *   mean; uncertainty: root of the sum of squares over the count, i.e. independent errors)
 * @param errors errors found so far (returned if any)
 */
export function finish(
  points: ParsedPoints,
  meta: ReturnType<typeof checkMeta>,
  duplicates: DuplicatePolicy,
  errors: ErrorList,
  extraReport: Record<string, unknown> = {},
): IngestResult {
  const n = points.time.length;
  let missing = 0;
  for (let i = 0; i < n; i++) if (Number.isNaN(points.value[i])) missing++;
  const present = n - missing;
  if (errors.size === 0 && duplicates === "reject") checkOrder(points, errors);
  if (present > MAX_POINTS) {
    errors.add({ ...points.whole, message: `too many points: ${present}, at most ${MAX_POINTS}` });
  }
  if (errors.size > 0 || meta === null) return errors.failure();
  const merged = mergePoints(points, present, duplicates);
  const { aggregated } = merged;
  if (merged.time.length < 2) {
    return {
      ok: false,
      errors: [{
        ...points.whole,
        message: `fewer than 2 points: ${merged.time.length} kept of ${n} read (${missing} missing${
          aggregated ? `, ${aggregated} merged as duplicates` : ""
        })`,
      }],
    };
  }
  const grid = readPeriodConvention(merged.time);
  const { conversion, ...fields } = meta;
  const inUnits = convertUnits(merged.value, merged.uncertainty, conversion);
  const time = grid ? grid.middle : merged.time;
  return {
    ok: true,
    series: {
      ...fields,
      description: conversion
        ? withConversionNote(fields.description, conversion)
        : fields.description,
      resolution: inferResolution(time),
      time,
      value: noNegativeZero(inUnits.value),
      uncertainty: inUnits.uncertainty ? noNegativeZero(inUnits.uncertainty) : null,
    },
    report: {
      read: n,
      kept: time.length,
      missing,
      aggregated,
      ...extraReport,
      time_grid: grid ? timeGridReport(grid, merged.time) : null,
      units_conversion: conversion ? unitsReport(conversion) : null,
    },
  };
}

/** "reject" policy: times must strictly increase in input order (missing rows included). */
function checkOrder(points: ParsedPoints, errors: ErrorList): void {
  const { time } = points;
  for (let i = 1; i < time.length && !errors.full; i++) {
    if (time[i] === time[i - 1]) {
      errors.add({
        ...points.where(i),
        message: `duplicate timestamp: same time as the previous row (${time[i]}); ` +
          `remove it, or upload with duplicates=mean to average rows that share a time`,
      });
    } else if (time[i] < time[i - 1]) {
      errors.add({
        ...points.where(i),
        message: `non-monotonic timestamps: time ${time[i]} comes before the previous row's ${
          time[i - 1]
        }; sort the rows, or upload with duplicates=mean (sorts and averages)`,
      });
    }
  }
}

/**
 * Keep present points, sorted by time (stable) when averaging duplicates; rows sharing a time
 * are averaged (uncertainty: root of the sum of squares over the count).
 */
function mergePoints(points: ParsedPoints, present: number, duplicates: DuplicatePolicy) {
  const { time, value, uncertainty } = points;
  const idx = new Int32Array(present);
  for (let i = 0, k = 0; i < time.length; i++) if (!Number.isNaN(value[i])) idx[k++] = i;
  if (duplicates === "mean") idx.sort((a, b) => time[a] - time[b] || a - b);
  const t: number[] = [], v: number[] = [], u: number[] | null = uncertainty ? [] : null;
  let aggregated = 0;
  for (let k = 0; k < idx.length;) {
    let j = k, sum = 0, sumSq = 0;
    while (j < idx.length && time[idx[j]] === time[idx[k]]) {
      sum += value[idx[j]];
      if (uncertainty) sumSq += uncertainty[idx[j]] ** 2;
      j++;
    }
    const m = j - k;
    aggregated += m - 1;
    t.push(time[idx[k]]);
    v.push(m === 1 ? value[idx[k]] : sum / m);
    if (u && uncertainty) u.push(m === 1 ? uncertainty[idx[k]] : Math.sqrt(sumSq) / m);
    k = j;
  }
  return {
    time: Float64Array.from(t),
    value: Float64Array.from(v),
    uncertainty: u ? Float64Array.from(u) : null,
    aggregated,
  };
}

/** Values and uncertainties in the canonical unit. */
function convertUnits(
  value: Float64Array,
  uncertainty: Float64Array | null,
  conversion: UnitConversion | null,
): { value: Float64Array; uncertainty: Float64Array | null } {
  if (!conversion) return { value, uncertainty };
  return {
    value: convertToCanonicalUnits(value, conversion),
    uncertainty: uncertainty ? convertToCanonicalUnits(uncertainty, conversion, true) : null,
  };
}

/** Replace negative zeros by zeros, in place. */
function noNegativeZero(a: Float64Array): Float64Array {
  for (let i = 0; i < a.length; i++) if (a[i] === 0) a[i] = 0;
  return a;
}

/** The series description with the unit conversion stated (it travels with the series). */
function withConversionNote(description: string | null, c: UnitConversion): string {
  const note = `Values converted on upload from ${c.from} to ${c.to}: ${c.formula}.`;
  return description ? `${description} ${note}` : note;
}

function unitsReport(c: UnitConversion): UnitsReport {
  return { from: c.from, to: c.to, formula: c.formula };
}

const GRID_WORDS: Record<string, string> = {
  "annual/start":
    "the start of each year (an integer decimal year, as R's time() writes a yearly ts)",
  "annual/middle": "the middle of each year (year + 0.5, as an ISO 8601 year is read)",
  "monthly/start/twelfths":
    "the start of each month in twelfths of a year (year + (month - 1)/12, as R's time() writes a monthly ts)",
  "monthly/middle/twelfths":
    "the middle of each month in twelfths of a year (year + (month - 0.5)/12)",
  "monthly/start/calendar": "the start of each calendar month (its first day)",
  "monthly/middle/calendar": "the middle of each calendar month (as an ISO 8601 month is read)",
};

/** What the upload report says about a recognised monthly or annual grid. */
function timeGridReport(g: PeriodConvention, given: Float64Array): TimeGridReport {
  let moved = false;
  for (let i = 0; i < given.length && !moved; i++) moved = given[i] !== g.middle[i];
  const key = [g.resolution, g.position, ...(g.months ? [g.months] : [])].join("/");
  const period = g.resolution === "annual" ? "year" : "calendar month";
  return {
    resolution: g.resolution,
    position: g.position,
    months: g.months,
    moved_to_middle: moved,
    note: `Times read as ${GRID_WORDS[key]}; ` +
      (moved
        ? `stored at the middle of each ${period}, sunlag's time convention.`
        : `stored as given (the middle of each ${period}, sunlag's time convention).`),
  };
}
