/**
 * Solar–climate linkage: lagged correlation with effective sample size and surrogate
 * significance, attribution regression, composites and energy-balance response.
 *
 * @module
 */
export * from "./preprocess_series.ts";
export * from "./lag1_autocorrelation.ts";
export * from "./effective_sample_size.ts";
export * from "./correlation_tests.ts";
export * from "./lagged_correlation.ts";
export * from "./surrogates.ts";
export * from "./surrogate_lag_test.ts";
export * from "./energy_balance.ts";
export * from "./superposed_epoch.ts";
export * from "./attribution_regression.ts";
export * from "./polynomial_trend_residuals.ts";
export * from "./lag_search_surrogate_test.ts";
