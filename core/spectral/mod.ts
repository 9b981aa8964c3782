/**
 * Spectral analysis: Fourier transforms, periodograms, false-alarm probabilities and peaks.
 *
 * @module
 */
export * from "./complex_dft_plan.ts";
export * from "./fft.ts";
export * from "./period_grid.ts";
export * from "./lomb_scargle.ts";
export * from "./false_alarm.ts";
export * from "./fft_periodogram.ts";
export * from "./spectral_peaks.ts";
export * from "./sampling_interval.ts";
export * from "./monte_carlo_peak_tests.ts";
export * from "./period_band.ts";
