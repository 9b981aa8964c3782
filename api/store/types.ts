/**
 * The storage interface. Routes and workers talk only to `Store`; adapters (the embedded
 * SQLite one now, PostgreSQL later) implement it and must pass the shared suite in
 * `test/api/store/store_suite.ts`. Every method is async so a networked adapter fits.
 *
 * @module
 */
import type { FieldStore } from "./field_types.ts";

export type * from "./field_types.ts";

/** Sampling resolution inferred from the time axis. */
export type Resolution = "daily" | "monthly" | "annual" | "irregular";

/** Metadata of a stored series (everything but the point arrays). */
export interface SeriesMeta {
  /** `sha256:` + hex SHA-256 of the RFC 8785 canonical JSON of the normalised series. */
  id: string;
  name: string;
  quantity: string;
  units: string;
  description: string | null;
  source: string | null;
  /** Version of the index, e.g. "2" for sunspot number version 2; null when not applicable. */
  version: string | null;
  resolution: Resolution;
  /** Number of points. */
  n: number;
  /** First and last time, decimal years. */
  start: number;
  end: number;
  /** Run id this series was derived from, or null for an upload. */
  derived_from: string | null;
  /** ISO 8601 UTC time the series was first stored (not part of the content id). */
  created_at: string;
}

/** A stored series: metadata plus its points (decimal-year time axis, strictly increasing). */
export interface StoredSeries extends SeriesMeta {
  time: Float64Array;
  value: Float64Array;
  /** One-sigma uncertainty per point, or null. */
  uncertainty: Float64Array | null;
}

export type RunStatus = "queued" | "running" | "succeeded" | "failed" | "cancelled";

/** States a run never leaves once written. */
export const TERMINAL: ReadonlySet<RunStatus> = new Set(["succeeded", "failed", "cancelled"]);

/** One recorded analysis. */
export interface RunRecord {
  /** UUIDv7. */
  id: string;
  kind: string;
  created_at: string;
  updated_at: string;
  status: RunStatus;
  /** 0..1 */
  progress: number;
  /** Parameters with every default filled in; inline series already replaced by their ids. */
  params: Record<string, unknown>;
  /** Ids of every input series (sorted). */
  input_series: string[];
  /** Ids of every input run (e.g. a calibrated model cited by a reconstruction), sorted. */
  input_runs: string[];
  /** Ids of every input gridded field, sorted; absent when the run has none. */
  input_fields?: string[];
  service_version: string;
  algorithm_version: string;
  seed: number | null;
  result: Record<string, unknown> | null;
  /** Hex SHA-256 of the RFC 8785 canonical JSON of `result`, or null until it exists. */
  result_digest: string | null;
  /** RFC 9457 problem body when status is failed. */
  error: Record<string, unknown> | null;
  /** Estimated seconds left while running, else null. */
  eta_seconds: number | null;
}

/** Summary row for run listings. */
export type RunSummary = Omit<RunRecord, "params" | "result" | "error">;

export interface Page<T> {
  items: T[];
  total: number;
}

export interface Store extends FieldStore {
  /** "sqlite" (file or memory) or "postgres". */
  readonly kind: string;
  /** True when the store answers a trivial query. */
  ping(): Promise<boolean>;
  /** Store a series; idempotent by id. `created` is false when the id already existed. */
  putSeries(s: StoredSeries): Promise<{ created: boolean; series: SeriesMeta }>;
  getSeries(id: string): Promise<StoredSeries | null>;
  getSeriesMeta(id: string): Promise<SeriesMeta | null>;
  /** Newest first. */
  listSeries(q: { quantity?: string; limit: number; offset: number }): Promise<Page<SeriesMeta>>;
  /** Atomic: refuses with "in_use" when any run lists the series as input. */
  deleteSeries(id: string): Promise<"deleted" | "not_found" | "in_use">;
  /** Insert a new run. */
  putRun(r: RunRecord): Promise<void>;
  /**
   * Update fields of an existing queued or running run (status, progress, result, digest,
   * error, eta). Throws `TerminalRunError` for a finished run: terminal states never change.
   */
  updateRun(
    id: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<void>;
  getRun(id: string): Promise<RunRecord | null>;
  /** Newest first. */
  listRuns(q: { kind?: string; status?: RunStatus; limit: number; offset: number }): Promise<
    Page<RunSummary>
  >;
  /** Ids of runs that use the series as input. */
  runsUsingSeries(id: string): Promise<string[]>;
  /**
   * Take the lease of a run for `holder` (a worker's id) for `leaseSeconds`: a queued run, or a
   * running run whose lease expired (its holder died). Sets it running. Returns the run, or
   * null when it is not claimable (another holder has it, it ended, it does not exist).
   */
  claimRun(id: string, holder: string, leaseSeconds: number): Promise<RunRecord | null>;
  /** Extend a lease `holder` still holds; false when it was lost or the run ended. */
  renewLease(id: string, holder: string, leaseSeconds: number): Promise<boolean>;
  /**
   * Write a patch only while `holder` holds the lease of the running run (a terminal patch
   * releases it). False when nothing was written: a recovered or duplicated job can never
   * overwrite a newer state, and a job that completes twice writes once.
   */
  updateLeased(
    id: string,
    holder: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<boolean>;
  /**
   * Cancel a queued or running run; a finished run keeps its state. Answers the status after
   * and whether this call changed it, or null when no run has the id.
   */
  cancelRun(id: string): Promise<{ status: RunStatus; changed: boolean } | null>;
  /**
   * Fail runs nobody will finish. `all`: every queued and running run (the embedded service
   * at start-up: its queue and workers died with the previous process). Otherwise only the
   * running runs whose lease expired more than `graceSeconds` ago (default 0) and that no
   * worker took over. Returns how many.
   */
  failOrphaned(reason: string, opts: { all: boolean; graceSeconds?: number }): Promise<number>;
  close(): Promise<void>;
}
