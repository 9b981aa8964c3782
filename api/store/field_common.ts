/**
 * What both adapters share for stored fields: the schema step that adds them (one
 * self-contained migration per adapter, so its version number is the only thing to change when
 * other steps land first), the metadata columns and their conversions, float32 blobs, and the
 * checks on what is stored.
 *
 * @module
 */
import type { FieldDescription, FieldInfo, FieldMeta, FieldStaging } from "./field_types.ts";
import type { Resolution, Visibility } from "./types.ts";
import { bytesLEToFloat64, float64ToBytesLE } from "./float64_blob.ts";

/**
 * Name of the schema step (recorded in schema_migrations). It needs the owners table of the
 * tenancy step, so it comes after it.
 */
export const FIELD_MIGRATION_NAME = "gridded fields, their blocks, holdings and run inputs";

/** The SQLite schema step. Blocks hang off the field's row number, so commit can rename it. */
export const SQLITE_FIELD_SQL = `
  CREATE TABLE fields (
    seq INTEGER PRIMARY KEY AUTOINCREMENT,
    id TEXT NOT NULL UNIQUE,
    state TEXT NOT NULL CHECK (state IN ('staging', 'ready')),
    name TEXT NOT NULL,
    variable TEXT NOT NULL,
    quantity TEXT NOT NULL,
    units TEXT NOT NULL,
    description TEXT,
    source TEXT,
    resolution TEXT NOT NULL CHECK (resolution IN ('daily', 'monthly', 'annual', 'irregular')),
    n_time INTEGER NOT NULL CHECK (n_time >= 1),
    n_lat INTEGER NOT NULL CHECK (n_lat >= 1),
    n_lon INTEGER NOT NULL CHECK (n_lon >= 1),
    start_time REAL NOT NULL,
    end_time REAL NOT NULL,
    block_rows INTEGER NOT NULL CHECK (block_rows >= 1),
    missing INTEGER NOT NULL,
    info TEXT NOT NULL,
    time BLOB NOT NULL,
    lat BLOB NOT NULL,
    lon BLOB NOT NULL,
    lat_bounds BLOB,
    lon_bounds BLOB,
    created_at TEXT NOT NULL
  );
  CREATE INDEX fields_newest ON fields (state, created_at DESC, seq DESC);

  CREATE TABLE field_blocks (
    field_seq INTEGER NOT NULL REFERENCES fields (seq) ON DELETE CASCADE,
    block INTEGER NOT NULL,
    t_start INTEGER NOT NULL,
    rows INTEGER NOT NULL,
    data BLOB NOT NULL,
    UNIQUE (field_seq, block)
  );

  CREATE TABLE field_holdings (
    seq INTEGER PRIMARY KEY AUTOINCREMENT,
    field_id TEXT NOT NULL REFERENCES fields (id) ON DELETE CASCADE,
    owner_id TEXT NOT NULL REFERENCES owners (id),
    visibility TEXT NOT NULL CHECK (visibility IN ('private', 'group', 'public')),
    created_at TEXT NOT NULL,
    UNIQUE (field_id, owner_id)
  );
  CREATE INDEX field_holdings_by_owner ON field_holdings (owner_id);

  CREATE TABLE run_input_fields (
    run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    position INTEGER NOT NULL,
    field_id TEXT NOT NULL REFERENCES fields (id),
    PRIMARY KEY (run_id, position)
  ) WITHOUT ROWID;
  CREATE INDEX run_input_fields_by_field ON run_input_fields (field_id);
`;

