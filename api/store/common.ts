/**
 * What every adapter shares: the checks on what is stored, the row-to-record conversions
 * (both adapters use the same column names and keep JSON as text, so a stored run reads back
 * exactly as it was written), and the problem body of an interrupted run.
 *
 * @module
 */
import type {
  ApiKeyRecord,
  HolderSpec,
  Holding,
  OwnerRecord,
  Role,
  RunRecord,
  RunStatus,
  RunSummary,
  SeriesMeta,
  StoredSeries,
  Visibility,
} from "./types.ts";
import { LOCAL_OWNER, VISIBILITIES } from "./types.ts";
import { resultBytes, resultJson } from "./result_text.ts";

/** One schema step. Versions are consecutive from 1; never edit a released step, add one. */
export interface Migration {
  version: number;
  name: string;
  sql: string;
}

/** A database row as a driver returns it (possibly with a null prototype). */
export type DbRow = Record<string, unknown>;

export function text(v: unknown): string {
  return String(v);
}

export function textOrNull(v: unknown): string | null {
  return v === null || v === undefined ? null : String(v);
}

export function numberOrNull(v: unknown): number | null {
  return v === null || v === undefined ? null : Number(v);
}

export function jsonOrNull(v: unknown): Record<string, unknown> | null {
  return v === null || v === undefined ? null : JSON.parse(String(v));
}

/** Series metadata columns, in the order both adapters' tables declare them. */
export const SERIES_META_COLUMNS = [
  "id",
  "name",
  "quantity",
  "units",
  "description",
  "source",
  "version",
  "resolution",
  "n",
  "start_time",
  "end_time",
  "derived_from",
  "created_at",
] as const;

/** Run columns listed by `listRuns` (the summary), then those only `getRun` reads. */
export const RUN_SUMMARY_COLUMNS = [
  "id",
  "kind",
  "created_at",
  "updated_at",
  "status",
  "progress",
  "service_version",
  "algorithm_version",
  "seed",
  "result_digest",
  "eta_seconds",
] as const;
export const RUN_COLUMNS = [...RUN_SUMMARY_COLUMNS, "params", "result", "error"] as const;

/** A plain object from a series row (driver rows may have a null prototype). */
export function toSeriesMeta(r: DbRow): SeriesMeta {
  return {
    id: text(r.id),
    name: text(r.name),
    quantity: text(r.quantity),
    units: text(r.units),
    description: textOrNull(r.description),
    source: textOrNull(r.source),
    version: textOrNull(r.version),
    resolution: text(r.resolution) as SeriesMeta["resolution"],
    n: Number(r.n),
    start: Number(r.start_time),
    end: Number(r.end_time),
    derived_from: textOrNull(r.derived_from),
    created_at: text(r.created_at),
  };
}

/** The values of {@link SERIES_META_COLUMNS} for a series, in that order. */
export function seriesMetaValues(s: SeriesMeta): (string | number | null)[] {
  return [
    s.id,
    s.name,
    s.quantity,
    s.units,
    s.description,
    s.source,
    s.version,
    s.resolution,
    s.n,
    s.start,
    s.end,
    s.derived_from,
    s.created_at,
  ];
}

/** Only the metadata fields of a series (drops the arrays and anything extra). */
export function metaOf(s: SeriesMeta): SeriesMeta {
  return toSeriesMeta({
    ...s,
    start_time: s.start,
    end_time: s.end,
  });
}

export function toRunSummary(r: DbRow, inputSeries: string[], inputRuns: string[]): RunSummary {
  return {
    id: text(r.id),
    kind: text(r.kind),
    created_at: text(r.created_at),
    updated_at: text(r.updated_at),
    status: text(r.status) as RunStatus,
    progress: Number(r.progress),
    input_series: inputSeries,
    input_runs: inputRuns,
    service_version: text(r.service_version),
    algorithm_version: text(r.algorithm_version),
    seed: numberOrNull(r.seed),
    result_digest: textOrNull(r.result_digest),
    eta_seconds: numberOrNull(r.eta_seconds),
  };
}

/** A column value: SQLite binds bytes as a BLOB. */
export type ColumnValue = string | number | null | Uint8Array;

/**
 * How a result is written: its canonical JSON as UTF-8 bytes (a BLOB: no text copy of a large
 * result is made) or as text (a TEXT column).
 */
export type ResultForm = "bytes" | "text";

function resultColumn(v: unknown, form: ResultForm): ColumnValue {
  if (v === null) return null;
  const r = v as Record<string, unknown>;
  return form === "bytes" ? resultBytes(r) : resultJson(r);
}

/**
 * The values of {@link RUN_COLUMNS} for a run, in that order (JSON fields as text; the result
 * in the given form).
 */
export function runValues(r: RunRecord, form: ResultForm = "text"): ColumnValue[] {
  return [
    r.id,
    r.kind,
    r.created_at,
    r.updated_at,
    r.status,
    r.progress,
    r.service_version,
    r.algorithm_version,
    r.seed,
    r.result_digest,
    r.eta_seconds,
    JSON.stringify(r.params),
    resultColumn(r.result, form),
    r.error === null ? null : JSON.stringify(r.error),
  ];
}

