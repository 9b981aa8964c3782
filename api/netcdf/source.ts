/**
 * An open NetCDF file, whatever its format: its header (dimensions, attributes, variables) and
 * reads of a variable's stored values, whole or a block of rows along its first dimension.
 * The NetCDF-3 reader (`netcdf3_source.ts`) and the NetCDF-4 reader (`netcdf4_source.ts`)
 * implement it; `openNetcdf` (`open.ts`) picks one by magic bytes.
 *
 * @module
 */
import type {
  NetcdfAttribute,
  NetcdfDimension,
  NetcdfVariableInfo,
} from "../../core/cf/netcdf_model.ts";
import type { NetcdfFormat } from "./detect.ts";
import { NetcdfError } from "./errors.ts";

/** Stored values as the typed array of their type (int64 types come as Float64Array). */
export type StoredValues =
  | Int8Array
  | Uint8Array
  | Int16Array
  | Uint16Array
  | Int32Array
  | Uint32Array
  | Float32Array
  | Float64Array;

/** The header of an open file. */
export interface NetcdfHeader {
  format: NetcdfFormat;
  dimensions: NetcdfDimension[];
  /** Global attributes. */
  attributes: NetcdfAttribute[];
  variables: NetcdfVariableInfo[];
}

/** An open NetCDF file. Close it when done (the temp file is the caller's). */
export interface NetcdfSource {
  readonly header: NetcdfHeader;
  /**
   * The stored values of a variable in row-major order: all of them, or `rows` rows starting
   * at row `start` of its first dimension (every other dimension whole). The array is the
   * caller's own (a fresh copy): it may be changed in place.
   */
  read(name: string, start?: number, rows?: number): Promise<StoredValues>;
  /**
   * How many reads may usefully be in flight at once (NetCDF-4: its reader workers decode
   * blocks in parallel); absent means one.
   */
  readonly concurrentReads?: number;
  close(): Promise<void>;
}

/** Largest number of values one read may return (2 GiB of float64 would not fit anyway). */
export const MAX_READ_VALUES = 200_000_000;

/**
 * The variable of a header by name.
 *
 * @param header the file's header
 * @param name the variable name
 * @param pointerName how the request names it (for the message), default "variable"
 * @returns the variable
 * @throws {NetcdfError} `unknown_variable`, listing the variables there are
 */
export function variableOf(header: NetcdfHeader, name: string): NetcdfVariableInfo {
  const v = header.variables.find((x) => x.name === name);
  if (v) return v;
  const names = header.variables.map((x) => x.name);
  throw new NetcdfError(
    "unknown_variable",
    `The file has no variable "${name.slice(0, 80)}"; it has ${
      names.length ? names.slice(0, 40).join(", ") : "no variables"
    }`,
    { variable: name },
  );
}

/**
 * Check a row block against a variable's shape and size limit; returns `[start, rows,
 * valuesPerRow]`.
 */
export function rowBlock(
  v: NetcdfVariableInfo,
  start = 0,
  rows?: number,
): [number, number, number] {
  const total = v.shape.length ? v.shape[0] : 1;
  const per = v.shape.slice(1).reduce((a, b) => a * b, 1);
  const n = rows ?? total - start;
  if (!Number.isInteger(start) || !Number.isInteger(n) || start < 0 || n < 0 || start + n > total) {
    throw new RangeError(
      `Cannot read rows ${start}..${start + n} of "${v.name}": it has ${total} rows`,
    );
  }
  if (n * per > MAX_READ_VALUES) {
    throw new NetcdfError(
      "too_large",
      `Reading "${shownName(v.name)}" would return ${
        n * per
      } values, over the limit of ${MAX_READ_VALUES}; read it in blocks`,
      { variable: v.name },
    );
  }
  return [start, n, per];
}

function shownName(s: string): string {
  return s.length > 60 ? `${s.slice(0, 60)}…` : s;
}
