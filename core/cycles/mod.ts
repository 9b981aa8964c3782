/**
 * Solar cycles: shape functions, timing and amplitudes.
 *
 * @module
 */
export * from "./hathaway_shape.ts";
export * from "./regular_grid.ts";
export * from "./weighted_moving_average.ts";
export * from "./smoothed_13_month.ts";
export * from "./running_mean.ts";
export * from "./gaussian_smoother.ts";
export * from "./cycle_extrema.ts";
export * from "./cycle_table.ts";
export * from "./cycle_phase.ts";
export * from "./cycle_shape_fit.ts";
export * from "./cycle_forecast.ts";
export * from "./cycle_hindcast.ts";
export * from "./cycle_sequence_fit.ts";
export * from "./waldmeier_relation.ts";
export * from "./cycle_statistics.ts";
export * from "./cycle_windows.ts";
export * from "./next_minimum.ts";
export * from "./hindcast_interval.ts";
export * from "./past_cycles.ts";
export * from "./version_one_scale.ts";
