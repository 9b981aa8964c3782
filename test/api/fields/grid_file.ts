/**
 * Test helper: a gridded field as NetCDF-3 classic bytes (core/cf's writer), monthly on the
 * standard calendar at mid-month, so the API tests can upload constructed fields.
 *
 * @module
 */
import { encodeNetcdf3, type NetcdfWriteVariable } from "../../../core/cf/netcdf3_write.ts";
import { ncNumber, ncText } from "../../../core/cf/netcdf_model.ts";
import { storeNetcdfField } from "../../../api/fields/ingest.ts";
import { withNetcdf, withTempUpload } from "../../../api/netcdf/open.ts";
import type { Store } from "../../../api/store/types.ts";

/** Options of {@link gridNetcdf}. */
export interface GridFileOptions {
  startYear: number;
  nTime: number;
  lat: number[];
  lon: number[];
  /** time-major, latitude-major; null or NaN = missing. */
  values: ArrayLike<number | null>;
  variable?: string;
  units?: string;
  standardName?: string;
  fill?: number;
  /** Override the time values (days since 1850-01-01). */
  time?: number[];
  calendar?: string;
}

const DAY = 86_400_000;

/** Days since 1850-01-01 of the middle of month m (0-based) of year y, proleptic Gregorian. */
export function midMonthDays(y: number, m: number): number {
  const a = Date.UTC(y, m, 1), b = Date.UTC(y, m + 1, 1);
  return ((a + b) / 2 - Date.UTC(1850, 0, 1)) / DAY;
}

/** The NetCDF-3 bytes of a monthly (time, lat, lon) field. */
export function gridNetcdf(o: GridFileOptions): Uint8Array<ArrayBuffer> {
  const fill = o.fill ?? -9999;
  const time = o.time ??
    Array.from(
      { length: o.nTime },
      (_, k) => midMonthDays(o.startYear + Math.floor(k / 12), k % 12),
    );
  const vars: NetcdfWriteVariable[] = [
    {
      name: "time",
      type: "double",
      dimensions: ["time"],
      attributes: [
        ncText("standard_name", "time"),
        ncText("units", "days since 1850-01-01 00:00:00"),
        ncText("calendar", o.calendar ?? "standard"),
        ncText("axis", "T"),
      ],
      data: Float64Array.from(time),
    },
    {
      name: "lat",
      type: "double",
      dimensions: ["lat"],
      attributes: [ncText("units", "degrees_north"), ncText("standard_name", "latitude")],
      data: Float64Array.from(o.lat),
    },
    {
      name: "lon",
      type: "double",
      dimensions: ["lon"],
      attributes: [ncText("units", "degrees_east"), ncText("standard_name", "longitude")],
      data: Float64Array.from(o.lon),
    },
    {
      name: o.variable ?? "tas",
      type: "float",
      dimensions: ["time", "lat", "lon"],
      attributes: [
        ncNumber("_FillValue", "float", fill),
        ncText("units", o.units ?? "K"),
        ...(o.standardName ? [ncText("standard_name", o.standardName)] : []),
      ],
      data: Float32Array.from(
        o.values as ArrayLike<number>,
        (v) => v === null || Number.isNaN(v) ? fill : v,
      ),
    },
  ];
  return new Uint8Array(encodeNetcdf3({
    dimensions: [
      { name: "time", size: o.nTime },
      { name: "lat", size: o.lat.length },
      { name: "lon", size: o.lon.length },
    ],
    attributes: [ncText("Conventions", "CF-1.10"), ncText("title", "constructed test field")],
    variables: vars,
  }));
}

/** Store the NetCDF `bytes` (variable `tas`) as a field through the upload path. */
export function uploadTasField(store: Store, bytes: Uint8Array) {
  return withTempUpload(
    bytes,
    1e9,
    (path) => withNetcdf(path, (src) => storeNetcdfField(src, store, { variable: "tas" })),
  );
}
