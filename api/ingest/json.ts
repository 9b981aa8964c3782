/**
 * JSON ingestion of the `InlineSeries` shape (api/schemas/series_ref.ts): parallel arrays
 * `time`, `value`, optional `uncertainty`, with `null` (or a numeric sentinel) as a gap.
 *
 * @module
 */
import { parseIsoDecimalYear } from "../../core/time/mod.ts";
import { checkMeta, ErrorList, finish } from "./normalise.ts";
import type { DuplicatePolicy, IngestResult } from "./types.ts";
import { MAX_ABS_DECIMAL_YEAR, MAX_POINTS } from "./types.ts";
import { decimalYearRange } from "./text.ts";

/** The JSON upload: an inline series plus missing-value sentinels and a duplicate policy. */
export interface JsonSeriesInput {
  name: string;
  quantity: string;
  units: string;
  description?: string | null;
  source?: string | null;
  version?: string | null;
  /** ISO 8601 strings (middle-of-period rule) or decimal years. */
  time: (string | number)[];
  value: (number | null)[];
  uncertainty?: (number | null)[] | null;
  /** Numeric values that mean "missing" (e.g. -1, -999), besides null. */
  missing?: number[];
  /** @default "reject" */
  duplicates?: DuplicatePolicy;
}

/** Options of {@link ingestJson}. */
export interface JsonIngestOptions {
  /** JSON Pointer prefix of the series inside a larger body, e.g. "/series". @default "" */
  pointer?: string;
}

/**
 * Normalise a JSON series upload.
 *
 * `time[i]` is an ISO 8601 string (parseIsoTime: `1996` → 1996.5, `1996-08` → middle of
 * August, dates → noon, date-times as given) or a finite decimal year. `value[i]` null, or
 * equal to a `missing` sentinel, is a gap; the uncertainty of a gap is ignored, and a present
 * value needs a non-negative uncertainty when the array is given. Duplicates and ordering as
 * in the text ingester. Errors carry JSON Pointers such as `/value/12`.
 *
 * @param body the parsed JSON body (already shape-checked by the zod schema, checked again)
 * @param options pointer prefix for errors
 * @returns the series and a report, or every error found; never partial
 * @example
 * ```ts
 * import { ingestJson } from "./json.ts";
 * import assert from "node:assert/strict";
 * const r = ingestJson({
 *   name: "Spot count", quantity: "sunspot_number", units: "1", version: "2",
 *   time: ["1996", "1997", "1998"], value: [8.6, null, 64.3],
 * });
 * assert.ok(r.ok);
 * assert.deepEqual(Array.from(r.series.time), [1996.5, 1998.5]);
 * assert.equal(r.report.missing, 1);
 * ```
 */
export function ingestJson(body: JsonSeriesInput, options: JsonIngestOptions = {}): IngestResult {
  const pre = options.pointer ?? "";
  const errors = new ErrorList();
  const at = (p: string) => ({ pointer: `${pre}${p}`, in: "body" as const });
  const checked = checkMeta(body, (f) => at(`/${f}`), errors);
  const { time: tIn, value: vIn } = body;
  const uIn = body.uncertainty ?? null;
  if (!Array.isArray(tIn)) errors.add({ ...at("/time"), message: "time must be an array" });
  if (!Array.isArray(vIn)) errors.add({ ...at("/value"), message: "value must be an array" });
  if (uIn !== null && !Array.isArray(uIn)) {
    errors.add({ ...at("/uncertainty"), message: "uncertainty must be an array or absent" });
  }
  if (errors.size > 0 && (!Array.isArray(tIn) || !Array.isArray(vIn))) {
    return errors.failure();
  }
  const n = tIn.length;
  if (n > MAX_POINTS) {
    return {
      ok: false,
      errors: [{ ...at("/time"), message: `too many points: ${n}, at most ${MAX_POINTS}` }],
    };
  }
  if (vIn.length !== n) {
    errors.add({
      ...at("/value"),
      message: `value has ${vIn.length} entries but time has ${n}; the arrays must be parallel`,
    });
  }
  if (uIn && uIn.length !== n) {
    errors.add({
      ...at("/uncertainty"),
      message:
        `uncertainty has ${uIn.length} entries but time has ${n}; the arrays must be parallel`,
    });
  }
  if (errors.size > 0) return errors.failure();

  const sentinels = new Set<number>();
  for (const [j, s] of (body.missing ?? []).entries()) {
    if (typeof s !== "number" || !Number.isFinite(s)) {
      errors.add({ ...at(`/missing/${j}`), message: "missing sentinels must be finite numbers" });
    } else sentinels.add(s);
  }
  const time = new Array<number>(n), value = new Array<number>(n);
  const unc = uIn ? new Array<number>(n) : null;
  for (let i = 0; i < n && !errors.full; i++) {
    const t = tIn[i];
    if (typeof t === "number") {
      if (Number.isFinite(t) && Math.abs(t) <= MAX_ABS_DECIMAL_YEAR) time[i] = t;
      else if (Number.isFinite(t)) {
        errors.add({ ...at(`/time/${i}`), message: decimalYearRange(String(t)) });
      } else errors.add({ ...at(`/time/${i}`), message: `time must be finite, got ${t}` });
    } else if (typeof t === "string") {
      try {
        time[i] = parseIsoDecimalYear(t);
      } catch (e) {
        errors.add({
          ...at(`/time/${i}`),
          message: `unparseable time: ${(e as Error).message.replace(/^Cannot parse time /, "")}`,
        });
      }
    } else {
      errors.add({
        ...at(`/time/${i}`),
        message: "time must be an ISO 8601 string or a decimal year",
      });
    }
    time[i] ??= 0;
    const v = vIn[i];
    let gap = false;
    if (v === null || (typeof v === "number" && sentinels.has(v))) {
      gap = true;
      value[i] = NaN;
    } else if (typeof v !== "number") {
      errors.add({ ...at(`/value/${i}`), message: `non-numeric value ${short(v)}` });
      value[i] = 0;
    } else if (!Number.isFinite(v)) {
      errors.add({ ...at(`/value/${i}`), message: `value must be finite, got ${v}` });
      value[i] = 0;
    } else value[i] = v;
    if (unc && uIn) {
      const u = uIn[i];
      if (gap) unc[i] = NaN;
      else if (u === null || u === undefined) {
        errors.add({
          ...at(`/uncertainty/${i}`),
          message:
            "uncertainty is null while the value is present; a series carries an uncertainty for every point or none",
        });
        unc[i] = 0;
      } else if (typeof u !== "number" || !Number.isFinite(u) || u < 0) {
        errors.add({
          ...at(`/uncertainty/${i}`),
          message: `uncertainty must be a finite non-negative number, got ${short(u)}`,
        });
        unc[i] = 0;
      } else unc[i] = u;
    }
  }
  const dup = body.duplicates ?? "reject";
  if (dup !== "reject" && dup !== "mean") {
    errors.add({
      ...at("/duplicates"),
      message: `duplicates must be "reject" or "mean", got ${short(dup)}`,
    });
  }
  return finish(
    {
      time,
      value,
      uncertainty: unc,
      where: (i) => at(`/time/${i}`),
      whole: at("/value"),
    },
    checked,
    dup === "mean" ? "mean" : "reject",
    errors,
  );
}

function short(v: unknown): string {
  const s = JSON.stringify(v) ?? String(v);
  return s.length > 40 ? `${s.slice(0, 40)}…` : s;
}
