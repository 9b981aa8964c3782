/**
 * Storing a gridded field from a NetCDF-CF file: the (time, lat, lon) variable is described
 * and decoded by the CF layer (api/netcdf: time on its calendar, coordinates checked,
 * `_FillValue`/`missing_value` masked before `scale_factor`/`add_offset`), then read one block
 * of time steps at a time: each block is hashed into the content id and written to the store
 * as it comes, so neither the file nor the whole field is ever in memory. The field becomes
 * visible only when every block is stored (a failed upload leaves nothing).
 *
 * Content id: `field:sha256:` + SHA-256 of the RFC 8785 canonical JSON of the metadata and
 * coordinates (see {@link fieldHeader}), a newline, then every value as little-endian float32
 * in time-major, latitude-major order with NaN written as the canonical quiet NaN. The same
 * field uploaded again (as NetCDF-3 or NetCDF-4) gets the same id.
 *
 * @module
 */
import { createHash } from "node:crypto";
import { z } from "@hono/zod-openapi";
import { attributeText } from "../../core/cf/netcdf_model.ts";
import { inferResolution } from "../../core/time/mod.ts";
import { QUANTITIES } from "../../core/series/quantities.ts";
import { canonicalJson } from "../canonical.ts";
import { ProblemError } from "../problems.ts";
import type { FieldMeta, FieldStaging, HolderSpec, Store } from "../store/types.ts";
import { float32ToBytesLE } from "../store/field_common.ts";
import { describePlacement } from "../netcdf/cf_time_axis.ts";
import { type CfGrid, describeCfGrid, readCfGridBlocks } from "../netcdf/cf_grid.ts";
import { listCfVariables } from "../netcdf/cf_variables.ts";
import { NetcdfError } from "../netcdf/errors.ts";
import type { NetcdfSource } from "../netcdf/source.ts";

/** Values per stored block (4 MiB of float32): an analysis reads only the blocks it needs. */
export const BLOCK_VALUES = 1 << 20;

/** Query of `POST /v1/fields`. */
export const FieldUploadQuery = z.object({
  variable: z.string().min(1).max(200).optional().openapi({
    description: "The (time, latitude, longitude) variable to store. Default: the only such " +
      "variable in the file",
    example: "tas",
  }),
  name: z.string().min(1).max(200).optional().openapi({
    description: "Display name (default: the variable's long_name, else its name)",
  }),
  quantity: z.enum(QUANTITIES).optional().openapi({
    description: "What the field measures (default: from the standard name: air, surface and " +
      "sea-surface temperature → temperature, or temperature_anomaly when the name says " +
      "anomaly; otherwise other)",
  }),
  units: z.string().min(1).max(60).optional().openapi({
    description: "UDUNITS units of the values (default: the variable's units attribute; " +
      "required when it has none)",
  }),
  description: z.string().max(4000).optional(),
  source: z.string().max(2000).optional(),
}).strict();

export type FieldUploadParams = z.output<typeof FieldUploadQuery>;

/** What an upload reports besides the stored field. */
export interface FieldUploadReport {
  format: string;
  variable: string;
  calendar: string;
  time_units: string;
  time_placement: string;
  /** Missing values (masked, NaN) and their share of all values. */
  missing_values: number;
  missing_fraction: number;
  bytes_read: number;
}

/** (time, lat, lon) variables of a file: data variables with three non-trivial dimensions. */
export function gridCandidates(src: NetcdfSource): string[] {
  return listCfVariables(src.header)
    .filter((v) =>
      v.role === "data" && v.time_dimension !== null && v.dimensions[0] === v.time_dimension &&
      v.shape.slice(1).filter((n) => n !== 1).length === 2
    )
    .map((v) => v.name);
}

const TEMPERATURE_NAMES = new Set([
  "air_temperature",
  "surface_temperature",
  "sea_surface_temperature",
  "air_temperature_anomaly",
  "surface_temperature_anomaly",
]);

/** The quantity a variable's names suggest (see FieldUploadQuery). */
function guessQuantity(grid: CfGrid): string {
  const sn = attributeText(grid.attributes, "standard_name") ?? "";
  const text = `${grid.variable} ${sn} ${attributeText(grid.attributes, "long_name") ?? ""}`;
  if (TEMPERATURE_NAMES.has(sn)) return /anom/i.test(text) ? "temperature_anomaly" : "temperature";
  return "other";
}

