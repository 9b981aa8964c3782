/**
 * A zipped Zarr v2 store (as `xarray.Dataset.to_zarr(zarr.storage.ZipStore(...))` writes it)
 * read as a {@link NetcdfSource}, so the CF layer that decodes NetCDF files (time on its
 * calendar, masking, unpacking) decodes it the same way.
 *
 * Libraries: zarrita 0.7.5 reads the arrays (Zarr v2 metadata, chunk indexing, and the
 * numcodecs compressors xarray writes: Blosc by default, zlib, gzip, LZ4, Zstd), and unzipit
 * 2.0.0 reads the zip directory and entries. Written here: the reader that lets unzipit read
 * the uploaded temporary file by offset (its own readers take a `Blob`, an `ArrayBuffer` or a
 * URL, and the first two would hold the whole upload in memory), the store zarrita reads the
 * entries through (a `get` of one entry, size-checked), and the mapping of xarray's Zarr
 * conventions onto a NetCDF header:
 *
 * - dimension names come from each array's `_ARRAY_DIMENSIONS` attribute (xarray's
 *   convention; a store without it was not written by xarray and is refused);
 * - the array's `fill_value` becomes the `_FillValue` attribute, as xarray decodes it
 *   (`NaN` for floating arrays written without one); numbers in `.zattrs` are doubles, texts
 *   are `char`, as JSON carries them;
 * - 64-bit integers (xarray's encoded times) come as float64, as from the NetCDF readers.
 *
 * Only the root group is read (xarray writes a dataset there). A store that is not Zarr v2, an
 * array in Fortran order, a chunk of more than {@link MAX_CHUNK_VALUES} values or a codec
 * zarrita does not know is refused with a `NetcdfError`, never a library message.
 *
 * @module
 */
import * as zarr from "zarrita";
import { unzip, type ZipEntry } from "unzipit";
import type {
  NetcdfAttribute,
  NetcdfDimension,
  NetcdfType,
  NetcdfVariableInfo,
} from "../../core/cf/netcdf_model.ts";
import { NetcdfError, shown } from "./errors.ts";
import {
  type NetcdfHeader,
  type NetcdfSource,
  rowBlock,
  type StoredValues,
  variableOf,
} from "./source.ts";

/** Most values one stored chunk may declare (a chunk is decompressed whole). */
export const MAX_CHUNK_VALUES = 16 * 1024 * 1024;

/** Most bytes one zip entry may inflate to. */
const MAX_ENTRY_BYTES = 256 * 1024 * 1024;

/** Most arrays a store may hold. */
const MAX_ARRAYS = 1000;

/** Most bytes of one metadata document (`.zmetadata`, `.zarray`, `.zattrs`). */
const MAX_METADATA_BYTES = 8 * 1024 * 1024;

/** Zarr v2 `dtype` strings (NumPy array-protocol type strings) and their NetCDF types. */
const DTYPES: Record<string, NetcdfType> = {
  "|i1": "byte",
  "|u1": "ubyte",
  "|b1": "ubyte",
  "<i2": "short",
  "<u2": "ushort",
  "<i4": "int",
  "<u4": "uint",
  "<i8": "int64",
  "<u8": "uint64",
  "<f4": "float",
  "<f8": "double",
  ">i2": "short",
  ">u2": "ushort",
  ">i4": "int",
  ">u4": "uint",
  ">i8": "int64",
  ">u8": "uint64",
  ">f4": "float",
  ">f8": "double",
};

/** The leading bytes of a zip file (a local file header, PKWARE APPNOTE §4.3.7). */
export function isZip(head: Uint8Array): boolean {
  return head.length >= 4 && head[0] === 0x50 && head[1] === 0x4b && head[2] === 0x03 &&
    head[3] === 0x04;
}

/**
 * Random access to an open file, as unzipit's readers offer it. Reads are serialised (a read is
 * a seek and reads on one handle, and zarrita fetches chunks concurrently).
 */