/** The PostgreSQL schema step (same tables; blocks stored out of line, uncompressed). */
export const POSTGRES_FIELD_SQL = `
  CREATE TABLE fields (
    seq BIGSERIAL PRIMARY KEY,
    id TEXT NOT NULL UNIQUE,
    state TEXT NOT NULL CHECK (state IN ('staging', 'ready')),
    name TEXT NOT NULL,
    variable TEXT NOT NULL,
    quantity TEXT NOT NULL,
    units TEXT NOT NULL,
    description TEXT,
    source TEXT,
    resolution TEXT NOT NULL CHECK (resolution IN ('daily', 'monthly', 'annual', 'irregular')),
    n_time INTEGER NOT NULL CHECK (n_time >= 1),
    n_lat INTEGER NOT NULL CHECK (n_lat >= 1),
    n_lon INTEGER NOT NULL CHECK (n_lon >= 1),
    start_time DOUBLE PRECISION NOT NULL,
    end_time DOUBLE PRECISION NOT NULL,
    block_rows INTEGER NOT NULL CHECK (block_rows >= 1),
    missing BIGINT NOT NULL,
    info TEXT NOT NULL,
    time BYTEA NOT NULL,
    lat BYTEA NOT NULL,
    lon BYTEA NOT NULL,
    lat_bounds BYTEA,
    lon_bounds BYTEA,
    created_at TEXT NOT NULL
  );
  CREATE INDEX fields_newest ON fields (state, created_at DESC, seq DESC);

  CREATE TABLE field_blocks (
    field_seq BIGINT NOT NULL REFERENCES fields (seq) ON DELETE CASCADE,
    block INTEGER NOT NULL,
    t_start INTEGER NOT NULL,
    rows INTEGER NOT NULL,
    data BYTEA NOT NULL,
    UNIQUE (field_seq, block)
  );
  ALTER TABLE field_blocks ALTER COLUMN data SET STORAGE EXTERNAL;

  CREATE TABLE field_holdings (
    seq BIGSERIAL PRIMARY KEY,
    field_id TEXT NOT NULL REFERENCES fields (id) ON DELETE CASCADE,
    owner_id TEXT NOT NULL REFERENCES owners (id),
    visibility TEXT NOT NULL CHECK (visibility IN ('private', 'group', 'public')),
    created_at TEXT NOT NULL,
    UNIQUE (field_id, owner_id)
  );
  CREATE INDEX field_holdings_by_owner ON field_holdings (owner_id);

  CREATE TABLE run_input_fields (
    run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
    position INTEGER NOT NULL,
    field_id TEXT NOT NULL REFERENCES fields (id),
    PRIMARY KEY (run_id, position)
  );
  CREATE INDEX run_input_fields_by_field ON run_input_fields (field_id);
`;

/** Metadata columns of `fields` read by listings, in table order. */
export const FIELD_META_COLUMNS = [
  "id",
  "name",
  "variable",
  "quantity",
  "units",
  "description",
  "source",
  "resolution",
  "n_time",
  "n_lat",
  "n_lon",
  "start_time",
  "end_time",
  "block_rows",
  "missing",
  "info",
  "created_at",
] as const;

/** Coordinate columns, read by `getField` only. */
export const FIELD_COORD_COLUMNS = ["time", "lat", "lon", "lat_bounds", "lon_bounds"] as const;

const LITTLE_ENDIAN = new Uint8Array(new Float32Array([1]).buffer)[3] === 0x3f;

/**
 * Float32 values as little-endian bytes. On a little-endian machine the bytes are a view of the
 * same memory, not a copy: use them before the values change (the stores bind or encode them at
 * once, the upload hashes them).
 *
 * @example
 * ```ts
 * import { bytesLEToFloat32, float32ToBytesLE } from "./field_common.ts";
 * import assert from "node:assert/strict";
 * const v = Float32Array.of(1.5, NaN, -2);
 * assert.deepEqual(Array.from(bytesLEToFloat32(float32ToBytesLE(v))), [1.5, NaN, -2]);
 * ```
 */
export function float32ToBytesLE(values: Float32Array): Uint8Array {
  if (LITTLE_ENDIAN) {
    // a copy here cost 0.1 s of a 150 MB upload's main thread
    return new Uint8Array(values.buffer, values.byteOffset, values.byteLength);
  }
  const out = new Uint8Array(values.length * 4);
  const view = new DataView(out.buffer);
  for (let i = 0; i < values.length; i++) view.setFloat32(i * 4, values[i], true);
  return out;
}

/**
 * Little-endian float32 bytes as a Float32Array (a copy).
 *
 * @throws {RangeError} when the length is not a multiple of 4 or not `expected` values
 */
