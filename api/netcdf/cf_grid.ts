/**
 * A (time, lat, lon) variable of a CF file, described and read in blocks of time steps as
 * Float32Array chunks, decoded (masked and unpacked as xarray does, NaN where missing): for
 * storing gridded fields without holding the file, or the whole field, in memory.
 *
 * Latitude and longitude are recognised as CF coordinates (CF conventions 1.10, §4.1 and
 * §4.2): `units` degrees_north / degrees_east (and their UDUNITS spellings), `standard_name`
 * latitude / longitude, or `axis` Y / X. Dimensions of size 1 after time (a single height or
 * level) are allowed and dropped.
 *
 * @module
 */
import { cfDecodedType, cfMaskAndScale } from "../../core/cf/cf_mask_and_scale.ts";
import {
  attributeText,
  type NetcdfAttribute,
  type NetcdfVariableInfo,
} from "../../core/cf/netcdf_model.ts";
import { type CfPlacedTimeAxis, placeCfTimeAxis, readCfTimeAxis } from "./cf_time_axis.ts";
import { packingOf, timeDimensionOf } from "./cf_variables.ts";
import { NetcdfError, shown } from "./errors.ts";
import { type NetcdfSource, type StoredValues, variableOf } from "./source.ts";

/** A gridded variable: its axes and how its values decode. */
export interface CfGrid {
  variable: string;
  time: CfPlacedTimeAxis;
  latitude: { name: string; values: Float64Array; bounds: Float64Array | null };
  longitude: { name: string; values: Float64Array; bounds: Float64Array | null };
  /** [time, lat, lon] sizes. */
  shape: [number, number, number];
  units: string | null;
  /** xarray's dtype of the decoded values; the blocks are float32 whatever it is. */
  decodedType: string;
  attributes: NetcdfAttribute[];
}

const LAT_UNITS = /^(degrees?_north|degrees?_n|degreen?_?n|degrees?N)$/i;
const LON_UNITS = /^(degrees?_east|degrees?_e|degreee?_?e|degrees?E)$/i;

function role(v: NetcdfVariableInfo | undefined): "lat" | "lon" | null {
  if (!v) return null;
  const u = (attributeText(v.attributes, "units") ?? "").trim();
  const sn = attributeText(v.attributes, "standard_name");
  const axis = (attributeText(v.attributes, "axis") ?? "").toUpperCase();
  if (LAT_UNITS.test(u) || sn === "latitude" || axis === "Y") return "lat";
  if (LON_UNITS.test(u) || sn === "longitude" || axis === "X") return "lon";
  return null;
}

async function coordinate(
  src: NetcdfSource,
  dim: string,
): Promise<{ name: string; values: Float64Array; bounds: Float64Array | null }> {
  const v = variableOf(src.header, dim);
  const values = Float64Array.from(
    cfMaskAndScale(await src.read(dim), v.type, packingOf(v)).values,
  );
  const n = values.length;
  const dir = n >= 2 ? Math.sign(values[1] - values[0]) : 1;
  for (let i = 0; i < n; i++) {
    const ok = Number.isFinite(values[i]) &&
      (i === 0 || Math.sign(values[i] - values[i - 1]) === dir) &&
      dir !== 0;
    if (!ok) {
      throw new NetcdfError(
        "bad_coordinate",
        `Coordinate "${shown(dim)}" must be finite and strictly monotonic; value ${i} (${
          values[i]
        }) breaks it`,
        { variable: dim },
      );
    }
  }
  const bName = attributeText(v.attributes, "bounds");
  let bounds: Float64Array | null = null;
  if (bName) {
    const b = src.header.variables.find((x) => x.name === bName);
    if (b && b.shape.length === 2 && b.shape[0] === n && b.shape[1] === 2) {
      bounds = Float64Array.from(
        cfMaskAndScale(await src.read(bName), b.type, packingOf(b)).values,
      );
    }
  }
  return { name: dim, values, bounds };
}

