/**
 * NetCDF format detection by magic bytes (NetCDF Users Guide, "File Format Specifications"):
 * `CDF\x01` classic, `CDF\x02` 64-bit offset, `CDF\x05` CDF-5 (64-bit data), and NetCDF-4,
 * which is HDF5: the signature `\x89HDF\r\n\x1a\n` at byte 0, or after a user block at 512,
 * 1024, 2048, ... (HDF5 File Format Specification, "Format Signature").
 *
 * @module
 */
import { NetcdfError } from "./errors.ts";

/** The NetCDF formats sunlag reads. */
export type NetcdfFormat =
  | "netcdf3_classic"
  | "netcdf3_64bit_offset"
  | "netcdf4"
  | "zarr_v2_zip";

const HDF5 = [0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a];

/**
 * Whether bytes begin with the HDF5 signature (a NetCDF-4 file without a user block).
 *
 * @example
 * ```ts
 * import { startsWithHdf5 } from "./detect.ts";
 * import assert from "node:assert/strict";
 * assert.equal(startsWithHdf5(Uint8Array.of(0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a)), true);
 * assert.equal(startsWithHdf5(new TextEncoder().encode("CDF\x01")), false);
 * ```
 */
export function startsWithHdf5(head: Uint8Array): boolean {
  return head.length >= 8 && HDF5.every((x, i) => head[i] === x);
}

/**
 * The format of a file from its first bytes.
 *
 * @param head the file's first bytes (at least 8; pass more to find an HDF5 user block)
 * @param size the file's size in bytes (HDF5 signatures are searched below it)
 * @param readAt reads 8 bytes at an offset, for HDF5 signatures past `head`
 * @returns the format
 * @throws {NetcdfError} `not_netcdf` (with the first bytes shown) or `unsupported_format` (CDF-5)
 * @example
 * ```ts
 * import { detectNetcdfFormat } from "./detect.ts";
 * import assert from "node:assert/strict";
 * const head = Uint8Array.of(0x43, 0x44, 0x46, 2, 0, 0, 0, 0);
 * assert.equal(await detectNetcdfFormat(head, 8), "netcdf3_64bit_offset");
 * await assert.rejects(detectNetcdfFormat(new TextEncoder().encode("time,value\n1,2"), 15), {
 *   code: "not_netcdf",
 * });
 * ```
 */
export async function detectNetcdfFormat(
  head: Uint8Array,
  size: number,
  readAt?: (offset: number) => Promise<Uint8Array>,
): Promise<NetcdfFormat> {
  if (head.length >= 4 && head[0] === 0x43 && head[1] === 0x44 && head[2] === 0x46) {
    if (head[3] === 1) return "netcdf3_classic";
    if (head[3] === 2) return "netcdf3_64bit_offset";
    if (head[3] === 5) {
      throw new NetcdfError(
        "unsupported_format",
        "The file is NetCDF-3 CDF-5 (64-bit data), which sunlag does not read; convert it to " +
          "NetCDF-4 or classic (e.g. nccopy -k nc4 in.nc out.nc)",
      );
    }
  }
  for (let at = 0; at + 8 <= size; at = at === 0 ? 512 : at * 2) {
    const b = at + 8 <= head.length ? head.subarray(at, at + 8) : await readAt?.(at);
    if (!b) break;
    if (HDF5.every((x, i) => b[i] === x)) return "netcdf4";
  }
  const first = Array.from(head.subarray(0, 8), (x) => x.toString(16).padStart(2, "0")).join(" ");
  throw new NetcdfError(
    "not_netcdf",
    `The body is not a NetCDF file: it starts with bytes ${first || "(none)"}, not "CDF\\x01", ` +
      '"CDF\\x02" (NetCDF-3), the HDF5 signature (NetCDF-4) or "PK\\x03\\x04" (a zipped Zarr store)',
  );
}
