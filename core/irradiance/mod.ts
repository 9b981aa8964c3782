/**
 * Total solar irradiance: sunspot darkening (Photometric Sunspot Index), disc geometry,
 * sunspot-number → proxy mappings, proxy-model evaluation and calibration with blocked
 * cross-validation, reconstruction with prediction intervals, back-extension with its
 * residual process, extrapolation checks, the optional secular background scenario,
 * radiative forcing and cycle-amplitude checks; spectral irradiance by wavelength band (band
 * checks and integration weights, blackbody coverage, per-band models and their integrals,
 * per-band cycle variability, and the difference from a TSI model). Calendar cells are
 * core/series periods.
 *
 * @module
 */
export * from "./solar_disc_geometry.ts";
export * from "./photometric_sunspot_index.ts";
export * from "./sunspot_proxy_mapping.ts";
export * from "./blocked_cross_validation.ts";
export * from "./proxy_model_evaluation.ts";
export * from "./proxy_model.ts";
export * from "./ar1_mean_variance.ts";
export * from "./proxy_reconstruction.ts";
export * from "./back_extension.ts";
export * from "./extrapolation_checks.ts";
export * from "./secular_background.ts";
export * from "./radiative_forcing.ts";
export * from "./cycle_amplitude.ts";
export * from "./wavelength_bands.ts";
export * from "./blackbody_band_fraction.ts";
export * from "./spectral_band_models.ts";
export * from "./band_cycle_variability.ts";
export * from "./reconstruction_difference.ts";
export * from "./ar1_cell_means.ts";
export * from "./sunspot_number_uncertainty.ts";
export * from "./reconstruction_error_model.ts";
export * from "./proxy_reconstruction_errors.ts";
export * from "./prediction_interval_kernel.ts";
export * from "./reconstruction_ensemble.ts";
export * from "./variance_by_period.ts";
export * from "./lower_triangular_mixing.ts";
export * from "./spectral_band_ensemble.ts";