export function bytesLEToFloat32(bytes: Uint8Array, expected?: number): Float32Array {
  if (bytes.byteLength % 4 !== 0 || (expected !== undefined && bytes.byteLength !== 4 * expected)) {
    throw new RangeError(
      `Cannot decode field block: ${bytes.byteLength} bytes${
        expected !== undefined ? `, expected ${4 * expected}` : ""
      }`,
    );
  }
  if (LITTLE_ENDIAN) return new Float32Array(new Uint8Array(bytes).buffer);
  const out = new Float32Array(bytes.byteLength / 4);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat32(i * 4, true);
  return out;
}

/** The coordinate blobs of a staged field, in {@link FIELD_COORD_COLUMNS} order. */
export function coordinateBlobs(f: FieldStaging): (Uint8Array | null)[] {
  return [
    float64ToBytesLE(f.time),
    float64ToBytesLE(f.lat),
    float64ToBytesLE(f.lon),
    f.lat_bounds ? float64ToBytesLE(f.lat_bounds) : null,
    f.lon_bounds ? float64ToBytesLE(f.lon_bounds) : null,
  ];
}

/** The metadata column values of a staged field (id and created_at given), table order. */
export function fieldMetaValues(
  id: string,
  f: FieldStaging,
): (string | number | null)[] {
  return [
    id,
    f.name,
    f.variable,
    f.quantity,
    f.units,
    f.description,
    f.source,
    f.resolution,
    f.n_time,
    f.n_lat,
    f.n_lon,
    f.start,
    f.end,
    f.block_rows,
    f.missing,
    JSON.stringify(f.info),
    f.created_at,
  ];
}

/** A plain metadata record from a row joined with its holding (`owner_id`, `visibility`). */
export function toFieldMeta(r: Record<string, unknown>): FieldMeta {
  const s = (v: unknown) => (v === null || v === undefined ? null : String(v));
  return {
    id: String(r.id),
    name: String(r.name),
    variable: String(r.variable),
    quantity: String(r.quantity),
    units: String(r.units),
    description: s(r.description),
    source: s(r.source),
    resolution: String(r.resolution) as Resolution,
    n_time: Number(r.n_time),
    n_lat: Number(r.n_lat),
    n_lon: Number(r.n_lon),
    start: Number(r.start_time),
    end: Number(r.end_time),
    block_rows: Number(r.block_rows),
    missing: Number(r.missing),
    info: JSON.parse(String(r.info)) as FieldInfo,
    created_at: String(r.created_at),
    owner: String(r.owner_id ?? "local"),
    visibility: String(r.visibility ?? "private") as Visibility,
  };
}

/** A description from a metadata row and its coordinate blobs (as driver bytes). */
export function toFieldDescription(
  r: Record<string, unknown>,
  blob: (name: (typeof FIELD_COORD_COLUMNS)[number]) => Uint8Array | null,
): FieldDescription {
  const meta = toFieldMeta(r);
  const f64 = (name: (typeof FIELD_COORD_COLUMNS)[number], n: number) => {
    const b = blob(name);
    return b === null ? null : bytesLEToFloat64(b, n);
  };
  return {
    ...meta,
    time: f64("time", meta.n_time)!,
    lat: f64("lat", meta.n_lat)!,
    lon: f64("lon", meta.n_lon)!,
    lat_bounds: f64("lat_bounds", 2 * meta.n_lat),
    lon_bounds: f64("lon_bounds", 2 * meta.n_lon),
  };
}

/**
 * Check a staged field before it is written.
 *
 * @throws {RangeError} naming what disagrees
 */
export function checkFieldStaging(f: FieldStaging): void {
  const bad = (what: string) => {
    throw new RangeError(`Cannot store field "${f.name}": ${what}`);
  };
  if (f.time.length !== f.n_time) bad(`time has ${f.time.length} values, n_time is ${f.n_time}`);
  if (f.lat.length !== f.n_lat) bad(`lat has ${f.lat.length} values, n_lat is ${f.n_lat}`);
  if (f.lon.length !== f.n_lon) bad(`lon has ${f.lon.length} values, n_lon is ${f.n_lon}`);
  if (f.lat_bounds && f.lat_bounds.length !== 2 * f.n_lat) bad("lat_bounds has the wrong length");
  if (f.lon_bounds && f.lon_bounds.length !== 2 * f.n_lon) bad("lon_bounds has the wrong length");
  if (!Number.isInteger(f.block_rows) || f.block_rows < 1) bad("block_rows must be ≥ 1");
}

