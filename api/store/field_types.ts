/**
 * Stored gridded fields: the part of the storage interface that holds (time, lat, lon) fields
 * as immutable, content-addressed inputs, their values in blocks of time steps (so an analysis
 * reads only the time steps it needs), and the links from runs to the fields they used.
 *
 * A field is written in stages, so a 200 MB upload is never held in memory: `beginField`
 * records the metadata under a staging number, `putFieldBlock` adds one block of time steps at
 * a time (each its own short transaction), and `commitField` gives the field its content id
 * (or, when a field with that id is already stored, drops the staged copy). A staged field is
 * invisible to every read; `abortField` and `dropStagedFields` remove what an interrupted
 * upload left.
 *
 * @module
 */
import type { HolderSpec, Holding, Page, Resolution, Viewer, Visibility } from "./types.ts";

/** The form of a field id: `field:sha256:` and 64 lower-case hex digits. */
export const FIELD_ID_PATTERN = /^field:sha256:[0-9a-f]{64}$/;

/** What the CF layer decoded about the time axis and the variable (kept as JSON). */
export interface FieldInfo {
  /** NetCDF format of the upload: "netcdf3-classic", "netcdf3-64bit-offset", "netcdf4". */
  format: string;
  /** CF calendar of the file's time axis (e.g. "noleap"). */
  calendar: string;
  /** The file's time `units` attribute, e.g. "days since 1850-01-01". */
  time_units: string;
  /** How the file's times were placed on sunlag's proleptic Gregorian axis. */
  time_placement: string;
  standard_name: string | null;
  long_name: string | null;
  /** Smallest and largest finite value, field units (null when every value is missing). */
  min: number | null;
  max: number | null;
}

/** Metadata of a stored field (everything but the values). */
export interface FieldMeta {
  /** `field:sha256:` + hex SHA-256 of the decoded content (see api/fields/content_id.ts). */
  id: string;
  name: string;
  /** Variable name in the uploaded file. */
  variable: string;
  quantity: string;
  units: string;
  description: string | null;
  source: string | null;
  resolution: Resolution;
  n_time: number;
  n_lat: number;
  n_lon: number;
  /** First and last time, decimal years (proleptic Gregorian). */
  start: number;
  end: number;
  /** Time steps per stored block. */
  block_rows: number;
  /** Number of missing values (NaN) in the whole field. */
  missing: number;
  info: FieldInfo;
  /** When the holding shown was made (the viewer's own first, then the widest). */
  created_at: string;
  owner: string;
  visibility: Visibility;
}

/** A field's metadata with its coordinates. */
export interface FieldDescription extends FieldMeta {
  /** Decimal year of each time step. */
  time: Float64Array;
  /** Cell centres, degrees north and east, strictly monotonic. */
  lat: Float64Array;
  lon: Float64Array;
  /** Cell edges `[a₀, b₀, a₁, b₁, …]` when the file gave them. */
  lat_bounds: Float64Array | null;
  lon_bounds: Float64Array | null;
}

/** What is known of a field only once its values are read. */
export interface FieldFinal {
  missing: number;
  info: FieldInfo;
}

/** What `beginField` records (the id comes at commit). */
export type FieldStaging = Omit<FieldDescription, "id" | "owner" | "visibility">;

/** The stored field interface (part of `Store`). */
export interface FieldStore {
  /** Record a field's metadata under a new staging number (invisible until committed). */
  beginField(f: FieldStaging): Promise<number>;
  /**
   * Add block `index` (time steps `tStart .. tStart + rows`) of a staged field: `values` holds
   * rows × n_lat × n_lon float32, NaN where missing.
   */
  putFieldBlock(
    stage: number,
    index: number,
    tStart: number,
    rows: number,
    values: Float32Array,
  ): Promise<void>;
  /**
   * Make a staged field visible under its content id, with what reading its values found
   * (`final`: the count of missing values and the info with the value range), held by
   * `holder` (default the local owner, private). When that id is already stored, the staged
   * copy is dropped; `created` is true when this holder's holding is new (as for series, it
   * never tells one owner that another holds the same content).
   * @throws {RangeError} when the staged blocks do not cover every time step
   */
  commitField(
    stage: number,
    id: string,
    final?: FieldFinal,
    holder?: HolderSpec,
  ): Promise<{ created: boolean; field: FieldMeta }>;
  /** Remove a staged field (an upload that failed). */
  abortField(stage: number): Promise<void>;
  /** Remove staged fields older than `olderThanSeconds` (uploads a crash interrupted). */
  dropStagedFields(olderThanSeconds: number): Promise<number>;
  /**
   * A stored field's metadata and coordinates, or null; with a viewer, null unless it may see
   * the field, and the holding shown is the one it sees.
   */
  getField(id: string, viewer?: Viewer): Promise<FieldDescription | null>;
  /** Newest first; with a viewer, only the fields it may see, each once. */
  listFields(q: { limit: number; offset: number; viewer?: Viewer }): Promise<Page<FieldMeta>>;
  /** The holding through which `viewer` sees the field (its own first), or null. */
  fieldHolding(id: string, viewer: Viewer): Promise<Holding | null>;
  /** Change the visibility of `owner`'s holding of a field; false when it holds none. */
  setFieldVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean>;
  /**
   * Remove `owner`'s holding, with the rule of series: refused with "in_use" while a run
   * `owner` holds uses the field, or when it is the last holding and any run uses it. The
   * content goes with the last holding.
   */
  deleteFieldHolding(id: string, owner: string): Promise<"deleted" | "not_found" | "in_use">;
  /**
   * Time steps `[tStart, tEnd)` of a field, time-major (row t holds n_lat × n_lon values,
   * latitude-major), NaN where missing. Reads only the blocks that overlap.
   * @throws {RangeError} when the range is outside the field
   */
  readFieldSteps(id: string, tStart: number, tEnd: number): Promise<Float32Array>;
  /** The series of one cell (index i · n_lon + j), n_time values, NaN where missing. */
  readFieldCell(id: string, cell: number): Promise<Float32Array>;
  /** Atomic: refused with "in_use" while any run lists the field as input. Every holding goes. */
  deleteField(id: string): Promise<"deleted" | "not_found" | "in_use">;
  /** Ids of runs that use the field as input, newest first. */
  runsUsingField(id: string): Promise<string[]>;
}

/** Page of fields (re-exported for adapters). */
export type FieldPage = Page<FieldMeta>;