/** The metadata and coordinates hashed before the values (content id). */
export function fieldHeader(f: FieldStaging): unknown {
  const arr = (a: Float64Array | null) => (a ? Array.from(a) : null);
  return {
    content: "sunlag gridded field, float32 little-endian, time-major, latitude-major",
    version: 1,
    name: f.name,
    variable: f.variable,
    quantity: f.quantity,
    units: f.units,
    description: f.description,
    source: f.source,
    calendar: f.info.calendar,
    shape: [f.n_time, f.n_lat, f.n_lon],
    time: arr(f.time),
    lat: arr(f.lat),
    lon: arr(f.lon),
    lat_bounds: arr(f.lat_bounds),
    lon_bounds: arr(f.lon_bounds),
  };
}

/** Check the decoded time axis (strictly increasing, at least 2 steps). */
function checkTime(grid: CfGrid): void {
  const t = grid.time.decimalYears;
  if (t.length < 2) {
    throw new NetcdfError(
      "bad_coordinate",
      `Variable "${grid.variable}" has ${t.length} time step(s); a field needs at least 2`,
      { variable: grid.variable },
    );
  }
  for (let i = 1; i < t.length; i++) {
    if (!(t[i] > t[i - 1])) {
      throw new NetcdfError(
        "bad_coordinate",
        `Time coordinate "${grid.time.dimension}" must be strictly increasing; step ${i} ` +
          `(${t[i].toFixed(4)}) does not follow step ${i - 1} (${t[i - 1].toFixed(4)})`,
        { variable: grid.time.dimension },
      );
    }
  }
}

/** Choose the variable: the one named, or the only grid in the file. */
function chooseVariable(src: NetcdfSource, named: string | undefined): string {
  if (named !== undefined) return named;
  const found = gridCandidates(src);
  if (found.length === 1) return found[0];
  throw new ProblemError(
    "validation",
    found.length === 0
      ? "The file has no (time, latitude, longitude) variable that could be a field"
      : `The file has ${found.length} gridded variables: name one with variable= (${
        found.slice(0, 20).join(", ")
      })`,
    {
      errors: [{ pointer: "/variable", in: "query", message: "required: choose one" }],
      variables: found.slice(0, 50),
    },
  );
}

/** The metadata of the field to stage (before its values are read). */
function staging(grid: CfGrid, src: NetcdfSource, q: FieldUploadParams): FieldStaging {
  const units = q.units ?? grid.units?.trim();
  if (!units) {
    throw new ProblemError(
      "validation",
      `Variable "${grid.variable}" has no units attribute: give units= (UDUNITS, e.g. K)`,
      { errors: [{ pointer: "/units", in: "query", message: "required for this file" }] },
    );
  }
  const [nt, ny, nx] = grid.shape;
  const per = ny * nx;
  const t = grid.time.decimalYears;
  return {
    name: q.name ?? attributeText(grid.attributes, "long_name") ?? grid.variable,
    variable: grid.variable,
    quantity: q.quantity ?? guessQuantity(grid),
    units,
    description: q.description ?? null,
    source: q.source ?? attributeText(src.header.attributes, "source") ?? null,
    resolution: inferResolution(t),
    n_time: nt,
    n_lat: ny,
    n_lon: nx,
    start: t[0],
    end: t[t.length - 1],
    block_rows: Math.max(1, Math.floor(BLOCK_VALUES / per)),
    missing: 0,
    info: {
      format: src.header.format,
      calendar: grid.time.calendar,
      time_units: grid.time.units,
      time_placement: describePlacement(grid.time.placement, grid.time.calendar),
      standard_name: attributeText(grid.attributes, "standard_name") ?? null,
      long_name: attributeText(grid.attributes, "long_name") ?? null,
      min: null,
      max: null,
    },
    created_at: new Date().toISOString(),
    time: Float64Array.from(t),
    lat: grid.latitude.values,
    lon: grid.longitude.values,
    lat_bounds: grid.latitude.bounds,
    lon_bounds: grid.longitude.bounds,
  };
}

/**
 * Check one block of decoded values before it is hashed and stored: every NaN is rewritten as
 * the one canonical quiet NaN (so the content id does not depend on the NaN payloads a file
 * held), missing values are counted, the finite range is taken, and an infinite value is
 * refused (CF marks missing data with `_FillValue`/`missing_value`, not with infinities).
 *
 * @param v the block's values (changed in place: NaN made canonical)
 * @param variable the variable's name (for the message)
 * @param start the block's first time step (for the message)
 * @param per values per time step
 * @returns the count of missing values and the least and greatest finite values (±Infinity
 *   when none)
 * @throws {NetcdfError} `bad_coordinate` at the first infinite value
 */