class FileReader {
  private last: Promise<unknown> = Promise.resolve();
  constructor(private file: Deno.FsFile, private size: number) {}
  getLength(): Promise<number> {
    return Promise.resolve(this.size);
  }
  read(offset: number, length: number): Promise<Uint8Array<ArrayBuffer>> {
    const next = this.last.catch(() => undefined).then(() => this.readNow(offset, length));
    this.last = next;
    return next;
  }
  private async readNow(offset: number, length: number): Promise<Uint8Array<ArrayBuffer>> {
    if (offset < 0 || length < 0 || offset + length > this.size) {
      throw new NetcdfError(
        "truncated",
        `The zip file ends at byte ${this.size}; an entry reaches byte ${offset + length}`,
      );
    }
    const out = new Uint8Array(length);
    await this.file.seek(offset, Deno.SeekMode.Start);
    let at = 0;
    while (at < length) {
      const n = await this.file.read(out.subarray(at));
      if (n === null) throw new NetcdfError("truncated", "The zip file ends inside an entry");
      at += n;
    }
    return out;
  }
}

/** The zip's entries as the store zarrita reads (keys are absolute paths, "/tas/0.0.0"). */
class ZipEntriesStore {
  constructor(private entries: Record<string, ZipEntry>) {}
  async get(key: string): Promise<Uint8Array | undefined> {
    const e = this.entries[key.replace(/^\/+/, "")];
    if (!e || e.isDirectory) return undefined;
    if (e.size > MAX_ENTRY_BYTES) {
      throw new NetcdfError(
        "too_large",
        `The zip entry ${shown(e.name)} inflates to ${e.size} bytes, over ${MAX_ENTRY_BYTES}`,
      );
    }
    try {
      return new Uint8Array(await e.arrayBuffer());
    } catch {
      throw new NetcdfError("corrupt", `The zip entry ${shown(e.name)} cannot be inflated`);
    }
  }
}

interface ZarrayJson {
  zarr_format: number;
  shape: number[];
  chunks: number[];
  dtype: string;
  order: string;
  fill_value: number | string | null;
}

/** Metadata of the root group's arrays: `.zmetadata` when consolidated, else each array's. */
async function arrayMetadata(
  store: ZipEntriesStore,
  names: string[],
): Promise<Map<string, { zarray: ZarrayJson; zattrs: Record<string, unknown> }>> {
  const json = async (key: string): Promise<Record<string, unknown> | null> => {
    const bytes = await store.get(key);
    if (!bytes) return null;
    if (bytes.length > MAX_METADATA_BYTES) {
      throw new NetcdfError("corrupt", `The Zarr metadata ${shown(key)} is over 8 MiB`);
    }
    try {
      return JSON.parse(new TextDecoder().decode(bytes));
    } catch {
      throw new NetcdfError("corrupt", `The Zarr metadata ${shown(key)} is not JSON`);
    }
  };
  const out = new Map<string, { zarray: ZarrayJson; zattrs: Record<string, unknown> }>();
  const consolidated = await json("/.zmetadata");
  const meta = consolidated?.metadata as Record<string, Record<string, unknown>> | undefined;
  for (const name of names) {
    const zarray = (meta?.[`${name}/.zarray`] ?? await json(`/${name}/.zarray`)) as
      | ZarrayJson
      | null;
    const zattrs = (meta?.[`${name}/.zattrs`] ?? await json(`/${name}/.zattrs`) ?? {}) as Record<
      string,
      unknown
    >;
    if (zarray) out.set(name, { zarray, zattrs });
  }
  return out;
}

function attributesOf(zattrs: Record<string, unknown>): NetcdfAttribute[] {
  const out: NetcdfAttribute[] = [];
  for (const [name, v] of Object.entries(zattrs)) {
    if (name === "_ARRAY_DIMENSIONS") continue;
    if (typeof v === "string") out.push({ name, type: "char", value: v });
    else if (typeof v === "number") out.push({ name, type: "double", value: [v] });
    else if (Array.isArray(v) && v.every((x) => typeof x === "number")) {
      out.push({ name, type: "double", value: v as number[] });
    } else if (Array.isArray(v) && v.every((x) => typeof x === "string")) {
      out.push({ name, type: "char", value: (v as string[]).join(" ") });
    }
    // other JSON (objects, booleans) has no NetCDF attribute type: left out
  }
  return out;
}

