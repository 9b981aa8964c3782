/**
 * `deno bench` for the NetCDF layer (means per iteration): writing a daily series with its
 * calendar axis, encoding a member row, and reading a NetCDF-3 file back. The side-by-side with
 * xarray is test/bench/netcdf_medians.ts.
 */
import { buildSeriesDataset } from "../../api/netcdf/series_dataset.ts";
import { encodeNetcdf3, encodeValues } from "../../core/cf/netcdf3_write.ts";
import { openNetcdf } from "../../api/netcdf/open.ts";
import { cfDateFromDayNumber, decimalYear } from "../../core/time/mod.ts";

const DAYS = 119_000;
const time = Float64Array.from({ length: DAYS }, (_, j) => {
  const c = cfDateFromDayNumber("proleptic_gregorian", -98000 + j);
  return decimalYear(c.year, c.month, c.day, 0.5);
});
const value = Float64Array.from(time, (_, j) => 1361 + 0.5 * Math.sin((2 * Math.PI * j) / 4018));
const prov = { title: "bench", history: [], references: [], warnings: [], cautions: [] };
const series = {
  name: "TSI (bench)",
  quantity: "tsi",
  units: "W m-2",
  time,
  value,
  resolution: "daily" as const,
};
const bytes = encodeNetcdf3(buildSeriesDataset(series, prov, { calendar: "noleap" }).dataset);
const path = await Deno.makeTempFile({ suffix: ".nc" });
await Deno.writeFile(path, bytes);
const row = Float32Array.from(value);

Deno.bench("NetCDF-3: daily series 1700–2025 on noleap, built and encoded", () => {
  encodeNetcdf3(buildSeriesDataset(series, prov, { calendar: "noleap" }).dataset);
});

Deno.bench("NetCDF-3: one ensemble member row (119,000 float32) to big-endian bytes", () => {
  encodeValues(row, "float");
});

Deno.bench("NetCDF-3: open the daily file and read its variables", async () => {
  const src = await openNetcdf(path);
  for (const v of src.header.variables) await src.read(v.name);
  await src.close();
});
