/**
 * The CF-1.10 dataset of a map (the map part of a gridded result, api/analyses/common/
 * map_result.ts), for the NetCDF-3 writer:
 *
 * - `lat` and `lon` coordinates (`units` degrees_north/degrees_east, `standard_name`, `axis`),
 *   with `lat_bnds`/`lon_bnds` (CF §7.1) when the field had bounds;
 * - each map variable on (lat, lon): numbers as double with `_FillValue` NaN, integers (a best
 *   lag, a status) as int with `_FillValue` −2147483647, flags (a significance mask) as byte
 *   with `flag_values` 0, 1 and `flag_meanings` (CF §3.5), `_FillValue` −127 where the cell
 *   was left out;
 * - optional per-lag maps on (lag, lat, lon);
 * - global attributes: the run's provenance (run id, result digest, creation time, history,
 *   warnings, cautions) and what a map is not (many cells; correlation is not attribution).
 *
 * @module
 */
import { ncNumber, ncText, type NetcdfAttribute } from "../../core/cf/netcdf_model.ts";
import type { NetcdfWriteDataset, NetcdfWriteVariable } from "../../core/cf/netcdf3_write.ts";
import { type Provenance, provenanceAttributes } from "./series_dataset.ts";

/** The map as the dataset builder takes it (a MapPart of a result). */
export interface MapLike {
  grid: {
    lat: number[];
    lon: number[];
    lat_bounds: number[] | null;
    lon_bounds: number[] | null;
  };
  variables: {
    name: string;
    long_name: string;
    units: string;
    kind: "float" | "int" | "flag";
    values: (number | null)[];
  }[];
}

/** Per-lag maps: lags and, per variable, one array of cells per lag. */
export interface LagMaps {
  lags: number[];
  lagUnits: string;
  variables: { name: string; long_name: string; units: string; values: (number | null)[][] }[];
}

const INT_FILL = -2147483647;
const BYTE_FILL = -127;

function column(values: (number | null)[], fill: number): Float64Array {
  return Float64Array.from(values, (v) => (v === null || !Number.isFinite(v) ? fill : v));
}

/**
 * Build the dataset of a map.
 *
 * @param map the map part
 * @param prov the run's provenance
 * @param extra more global attributes (e.g. the field significance in words)
 * @param lagMaps optional per-lag maps
 * @returns the dataset for netcdf3Chunks / encodeNetcdf3
 */
export function buildMapDataset(
  map: MapLike,
  prov: Provenance,
  extra: NetcdfAttribute[] = [],
  lagMaps?: LagMaps | null,
): NetcdfWriteDataset {
  const { lat, lon, lat_bounds, lon_bounds } = map.grid;
  const dims = [{ name: "lat", size: lat.length }, { name: "lon", size: lon.length }];
  const bounded = lat_bounds !== null || lon_bounds !== null;
  if (bounded) dims.push({ name: "nv", size: 2 });
  if (lagMaps) dims.unshift({ name: "lag", size: lagMaps.lags.length });
  const vars: NetcdfWriteVariable[] = [];
  const coord = (
    name: "lat" | "lon",
    values: number[],
    bounds: number[] | null,
  ) => {
    const isLat = name === "lat";
    vars.push({
      name,
      type: "double",
      dimensions: [name],
      attributes: [
        ncText("standard_name", isLat ? "latitude" : "longitude"),
        ncText("long_name", isLat ? "latitude of the cell centre" : "longitude of the cell centre"),
        ncText("units", isLat ? "degrees_north" : "degrees_east"),
        ncText("axis", isLat ? "Y" : "X"),
        ...(bounds ? [ncText("bounds", `${name}_bnds`)] : []),
      ],
      data: Float64Array.from(values),
    });
    if (bounds) {
      vars.push({
        name: `${name}_bnds`,
        type: "double",
        dimensions: [name, "nv"],
        attributes: [],
        data: Float64Array.from(bounds),
      });
    }
  };
  if (lagMaps) {
    vars.push({
      name: "lag",
      type: "int",
      dimensions: ["lag"],
      attributes: [
        ncText("long_name", "lag of the field behind the solar series (k > 0: the field follows)"),
        ncText("units", lagMaps.lagUnits),
      ],
      data: Int32Array.from(lagMaps.lags),
    });
  }
  coord("lat", lat, lat_bounds);
  coord("lon", lon, lon_bounds);
  for (const v of map.variables) {
    const base = [ncText("long_name", v.long_name), ncText("units", v.units)];
    if (v.kind === "flag") {
      vars.push({
        name: v.name,
        type: "byte",
        dimensions: ["lat", "lon"],
        attributes: [
          ncNumber("_FillValue", "byte", BYTE_FILL),
          ncText("long_name", v.long_name),
          ncNumber("flag_values", "byte", 0, 1),
          ncText("flag_meanings", "no yes"),
        ],
        data: column(v.values, BYTE_FILL),
      });
    } else if (v.kind === "int") {
      vars.push({
        name: v.name,
        type: "int",
        dimensions: ["lat", "lon"],
        attributes: [ncNumber("_FillValue", "int", INT_FILL), ...base],
        data: column(v.values, INT_FILL),
      });
    } else {
      vars.push({
        name: v.name,
        type: "double",
        dimensions: ["lat", "lon"],
        attributes: [ncNumber("_FillValue", "double", NaN), ...base],
        data: column(v.values, NaN),
      });
    }
  }
  for (const v of lagMaps?.variables ?? []) {
    vars.push({
      name: v.name,
      type: "double",
      dimensions: ["lag", "lat", "lon"],
      attributes: [
        ncNumber("_FillValue", "double", NaN),
        ncText("long_name", v.long_name),
        ncText("units", v.units),
      ],
      data: Float64Array.from(v.values.flat(), (x) => (x === null ? NaN : x)),
    });
  }
  return {
    dimensions: dims,
    attributes: provenanceAttributes(prov, extra),
    variables: vars,
  };
}
