/**
 * The storage interface. Routes and workers talk only to `Store`; adapters (the embedded
 * SQLite one now, PostgreSQL later) implement it and must pass the shared suite in
 * `test/api/store/store_suite.ts`. Every method is async so a networked adapter fits.
 *
 * @module
 */
import type { FieldStore } from "./field_types.ts";

export type * from "./field_types.ts";

/** Who may see a held item: its owner (and admins), the owner's group, or everyone. */
export type Visibility = "private" | "group" | "public";

/** What an owner may do: read what is shared with them; also write; also administer. */
export type Role = "reader" | "writer" | "admin";

/** The built-in owner of the single-user tool (and of everything stored before owners). */
export const LOCAL_OWNER = "local";

/** Visibilities from narrowest to widest. */
export const VISIBILITIES: readonly Visibility[] = ["private", "group", "public"];

/**
 * Who is asking, for the reads and writes that depend on it. `owner` null is an anonymous
 * caller (sees public items only); `admin` sees everything.
 */
export interface Viewer {
  owner: string | null;
  group: string | null;
  admin: boolean;
}

/** One owner's claim on a series or run: who holds it, who may see it, since when. */
/** An item whose holding is asked for: a run or a series, by id. */
export interface HoldingRef {
  kind: "run" | "series";
  id: string;
}

export interface Holding {
  owner: string;
  visibility: Visibility;
  /** ISO 8601 UTC time this owner first stored it. */
  created_at: string;
}

/** The holder and visibility a write records. */
export interface HolderSpec {
  owner: string;
  visibility: Visibility;
}

/** An account: series, runs and keys belong to it. */
export interface OwnerRecord {
  /** Short stable name, `[a-z0-9][a-z0-9_-]{0,62}`. */
  id: string;
  /** Display name. */
  name: string;
  role: Role;
  /** Items with visibility "group" are seen by every owner of the same group. */
  group: string;
  created_at: string;
}

/** An API key as stored: never the key itself, only the SHA-256 of its secret part. */
export interface ApiKeyRecord {
  /** Public key id (the part of the key before its secret). */
  id: string;
  owner: string;
  /** Hex SHA-256 of the secret part of the key. */
  hash: string;
  label: string | null;
  /** Narrows the owner's role for this key (never widens it); null = the owner's role. */
  role: Role | null;
  created_at: string;
  /** ISO 8601 UTC; null = never expires. */
  expires_at: string | null;
  /** ISO 8601 UTC; null = valid. */
  revoked_at: string | null;
}

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
  /**
   * ISO 8601 UTC time the series was first stored (not part of the content id); in an
   * answer for a viewer, the time the holding that viewer sees was made.
   */
  created_at: string;
  /** The holding a viewer sees it through (listings and holder-aware writes only). */
  owner?: string;
  visibility?: Visibility;
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

/** Summary row for run listings (with the holding a viewer sees, when listed for one). */
export type RunSummary = Omit<RunRecord, "params" | "result" | "error"> & {
  owner?: string;
  visibility?: Visibility;
};

/** How an owner's series is used by runs: its own runs (ids), and others' runs (a count). */
export interface SeriesUsage {
  own: string[];
  others: number;
}

export interface Page<T> {
  items: T[];
  total: number;
}

