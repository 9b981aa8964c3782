/**
 * A Web Worker that reads NetCDF-4 (HDF5) files with h5wasm 0.10.3 (`h5wasm/node`, which
 * opens real file paths). It runs apart from the service so that a damaged file that makes the
 * HDF5 library loop or abort costs one worker, which the main thread then terminates and
 * replaces (see `netcdf4_source.ts`).
 *
 * The HDF5 library prints its diagnostics ("HDF5-DIAG ...") to standard error; here standard
 * error of the WebAssembly module is swallowed, so none reaches responses or the service log.
 *
 * NetCDF-4 on HDF5 (NetCDF Users Guide, "NetCDF-4 Format"): dimensions are HDF5 dimension
 * scales named after the dimension; a dimension without a coordinate variable is a scale whose
 * `NAME` attribute begins "This is a netCDF dimension but not a netCDF variable"; the library's
 * bookkeeping attributes (`_Netcdf4Dimid`, `DIMENSION_LIST`, ...) are not user attributes.
 *
 * @module
 */
/// <reference lib="deno.worker" />
import type { NetcdfAttribute, NetcdfType } from "../../core/cf/netcdf_model.ts";

// deno-lint-ignore no-explicit-any
type Any = any;

// The WebAssembly glue warns on the console about what it meets in damaged files (e.g. invalid
// UTF-8 in names); this worker only runs the library, so its console is silenced.
for (const k of ["log", "info", "warn", "error", "debug"] as const) console[k] = () => {};

const mod: Any = await import("h5wasm/node");
const h5: Any = mod.default;
const Module: Any = await h5.ready;
{
  // Swallow what HDF5 writes to the module's stderr (fd 2), keep everything else.
  const FS = Module.FS;
  const write = FS.write;
  FS.write = function (stream: Any, buffer: Any, offset: number, length: number, ...rest: Any[]) {
    if (stream && stream.fd === 2) return length;
    return write.call(FS, stream, buffer, offset, length, ...rest);
  };
}

const HIDDEN = new Set([
  "_Netcdf4Coordinates",
  "_Netcdf4Dimid",
  "DIMENSION_LIST",
  "REFERENCE_LIST",
  "CLASS",
  "NAME",
  "_NCProperties",
  "_nc3_strict",
  "_SuperblockVersion",
  "_IsNetcdf4",
]);
const PURE_DIMENSION = "This is a netCDF dimension but not a netCDF variable";

const files = new Map<number, Any>();
let nextHandle = 1;

function typeOf(meta: Any): NetcdfType | null {
  if (!meta) return null;
  if (meta.type === 0) {
    const s = meta.signed;
    switch (meta.size) {
      case 1:
        return s ? "byte" : "ubyte";
      case 2:
        return s ? "short" : "ushort";
      case 4:
        return s ? "int" : "uint";
      case 8:
        return s ? "int64" : "uint64";
    }
    return null;
  }
  if (meta.type === 1) return meta.size === 4 ? "float" : meta.size === 8 ? "double" : null;
  if (meta.type === 3) return meta.vlen ? "string" : "char";
  return null;
}

function attributesOf(obj: Any): NetcdfAttribute[] {
  const out: NetcdfAttribute[] = [];
  const attrs = obj.attrs;
  for (const name of Object.keys(attrs)) {
    if (HIDDEN.has(name)) continue;
    let a: Any;
    try {
      a = attrs[name];
    } catch {
      continue;
    }
    const type = typeOf(a.metadata);
    if (type === null) continue;
    let v: Any;
    try {
      v = a.value;
    } catch {
      continue;
    }
    if (type === "char" || type === "string") {
      const text = Array.isArray(v) ? v.join("") : String(v ?? "");
      out.push({ name, type: "char", value: text });
    } else if (v !== null && v !== undefined) {
      const arr = ArrayBuffer.isView(v) || Array.isArray(v) ? Array.from(v as Any) : [v];
      out.push({ name, type, value: arr.map(Number) });
    }
  }
  return out;
}

function base(path: string): string {
  return path.slice(path.lastIndexOf("/") + 1);
}

