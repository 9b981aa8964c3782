/**
 * The NetCDF file layer of the API: open NetCDF-3 and NetCDF-4 files (from a path, or an upload
 * streamed to a temporary file), list their variables in CF terms, read CF time axes, series
 * and (time, lat, lon) grids in blocks, build CF datasets of series (and ensembles) for the
 * writer in core/cf, and the HTTP pieces (negotiation, `calendar`, problems). The pure parts
 * (CF time, mask and scale, the NetCDF-3 writer, calendar axes) are in core/time and core/cf.
 *
 * @module
 */
export { openNetcdf, withNetcdf, withTempUpload } from "./open.ts";
export type { NetcdfHeader, NetcdfSource, StoredValues } from "./source.ts";
export { MAX_READ_VALUES, variableOf } from "./source.ts";
export { type NetcdfFormat } from "./detect.ts";
export { NetcdfError, type NetcdfErrorCode } from "./errors.ts";
export { NETCDF4_TIMEOUT_SECONDS, stopNetcdf4Worker } from "./netcdf4_source.ts";
export {
  type CfVariableSummary,
  isTimeCoordinate,
  listCfVariables,
  packingOf,
  timeDimensionOf,
} from "./cf_variables.ts";
export {
  type CfPlacedTimeAxis,
  type CfTimeAxis,
  describePlacement,
  placeCfTimeAxis,
  readCfTimeAxis,
  type TimePlacement,
} from "./cf_time_axis.ts";
export { type CfSeries, type CfSeriesOptions, readCfSeries } from "./cf_series.ts";
export { type CfGrid, type CfGridBlock, describeCfGrid, readCfGridBlocks } from "./cf_grid.ts";
export {
  buildSeriesDataset,
  CF_CONVENTIONS,
  type CfTimeAxisVariables,
  cfVariableName,
  type EnsembleSource,
  type Provenance,
  type SeriesDatasetOptions,
  type SeriesLike,
  STANDING_CAUTIONS,
  TIME_REFERENCE,
  timeAxisOf,
} from "./series_dataset.ts";
export { buildSpectrumDataset, SPECTRAL_IRRADIANCE_STANDARD_NAME } from "./spectrum_dataset.ts";
export {
  CalendarQuery,
  cfTimeProblem,
  isNetcdfMediaType,
  NETCDF_CONTENT,
  NETCDF_MEDIA_TYPE,
  netcdfProblem,
  runOutputNetcdfResponse,
  runSpectrumNetcdfResponse,
  seriesNetcdfResponse,
  wantsNetcdf,
} from "./http.ts";