/**
 * Check one block against its staged field.
 *
 * @throws {RangeError} when the block is not the `index`-th block of `block_rows` steps
 */
export function checkFieldBlock(
  meta: { n_time: number; n_lat: number; n_lon: number; block_rows: number },
  index: number,
  tStart: number,
  rows: number,
  values: Float32Array,
): void {
  const per = meta.n_lat * meta.n_lon;
  const expectRows = Math.min(meta.block_rows, meta.n_time - index * meta.block_rows);
  if (
    !Number.isInteger(index) || index < 0 || tStart !== index * meta.block_rows ||
    rows !== expectRows || rows < 1 || values.length !== rows * per
  ) {
    throw new RangeError(
      `Cannot store field block ${index}: expected steps ${
        index * meta.block_rows
      }.. (${expectRows} rows of ${per} values), got ${tStart}.. (${rows} rows, ${values.length} values)`,
    );
  }
}

/** Number of blocks of a field. */
export function blockCount(meta: { n_time: number; block_rows: number }): number {
  return Math.ceil(meta.n_time / meta.block_rows);
}

/**
 * Copy the overlap of stored blocks into time steps [tStart, tEnd) of a field.
 *
 * @param blocks blocks in time order, each with its first step and values
 * @param per values per time step
 * @param tStart first step wanted
 * @param tEnd one past the last
 * @returns (tEnd − tStart) × per values
 */
export function assembleSteps(
  blocks: { t_start: number; rows: number; values: Float32Array }[],
  per: number,
  tStart: number,
  tEnd: number,
): Float32Array {
  const out = new Float32Array((tEnd - tStart) * per);
  for (const b of blocks) copyBlockSteps(out, b, per, tStart, tEnd);
  return out;
}

/** Copy the steps of one block that fall in [tStart, tEnd) into `out` (which starts at tStart). */
export function copyBlockSteps(
  out: Float32Array,
  b: { t_start: number; rows: number; values: Float32Array },
  per: number,
  tStart: number,
  tEnd: number,
): void {
  const a = Math.max(tStart, b.t_start), e = Math.min(tEnd, b.t_start + b.rows);
  if (e <= a) return;
  out.set(b.values.subarray((a - b.t_start) * per, (e - b.t_start) * per), (a - tStart) * per);
}

/** @throws {RangeError} when [tStart, tEnd) is not a non-empty range of the field's steps. */
export function checkStepRange(id: string, nTime: number, tStart: number, tEnd: number): void {
  if (
    !(Number.isInteger(tStart) && Number.isInteger(tEnd) && 0 <= tStart && tStart < tEnd &&
      tEnd <= nTime)
  ) {
    throw new RangeError(
      `Cannot read field ${id}: time steps ${tStart}..${tEnd} are not within 0..${nTime}`,
    );
  }
}

/** Encode coordinates the PostgreSQL adapter sends as base64 (null stays null). */
export function base64OrNull(b: Uint8Array | null): string | null {
  if (b === null) return null;
  let s = "";
  const CH = 0x8000;
  for (let i = 0; i < b.length; i += CH) s += String.fromCharCode(...b.subarray(i, i + CH));
  return btoa(s);
}

/** Every value of a FieldDescription that is not a typed array (for JSON answers). */
export function fieldMetaOf(d: FieldDescription | FieldMeta): FieldMeta {
  const { id, name, variable, quantity, units, description, source, resolution } = d;
  return {
    id,
    name,
    variable,
    quantity,
    units,
    description,
    source,
    resolution,
    n_time: d.n_time,
    n_lat: d.n_lat,
    n_lon: d.n_lon,
    start: d.start,
    end: d.end,
    block_rows: d.block_rows,
    missing: d.missing,
    info: d.info,
    created_at: d.created_at,
    owner: d.owner,
    visibility: d.visibility,
  };
}
