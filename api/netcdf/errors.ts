/**
 * The error of the NetCDF file layer: what is wrong with a file, as data. Routes map it to an
 * RFC 9457 problem (415 for what is not a NetCDF file we read, 422 for a damaged or unusable
 * one); the message never carries a library's own diagnostics.
 *
 * @module
 */

/** What is wrong with a file or a request about it. */
export type NetcdfErrorCode =
  /** Not a NetCDF file at all (magic bytes). */
  | "not_netcdf"
  /** A NetCDF variant sunlag does not read (CDF-5). */
  | "unsupported_format"
  /** The file ends before the data its header announces. */
  | "truncated"
  /** The header or the HDF5 structure cannot be parsed. */
  | "corrupt"
  /** Reading took longer than allowed (a damaged HDF5 file can loop). */
  | "timeout"
  /** A variable the request names is not in the file. */
  | "unknown_variable"
  /** The variable has no time dimension, or not the dimensions asked for. */
  | "wrong_dimensions"
  /** The variable cannot be read as numbers (strings, compound types). */
  | "not_numeric"
  /** A coordinate is not usable: undecodable time units or calendar, not monotonic, missing. */
  | "bad_coordinate"
  /** A read would exceed the size limit. */
  | "too_large";

/**
 * A NetCDF file or variable that cannot be used.
 *
 * @example
 * ```ts
 * import { NetcdfError } from "./errors.ts";
 * import assert from "node:assert/strict";
 * const e = new NetcdfError("unknown_variable", "No variable tas", { variable: "tas" });
 * assert.equal(e.code, "unknown_variable");
 * assert.equal(e.variable, "tas");
 * ```
 */
export class NetcdfError extends Error {
  /** The variable concerned, when there is one. */
  readonly variable?: string;
  constructor(
    readonly code: NetcdfErrorCode,
    message: string,
    extra: { variable?: string } = {},
  ) {
    super(message);
    this.name = "NetcdfError";
    this.variable = extra.variable;
  }
}

/** Shorten text from a file (names, attribute values) for a message. */
export function shown(text: string, max = 60): string {
  // deno-lint-ignore no-control-regex
  const s = text.replace(/[\u0000-\u001f\u007f]/g, "?");
  return s.length > max ? `${s.slice(0, max)}…` : s;
}
