/**
 * The last step shared by every ingester: metadata checks, gap removal, ordering and
 * duplicate handling, limits, and resolution inference. Works on parsed points that still
 * carry the place they came from, so every error names its row, column or JSON Pointer.
 *
 * @module
 */
import { canonicalUnits, QUANTITIES, type Quantity } from "../../core/series/quantities.ts";
import { inferResolution } from "../../core/time/mod.ts";
import {
  type DuplicatePolicy,
  type IngestError,
  type IngestResult,
  MAX_ERRORS,
  MAX_POINTS,
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
  if (meta.units === undefined || meta.units === null) {
    errors.add({ ...at("units"), message: 'units are required (UDUNITS string, e.g. "W m-2")' });
  } else if (quantity !== null) {
    const u = canonicalUnits(quantity, meta.units);
    if (u.ok) units = u.units;
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
  return { name, quantity, units, description, source, version };
}

/**
 * Finish an upload: drop gaps, enforce or resolve time order, check limits, infer resolution.
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
  const { time, value, uncertainty } = points;
  let missing = 0;
  for (let i = 0; i < n; i++) if (Number.isNaN(value[i])) missing++;
  const present = n - missing;
  if (errors.size === 0 && duplicates === "reject") {
    for (let i = 1; i < n && !errors.full; i++) {
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
  if (present > MAX_POINTS) {
    errors.add({ pointer: "", message: `too many points: ${present}, at most ${MAX_POINTS}` });
  }
  if (errors.size > 0 || meta === null) return errors.failure();

  // Keep present points, sorted by time (stable) when averaging duplicates.
  const idx = new Int32Array(present);
  for (let i = 0, k = 0; i < n; i++) if (!Number.isNaN(value[i])) idx[k++] = i;
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
  if (t.length < 2) {
    return {
      ok: false,
      errors: [{
        pointer: "",
        message: `fewer than 2 points: ${t.length} kept of ${n} read (${missing} missing${
          aggregated ? `, ${aggregated} merged as duplicates` : ""
        })`,
      }],
    };
  }
  const m = t.length;
  const tt = new Float64Array(m), vv = new Float64Array(m);
  const uu = u ? new Float64Array(m) : null;
  for (let i = 0; i < m; i++) {
    tt[i] = t[i];
    vv[i] = v[i] === 0 ? 0 : v[i]; // no negative zero
    if (uu && u) uu[i] = u[i] === 0 ? 0 : u[i];
  }
  return {
    ok: true,
    series: { ...meta, resolution: inferResolution(tt), time: tt, value: vv, uncertainty: uu },
    report: { read: n, kept: tt.length, missing, aggregated, ...extraReport },
  };
}
