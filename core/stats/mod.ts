/**
 * Regression and distribution primitives shared by the analyses: ordinary least squares,
 * regression with AR(1) errors (Prais–Winsten), Newey–West HAC covariance, condition numbers
 * and Student-t / normal / chi-square distribution functions.
 *
 * @module
 */
export * from "./distributions.ts";
export * from "./least_squares_qr.ts";
export * from "./condition_number.ts";
// the design/statistics helpers of ordinary_least_squares.ts are internal to the regressions
export {
  type OlsOptions,
  ordinaryLeastSquares,
  ordinaryLeastSquaresMany,
  type RegressionFit,
} from "./ordinary_least_squares.ts";
export * from "./prais_winsten.ts";
export * from "./newey_west.ts";
export * from "./residual_lag1.ts";
export * from "./multivariate_normal.ts";
export * from "./ensemble_summary.ts";
export * from "./coefficient_of_determination.ts";
export * from "./gram_matrix.ts";
export * from "./residual_cross_correlation.ts";
export * from "./work_arrays.ts";