export function checkFieldValues(
  v: Float32Array,
  variable: string,
  start: number,
  per: number,
): { missing: number; min: number; max: number } {
  let missing = 0, min = Infinity, max = -Infinity;
  for (let i = 0; i < v.length; i++) {
    const x = v[i];
    if (x !== x) {
      v[i] = NaN; // one NaN bit pattern, whatever the file held
      missing++;
    } else if (!Number.isFinite(x)) {
      throw new NetcdfError(
        "bad_coordinate",
        `Variable "${variable}" holds an infinite value at time step ${
          start + Math.floor(i / per)
        }; mark missing values with _FillValue or missing_value`,
        { variable: variable },
      );
    } else {
      if (x < min) min = x;
      if (x > max) max = x;
    }
  }
  return { missing, min, max };
}

/** Let pending promise steps (and I/O callbacks) run before the caller goes on. */
function macrotask(): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, 0));
}

/**
 * Read a NetCDF file's gridded variable into the store (see the module documentation).
 *
 * @param src the open file
 * @param store where the field goes
 * @param q the upload query
 * @param options who holds the stored field, the bytes read, and the storage admission
 * @returns the stored field's metadata, whether it is new, and the upload report
 * @throws {NetcdfError} for an unreadable file or variable; {@link ProblemError} for a bad
 *   choice of variable or missing units; nothing is stored then
 */
export async function storeNetcdfField(
  src: NetcdfSource,
  store: Store,
  q: FieldUploadParams,
  options: {
    holder?: HolderSpec;
    bytesRead?: number;
    /** Called with the stored size (4 bytes a value) before any value is read: may refuse. */
    admit?: (bytes: number) => Promise<void>;
  } = {},
): Promise<{ created: boolean; field: FieldMeta; report: FieldUploadReport }> {
  const { holder, bytesRead = 0 } = options;
  const grid = await describeCfGrid(src, chooseVariable(src, q.variable));
  checkTime(grid);
  const meta = staging(grid, src, q);
  await options.admit?.(4 * meta.n_time * meta.n_lat * meta.n_lon);
  const stage = await store.beginField(meta);
  // the block being written while the next one is checked and hashed (at most one)
  let writing: Promise<void> = Promise.resolve();
  try {
    const hash = createHash("sha256");
    let missing = 0, min = Infinity, max = -Infinity, block = 0;
    // the header goes first, but its min/max and missing count are not part of it
    hash.update(canonicalJson(fieldHeader(meta)), "utf8");
    hash.update("\n", "utf8");
    // three stages at once: the next block is read (in the NetCDF-4 worker) while this one is
    // checked and hashed and the one before is written (a SQLite file store's writer worker,
    // or PostgreSQL)
    const blocks = readCfGridBlocks(src, grid, meta.block_rows);
    const ahead = () => {
      const p = blocks.next();
      p.catch(() => undefined); // awaited below; a failure after an abort is not unhandled
      return p;
    };
    let next = ahead();
    for (;;) {
      const step = await next;
      if (step.done) break;
      next = ahead();
      // The request for the next block reaches the worker through a few promise steps; the
      // store's write below is synchronous on SQLite, so let them run first or the read waits
      // for the write (measured on a 150 MB field: no read overlapped a write without it).
      await macrotask();
      const b = step.value;
      const v = b.values;
      const seen = checkFieldValues(v, grid.variable, b.start, meta.n_lat * meta.n_lon);
      missing += seen.missing;
      if (seen.min < min) min = seen.min;
      if (seen.max > max) max = seen.max;
      hash.update(float32ToBytesLE(v));
      await writing;
      writing = store.putFieldBlock(stage, block++, b.start, b.rows, v);
      writing.catch(() => undefined); // awaited above or below
    }
    await writing;
    const id = `field:sha256:${hash.digest("hex")}`;
    const info = {
      ...meta.info,
      min: Number.isFinite(min) ? min : null,
      max: Number.isFinite(max) ? max : null,
    };
    const done = await store.commitField(stage, id, { missing, info }, holder);
    const total = meta.n_time * meta.n_lat * meta.n_lon;
    return {
      ...done,
      report: {
        format: meta.info.format,
        variable: meta.variable,
        calendar: meta.info.calendar,
        time_units: meta.info.time_units,
        time_placement: meta.info.time_placement,
        missing_values: missing,
        missing_fraction: missing / total,
        bytes_read: bytesRead,
      },
    };
  } catch (e) {
    await writing.catch(() => undefined); // a block still being written is removed too
    await store.abortField(stage).catch(() => undefined);
    throw e;
  }
}
