/**
 * Gridded fields: area weights and area-weighted means, solar-signal maps with per-cell
 * statistics, field significance by false discovery rate and by Monte Carlo, and composite maps.
 *
 * @module
 */
export * from "./gridded_field.ts";
export * from "./area_weights.ts";
export * from "./area_region.ts";
export * from "./area_weighted_mean.ts";
export * from "./false_discovery_rate.ts";
export * from "./field_analysis_inputs.ts";
export * from "./solar_signal_map.ts";
export * from "./float32_matrix_product.ts";
export * from "./field_monte_carlo_summary.ts";
export * from "./field_significance_monte_carlo.ts";
export * from "./field_composite.ts";