/** The `fill_value` of `.zarray` as xarray reads it (JSON "NaN", "Infinity" for floats). */
function fillValue(v: number | string | null): number | null {
  if (v === null) return null;
  if (typeof v === "number") return v;
  if (v === "NaN") return NaN;
  if (v === "Infinity") return Infinity;
  if (v === "-Infinity") return -Infinity;
  return null;
}

function variableInfo(
  name: string,
  zarray: ZarrayJson,
  zattrs: Record<string, unknown>,
): NetcdfVariableInfo {
  if (zarray.zarr_format !== 2) {
    throw new NetcdfError(
      "unsupported_format",
      `Array ${shown(name)} is Zarr format ${zarray.zarr_format}; sunlag reads zipped Zarr v2 ` +
        "stores (as xarray writes with zarr 2)",
    );
  }
  const type = DTYPES[zarray.dtype];
  if (!type) {
    throw new NetcdfError(
      "not_numeric",
      `Array ${shown(name)} has dtype ${shown(String(zarray.dtype))}, not a number type`,
      { variable: name },
    );
  }
  const dims = zattrs._ARRAY_DIMENSIONS;
  if (
    !Array.isArray(dims) || dims.length !== zarray.shape.length ||
    !dims.every((d) => typeof d === "string")
  ) {
    throw new NetcdfError(
      "corrupt",
      `Array ${shown(name)} has no _ARRAY_DIMENSIONS naming its ${zarray.shape.length} ` +
        "dimensions (xarray writes it); write the store with xarray's to_zarr",
      { variable: name },
    );
  }
  if (zarray.order !== "C") {
    throw new NetcdfError(
      "unsupported_format",
      `Array ${shown(name)} is stored in Fortran order; write it in C order (xarray's default)`,
      { variable: name },
    );
  }
  const chunkValues = zarray.chunks.reduce((a, b) => a * b, 1);
  if (chunkValues > MAX_CHUNK_VALUES) {
    throw new NetcdfError(
      "too_large",
      `Array ${shown(name)} has chunks of ${chunkValues} values, over ${MAX_CHUNK_VALUES}; ` +
        "rechunk it (e.g. .chunk({'time': 12}))",
      { variable: name },
    );
  }
  const attributes = attributesOf(zattrs);
  const fill = fillValue(zarray.fill_value);
  if (fill !== null && !attributes.some((a) => a.name === "_FillValue")) {
    attributes.unshift({ name: "_FillValue", type, value: [fill] });
  }
  return { name, type, dimensions: dims as string[], shape: zarray.shape, attributes };
}

/** The dimensions the arrays name, with one size each. */
function dimensionsOf(variables: NetcdfVariableInfo[]): NetcdfDimension[] {
  const size = new Map<string, number>();
  for (const v of variables) {
    v.dimensions.forEach((d, i) => {
      const had = size.get(d);
      if (had !== undefined && had !== v.shape[i]) {
        throw new NetcdfError(
          "corrupt",
          `Dimension ${shown(d)} has size ${had} in one array and ${v.shape[i]} in ${
            shown(v.name)
          }`,
          { variable: v.name },
        );
      }
      size.set(d, v.shape[i]);
    });
  }
  return [...size].map(([name, n]) => ({ name, size: n, unlimited: false }));
}

class ZarrZipSource implements NetcdfSource {
  constructor(
    readonly header: NetcdfHeader,
    private arrays: Map<string, zarr.Array<zarr.DataType, ZipEntriesStore>>,
    private file: Deno.FsFile,
  ) {}

