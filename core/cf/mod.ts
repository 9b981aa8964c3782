/**
 * The CF/NetCDF layer's pure parts: the NetCDF data model, CF decoding of stored values
 * (mask and scale), a NetCDF-3 writer, CF standard names, and series time axes placed on a
 * target CF calendar. Reading files (I/O) lives in the API layer.
 *
 * @module
 */
export * from "./netcdf_model.ts";
export * from "./cf_mask_and_scale.ts";
export * from "./netcdf3_write.ts";
export * from "./cf_standard_names.ts";
export * from "./calendar_axis.ts";
