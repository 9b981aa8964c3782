/**
 * Series vocabulary and operations: quantities and units, the calendar layer (period keys and
 * bounds, spans with exclusive ends, period means with stated coverage rules), resampling,
 * anomalies relative to a base period, and alignment on a common axis.
 *
 * @module
 */
export * from "./quantities.ts";
export * from "./period_key.ts";
export * from "./period_means.ts";
export * from "./resample_means.ts";
export * from "./anomalies_from_base_period.ts";
export * from "./annual_cycle_share.ts";
export * from "./align_series.ts";
export * from "./sunspot_number_versions.ts";
export * from "./longest_complete_run.ts";