  async read(name: string, start = 0, rows?: number): Promise<StoredValues> {
    const v = variableOf(this.header, name);
    const [s, n] = rowBlock(v, start, rows);
    const arr = this.arrays.get(name)!;
    let chunk;
    try {
      chunk = v.shape.length === 0
        ? await zarr.get(arr)
        : await zarr.get(arr, [zarr.slice(s, s + n), ...v.shape.slice(1).map(() => null)]);
    } catch (e) {
      if (e instanceof NetcdfError) throw e;
      throw new NetcdfError(
        "corrupt",
        `Array ${shown(name)} could not be read (a damaged chunk, or a codec sunlag does not ` +
          "have; xarray's defaults Blosc, zlib and gzip are read)",
        { variable: name },
      );
    }
    const data = typeof chunk === "object" && chunk !== null && "data" in chunk
      ? chunk.data
      : chunk;
    if (data instanceof BigInt64Array || data instanceof BigUint64Array) {
      return Float64Array.from(data, Number);
    }
    if (typeof data === "number") return Float64Array.of(data);
    if (typeof data === "bigint") return Float64Array.of(Number(data));
    if (ArrayBuffer.isView(data)) return data as StoredValues;
    throw new NetcdfError("not_numeric", `Array ${shown(name)} is not numeric`, {
      variable: name,
    });
  }

  close(): Promise<void> {
    try {
      this.file.close();
    } catch { /* closed */ }
    return Promise.resolve();
  }
}

/**
 * Open a zipped Zarr v2 store.
 *
 * @param path the zip file
 * @returns the open source (close it when done)
 * @throws {NetcdfError} `corrupt` for a damaged zip or metadata, `unsupported_format` for
 *   another Zarr version or layout, `not_numeric`, `too_large`
 */
export async function openZarrZip(path: string): Promise<NetcdfSource> {
  const file = await Deno.open(path, { read: true });
  try {
    const size = (await file.stat()).size;
    let entries: Record<string, ZipEntry>;
    try {
      entries = (await unzip(new FileReader(file, size))).entries;
    } catch (e) {
      if (e instanceof NetcdfError) throw e;
      throw new NetcdfError(
        "corrupt",
        "The body starts as a zip file but its directory is damaged",
      );
    }
    const store = new ZipEntriesStore(entries);
    const names = [
      ...new Set(
        Object.keys(entries).map((k) => k.replace(/^\/+/, "")).filter((k) =>
          /^[^/]+\/\.zarray$/.test(k)
        )
          .map((k) => k.slice(0, -"/.zarray".length)),
      ),
    ].sort();
    if (names.length === 0) {
      throw new NetcdfError(
        "corrupt",
        "The zip file holds no Zarr array at its root (no <name>/.zarray entry); zip the store " +
          "xarray's to_zarr wrote, or upload NetCDF",
      );
    }
    if (names.length > MAX_ARRAYS) {
      throw new NetcdfError("too_large", `The store has ${names.length} arrays; at most 1000`);
    }
    const meta = await arrayMetadata(store, names);
    const variables = names.map((n) => variableInfo(n, meta.get(n)!.zarray, meta.get(n)!.zattrs));
    const rootAttrs = await store.get("/.zattrs");
    let attributes: NetcdfAttribute[] = [];
    if (rootAttrs && rootAttrs.length <= MAX_METADATA_BYTES) {
      try {
        attributes = attributesOf(JSON.parse(new TextDecoder().decode(rootAttrs)));
      } catch {
        throw new NetcdfError("corrupt", "The Zarr store's .zattrs is not JSON");
      }
    }
    const root = zarr.root(store);
    const arrays = new Map<string, zarr.Array<zarr.DataType, ZipEntriesStore>>();
    for (const n of names) {
      try {
        arrays.set(n, await zarr.open.v2(root.resolve(n), { kind: "array" }));
      } catch {
        throw new NetcdfError("corrupt", `Array ${shown(n)} cannot be opened`, { variable: n });
      }
    }
    const header: NetcdfHeader = {
      format: "zarr_v2_zip",
      dimensions: dimensionsOf(variables),
      attributes,
      variables,
    };
    return new ZarrZipSource(header, arrays, file);
  } catch (e) {
    try {
      file.close();
    } catch { /* closed */ }
    throw e;
  }
}