export interface Store extends FieldStore {
  /** "sqlite" (file or memory) or "postgres". */
  readonly kind: string;
  /** True when the store answers a trivial query. */
  ping(): Promise<boolean>;
  /**
   * Store a series held by `holder` (default: the local owner, private); idempotent by id and
   * holder. The content is kept once whoever uploads it; `created` is true when this holder's
   * holding is new (so it never tells one owner that another holds the same content), and the
   * returned metadata carries this holder's `created_at`, `owner` and `visibility`.
   */
  putSeries(
    s: StoredSeries,
    holder?: HolderSpec,
  ): Promise<{ created: boolean; series: SeriesMeta }>;
  getSeries(id: string): Promise<StoredSeries | null>;
  getSeriesMeta(id: string): Promise<SeriesMeta | null>;
  /**
   * Newest first. With a viewer, only series it may see, each once, through the holding it
   * sees (its own first, then the widest); without, every series (internal use).
   */
  listSeries(
    q: { quantity?: string; limit: number; offset: number; viewer?: Viewer },
  ): Promise<Page<SeriesMeta>>;
  /** The holding through which `viewer` sees the series (its own first), or null. */
  seriesHolding(id: string, viewer: Viewer): Promise<Holding | null>;
  /** Change the visibility of `owner`'s holding; false when it holds none. */
  setSeriesVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean>;
  /** Runs using the series: those `owner` holds (ids), and how many others. */
  seriesUsage(id: string, owner: string): Promise<SeriesUsage>;
  /**
   * Remove `owner`'s holding. Refused with "in_use" while a run `owner` holds uses the
   * series, or when it is the last holding and any run uses the series. The content goes
   * with the last holding.
   */
  deleteSeriesHolding(id: string, owner: string): Promise<"deleted" | "not_found" | "in_use">;
  /** Atomic: refuses with "in_use" when any run lists the series as input. Every holding goes. */
  deleteSeries(id: string): Promise<"deleted" | "not_found" | "in_use">;
  /** Insert a new run held by `holder` (default: the local owner, private). */
  putRun(r: RunRecord, holder?: HolderSpec): Promise<void>;
  /** Add a holding of an existing run (a verified bundle imported again); true when new. */
  addRunHolding(id: string, holder: HolderSpec): Promise<boolean>;
  /**
   * Update fields of an existing queued or running run (status, progress, result, digest,
   * error, eta). Throws `TerminalRunError` for a finished run: terminal states never change.
   */
  updateRun(
    id: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<void>;
  getRun(id: string): Promise<RunRecord | null>;
  /** The holding through which `viewer` sees the run (its own first), or null. */
  runHolding(id: string, viewer: Viewer): Promise<Holding | null>;
  /**
   * The holdings through which `viewer` sees several items, in order (null where it sees
   * none), answered as one access check: what `runHolding`/`seriesHolding` answer one by one.
   * Optional: callers fall back to one check per item (see `api/auth/access.ts`).
   */
  holdings?(items: readonly HoldingRef[], viewer: Viewer): Promise<(Holding | null)[]>;
  /**
   * What `holdings` answers, at once, where the store can answer without waiting (an embedded
   * database); it throws where `holdings` would reject. Optional.
   */
  holdingsNow?(items: readonly HoldingRef[], viewer: Viewer): (Holding | null)[];
  /** Change the visibility of `owner`'s holding of a run; false when it holds none. */
  setRunVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean>;
  /** Newest first; with a viewer, only the runs it may see. */
  listRuns(
    q: { kind?: string; status?: RunStatus; limit: number; offset: number; viewer?: Viewer },
  ): Promise<Page<RunSummary>>;
  /** Ids of runs that use the series as input (with a viewer: only those it may see). */
  runsUsingSeries(id: string, viewer?: Viewer): Promise<string[]>;
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
  /** Add an owner. @throws {DuplicateOwnerError} when the id is taken. */
  putOwner(o: OwnerRecord): Promise<void>;
  getOwner(id: string): Promise<OwnerRecord | null>;
  /** Oldest first. */
  listOwners(): Promise<OwnerRecord[]>;
  /** Add a key. @throws {RangeError} when its owner does not exist or its id is taken. */
  putApiKey(k: ApiKeyRecord): Promise<void>;
  getApiKey(id: string): Promise<ApiKeyRecord | null>;
  /** Oldest first; of one owner when given. */
  listApiKeys(owner?: string): Promise<ApiKeyRecord[]>;
  /** Mark a key revoked at `at` (kept for the record); false when unknown or already revoked. */
  revokeApiKey(id: string, at: string): Promise<boolean>;
  /**
   * Bytes an owner's holdings take, for the storage quota: 24 bytes per point of every series
   * it holds (time, value, uncertainty) plus the JSON text of the parameters and results of
   * every run it holds. Content held by two owners counts for each.
   */
  storedBytes(owner: string): Promise<number>;
  close(): Promise<void>;
}