function header(f: Any) {
  const dimensions: { name: string; size: number }[] = [];
  const variables: Any[] = [];
  for (const key of f.keys() as string[]) {
    let obj: Any;
    try {
      obj = f.get(key);
    } catch {
      continue;
    }
    if (!obj || obj.type !== "Dataset") continue; // groups and types are not read
    const meta = obj.metadata;
    const shape: number[] = (meta?.shape ?? []).map(Number);
    let isScale = false;
    try {
      isScale = obj.get_scale_name() !== null;
    } catch { /* not a scale */ }
    let nameAttr = "";
    try {
      const n = obj.attrs["NAME"]?.value;
      nameAttr = Array.isArray(n) ? n.join("") : String(n ?? "");
    } catch { /* no NAME */ }
    if (isScale) dimensions.push({ name: key, size: shape[0] ?? 0 });
    if (isScale && nameAttr.startsWith(PURE_DIMENSION)) continue;
    const dims: string[] = shape.map((_, i) => {
      try {
        const s = obj.get_attached_scales(i) as string[];
        if (s && s.length) return base(s[0]);
      } catch { /* none */ }
      return isScale && i === 0 ? key : `${key}_dim${i}`;
    });
    variables.push({
      name: key,
      type: typeOf(meta) ?? "compound",
      dimensions: dims,
      shape,
      attributes: attributesOf(obj),
    });
  }
  // Dimensions only named through a variable (no scale dataset) are added from its shape.
  const known = new Set(dimensions.map((d) => d.name));
  for (const v of variables) {
    v.dimensions.forEach((d: string, i: number) => {
      if (!known.has(d)) {
        known.add(d);
        dimensions.push({ name: d, size: v.shape[i] });
      }
    });
  }
  return { format: "netcdf4", dimensions, attributes: attributesOf(f), variables };
}

function swapInPlace(bytes: Uint8Array, size: number): void {
  for (let i = 0; i + size <= bytes.length; i += size) {
    for (let a = i, b = i + size - 1; a < b; a++, b--) {
      const t = bytes[a];
      bytes[a] = bytes[b];
      bytes[b] = t;
    }
  }
}

function read(f: Any, name: string, start: number, rows: number, total: number) {
  const ds = f.get(name);
  if (!ds || ds.type !== "Dataset") throw new Error(`no dataset ${name}`);
  const meta = ds.metadata;
  const type = typeOf(meta);
  if (type === null || type === "string" || type === "char") {
    return { notNumeric: true };
  }
  const shape: number[] = (meta.shape ?? []).map(Number);
  let v: Any;
  if (shape.length === 0) v = ds.value;
  else if (start === 0 && rows === total) v = ds.value;
  else v = ds.slice([[start, start + rows]]);
  if (!ArrayBuffer.isView(v)) v = Float64Array.of(Number(v));
  if (!meta.littleEndian && meta.size > 1) {
    swapInPlace(
      new Uint8Array((v as Any).buffer, (v as Any).byteOffset, (v as Any).byteLength),
      meta.size,
    );
  }
  if (v instanceof BigInt64Array || v instanceof BigUint64Array) {
    v = Float64Array.from(v as Any, Number);
  }
  return { values: v };
}

self.onmessage = (e: MessageEvent) => {
  const m = e.data as Any;
  try {
    if (m.op === "open") {
      const f = new h5.File(m.path, "r");
      if (typeof f.file_id === "bigint" ? f.file_id < 0n : f.file_id < 0) {
        self.postMessage({ id: m.id, ok: false, error: "corrupt" });
        return;
      }
      let h = null;
      try {
        // a file opened again in a second worker (for parallel reads) needs no header
        if (m.header) h = header(f);
      } catch (err) {
        try {
          f.close();
        } catch { /* ignore */ }
        throw err;
      }
      const handle = nextHandle++;
      files.set(handle, f);
      self.postMessage({ id: m.id, ok: true, handle, header: h });
    } else if (m.op === "read") {
      const f = files.get(m.handle);
      if (!f) throw new Error("file not open");
      const r = read(f, m.name, m.start, m.rows, m.total);
      if ("notNumeric" in r) {
        self.postMessage({ id: m.id, ok: false, error: "not_numeric" });
        return;
      }
      const v = r.values as Any;
      self.postMessage({ id: m.id, ok: true, values: v }, [v.buffer]);
    } else if (m.op === "close") {
      const f = files.get(m.handle);
      files.delete(m.handle);
      try {
        f?.close();
      } catch { /* ignore */ }
      self.postMessage({ id: m.id, ok: true });
    }
  } catch (_err) {
    // The library's messages are diagnostics about the file's internals: not passed on.
    self.postMessage({ id: m.id, ok: false, error: "corrupt" });
  }
};

self.postMessage({ ready: true });