/** @throws {RangeError} naming the operation when limit or offset is not a non-negative integer. */
export function checkPaging(where: string, limit: number, offset: number): void {
  if (!Number.isInteger(limit) || limit < 0) {
    throw new RangeError(`Cannot ${where}: limit must be a non-negative integer, got ${limit}`);
  }
  if (!Number.isInteger(offset) || offset < 0) {
    throw new RangeError(`Cannot ${where}: offset must be a non-negative integer, got ${offset}`);
  }
}

/** @throws {RangeError} when the arrays disagree with each other or with `n`, `start`, `end`. */
export function checkSeries(s: StoredSeries): void {
  const n = s.time?.length;
  const bad = (what: string) => {
    throw new RangeError(`Cannot store series ${s.id}: ${what}`);
  };
  if (!(s.time instanceof Float64Array) || !(s.value instanceof Float64Array)) {
    bad("time and value must be Float64Arrays");
  }
  if (s.value.length !== n) bad(`value has ${s.value.length} points, time has ${n}`);
  if (s.uncertainty !== null && !(s.uncertainty instanceof Float64Array)) {
    bad("uncertainty must be a Float64Array or null");
  }
  if (s.uncertainty !== null && s.uncertainty.length !== n) {
    bad(`uncertainty has ${s.uncertainty.length} points, time has ${n}`);
  }
  if (s.n !== n) bad(`n is ${s.n} but the arrays hold ${n} points`);
  if (!Number.isFinite(s.start) || !Number.isFinite(s.end)) bad("start and end must be finite");
}

/** Run fields `updateRun` may change, with how each value is written to its column. */
const RUN_PATCH_COLUMNS: Record<string, (v: unknown) => ColumnValue> = {
  updated_at: (v) => String(v),
  status: (v) => String(v),
  progress: (v) => Number(v),
  params: (v) => JSON.stringify(v),
  service_version: (v) => String(v),
  algorithm_version: (v) => String(v),
  seed: (v) => (v === null ? null : Number(v)),
  result: (v) => resultColumn(v, "text"),
  result_digest: (v) => (v === null ? null : String(v)),
  error: (v) => (v === null ? null : JSON.stringify(v)),
  eta_seconds: (v) => (v === null ? null : Number(v)),
};

/**
 * Column values for an `updateRun` patch: every defined field except the input lists, with
 * `updated_at` set to `now` unless the patch carries it.
 *
 * @throws {RangeError} for a field that is not a run column (including id, kind, created_at).
 */
export function encodeRunPatch(
  id: string,
  patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  now: string,
  form: ResultForm = "text",
): [column: string, value: ColumnValue][] {
  const out: [string, ColumnValue][] = [];
  const p: Record<string, unknown> = { ...patch, updated_at: patch.updated_at ?? now };
  for (const [key, value] of Object.entries(p)) {
    if (
      value === undefined || key === "input_series" || key === "input_runs" ||
      key === "input_fields"
    ) continue;
    const enc = RUN_PATCH_COLUMNS[key];
    if (!enc) throw new RangeError(`Cannot update run ${id}: unknown field "${key}"`);
    out.push([key, key === "result" ? resultColumn(value, form) : enc(value)]);
  }
  return out;
}

/**
 * The RFC 9457 body recorded on a run that a restart interrupted: the service's "internal"
 * problem type (same URI and title as in `api/problems.ts`), with the reason as detail.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { interruptedProblem } from "./common.ts";
 * assert.equal(interruptedProblem("restarted").status, 500);
 * ```
 */
export function interruptedProblem(reason: string): {
  type: string;
  title: string;
  status: 500;
  detail: string;
} {
  return {
    type: "https://sunlag.invalid/problems/internal",
    title: "Internal error",
    status: 500,
    detail: reason,
  };
}

/** The first schema step after the original one: owners, keys and holdings. */
export const TENANCY_MIGRATION_NAME = "owners, api keys, series and run holdings";

/** Rank of a visibility, narrowest first. */
export function visibilityRank(v: Visibility): number {
  return VISIBILITIES.indexOf(v);
}

/** The default holder of writes that name none: the local owner, private. */
export const DEFAULT_HOLDER: HolderSpec = { owner: LOCAL_OWNER, visibility: "private" };

/** An owner from a row of `owners`. */
export function toOwner(r: DbRow): OwnerRecord {
  return {
    id: text(r.id),
    name: text(r.name),
    role: text(r.role) as Role,
    group: text(r.group_name),
    created_at: text(r.created_at),
  };
}

/** A key from a row of `api_keys`. */
export function toApiKey(r: DbRow): ApiKeyRecord {
  return {
    id: text(r.id),
    owner: text(r.owner_id),
    hash: text(r.key_hash),
    label: textOrNull(r.label),
    role: textOrNull(r.role) as Role | null,
    created_at: text(r.created_at),
    expires_at: textOrNull(r.expires_at),
    revoked_at: textOrNull(r.revoked_at),
  };
}

/** A holding from a row with `h_owner`, `h_visibility`, `h_created` columns. */
export function toHolding(r: DbRow): Holding {
  return {
    owner: text(r.h_owner),
    visibility: text(r.h_visibility) as Visibility,
    created_at: text(r.h_created),
  };
}

/** @throws {RangeError} naming the field when a visibility or role is not one of the words. */
export function checkVisibility(where: string, v: string): void {
  if (!(VISIBILITIES as readonly string[]).includes(v)) {
    throw new RangeError(
      `Cannot ${where}: visibility must be private, group or public, got "${v}"`,
    );
  }
}