/**
 * Describe a (time, lat, lon) variable: its time axis decoded, its coordinates checked.
 *
 * @param src the open file
 * @param name the variable
 * @returns the grid description
 * @throws {NetcdfError} `unknown_variable`; `wrong_dimensions` unless the dimensions are
 *   (time, latitude, longitude) in that order (size-1 dimensions after time allowed);
 *   `bad_coordinate` for undecodable time or non-monotonic coordinates; `not_numeric`
 */
export async function describeCfGrid(src: NetcdfSource, name: string): Promise<CfGrid> {
  const v = variableOf(src.header, name);
  if (v.type === "char" || v.type === "string") {
    throw new NetcdfError("not_numeric", `Variable "${shown(name)}" holds text, not numbers`, {
      variable: name,
    });
  }
  const tdim = timeDimensionOf(src.header, v);
  const rest = v.dimensions.slice(1).filter((_, i) => v.shape[i + 1] !== 1);
  const roles = rest.map((d) => role(src.header.variables.find((x) => x.name === d)));
  if (
    tdim === null || v.dimensions[0] !== tdim || rest.length !== 2 || roles[0] !== "lat" ||
    roles[1] !== "lon"
  ) {
    throw new NetcdfError(
      "wrong_dimensions",
      `Variable "${shown(name)}" has dimensions (${
        v.dimensions.map((d, i) => `${d}=${v.shape[i]}`).join(", ")
      }); a field needs (time, latitude, longitude) in that order, time a CF time coordinate ` +
        "and latitude/longitude with units degrees_north/degrees_east",
      { variable: name },
    );
  }
  const time = placeCfTimeAxis(await readCfTimeAxis(src, tdim));
  const latitude = await coordinate(src, rest[0]);
  const longitude = await coordinate(src, rest[1]);
  return {
    variable: name,
    time,
    latitude,
    longitude,
    shape: [v.shape[0], latitude.values.length, longitude.values.length],
    units: attributeText(v.attributes, "units") ?? null,
    decodedType: cfDecodedType(v.type, packingOf(v)),
    attributes: v.attributes,
  };
}

/** One block of time steps of a grid. */
export interface CfGridBlock {
  /** First time index of the block. */
  start: number;
  /** Number of time steps. */
  rows: number;
  /** rows × lat × lon values, row-major, NaN where missing. */
  values: Float32Array;
}

/**
 * Read a grid in blocks of time steps, decoded to float32. Blocks are read ahead, as many at
 * once as the source reads in parallel (`concurrentReads`, one by default), so at most that
 * many blocks, plus the one handed out, are in memory.
 *
 * @param src the open file
 * @param grid the grid (from {@link describeCfGrid})
 * @param rowsPerBlock time steps per block (default: about 16 MB of float32 per block)
 * @returns an async iterator of blocks in time order
 */
export async function* readCfGridBlocks(
  src: NetcdfSource,
  grid: CfGrid,
  rowsPerBlock?: number,
): AsyncGenerator<CfGridBlock> {
  const v = variableOf(src.header, grid.variable);
  const [nt, ny, nx] = grid.shape;
  const per = ny * nx;
  const rows = Math.max(1, Math.floor(rowsPerBlock ?? (4 * 1024 * 1024) / Math.max(per, 1)));
  const packing = packingOf(v);
  const depth = Math.max(1, src.concurrentReads ?? 1);
  const inFlight: { start: number; n: number; raw: Promise<StoredValues> }[] = [];
  let next = 0;
  const request = () => {
    if (next >= nt) return;
    const n = Math.min(rows, nt - next);
    const raw = src.read(grid.variable, next, n);
    raw.catch(() => undefined); // awaited in order below; later ones are dropped on a failure
    inFlight.push({ start: next, n, raw });
    next += n;
  };
  while (inFlight.length < depth && next < nt) request();
  while (inFlight.length) {
    const { start, n, raw } = inFlight.shift()!;
    const stored = await raw;
    request();
    // Decoded into a new array even when stored as float32: decoding in place saved about
    // 70 ms of CPU on a 150 MB field but raised the upload's peak memory by about 110 MiB
    // (buffers transferred from the NetCDF-4 worker are collected later than ones made here).
    const values = new Float32Array(n * per);
    cfMaskAndScale(stored, v.type, packing, values);
    yield { start, rows: n, values };
  }
}
