import assert from "node:assert/strict";
import { ordinaryLeastSquares } from "../../../core/stats/mod.ts";
import { assertClose, proxyCase, readLongley, rRef } from "./regression_fixtures.ts";

Deno.test("ordinaryLeastSquares() matches R lm on longley", () => {
  // R lm(Employed ~ ., longley), script fixtures/reference/regression_r.R (R version in JSON)
  const ref = rRef.longley;
  const { names, x, employed } = readLongley();
  const fit = ordinaryLeastSquares(x, employed, { names });
  assert.deepEqual(fit.names, ["intercept", ...names]);
  // longley's κ is 2.4e7: R and we both use Householder QR; 1e-8 relative is what QR keeps
  assertClose(fit.coefficients, ref.coefficients, 1e-8, "coefficients");
  assertClose(fit.standardErrors, ref.standardErrors, 1e-8, "standard errors");
  assertClose(fit.tValues, ref.tValues, 1e-8, "t values");
  assertClose(fit.pValues, ref.pValues, 1e-6, "p values");
  fit.covariance.forEach((row, i) => assertClose(row, ref.covariance[i], 1e-7, `cov row ${i}`));
  assertClose(fit.lower, ref.confint95.map((r) => r[0]), 1e-8, "lower 95 %");
  assertClose(fit.upper, ref.confint95.map((r) => r[1]), 1e-8, "upper 95 %");
  assertClose(
    [fit.sigma, fit.rSquared, fit.adjRSquared, fit.logLikelihood, fit.aic, fit.bic],
    [ref.sigma, ref.rSquared, ref.adjRSquared, ref.logLik, ref.aic, ref.bic],
    1e-9,
    "sigma, R², adj R², logLik, AIC, BIC",
  );
  // R kappa(model.matrix, exact = TRUE)
  assertClose([fit.conditionNumber], [ref.kappaExact], 1e-6, "condition number");
});

Deno.test("ordinaryLeastSquares() matches R lm on the constructed proxy case", () => {
  const ref = rRef.proxy.lm;
  const d = proxyCase();
  const fit = ordinaryLeastSquares([d.facular, d.spsi], d.tsi);
  assertClose(fit.coefficients, ref.coefficients, 1e-10, "coefficients");
  assertClose(fit.standardErrors, ref.standardErrors, 1e-8, "standard errors");
  assertClose(
    [fit.sigma, fit.rSquared, fit.adjRSquared, fit.aic, fit.bic],
    [ref.sigma, ref.rSquared, ref.adjRSquared, ref.aic, ref.bic],
    1e-9,
    "fit statistics",
  );
  assertClose([fit.conditionNumber], [ref.kappaExact], 1e-6, "condition number");
  // residual RMS = sigma √((n − p)/n) by definition
  assert.ok(Math.abs(fit.residualRms - fit.sigma * Math.sqrt((fit.n - fit.p) / fit.n)) < 1e-12);
});

Deno.test("ordinaryLeastSquares() without intercept uses the uncentred R² (as R)", () => {
  const x = new Float64Array([1, 2, 3, 4]);
  const y = new Float64Array([2, 4.1, 5.9, 8.2]);
  const fit = ordinaryLeastSquares([x], y, { intercept: false });
  // hand arithmetic: β = Σxy/Σx² = 60.7/30
  assert.ok(Math.abs(fit.coefficients[0] - 60.7 / 30) < 1e-12);
  const rss = fit.rss, tss = 4 + 4.1 ** 2 + 5.9 ** 2 + 8.2 ** 2;
  assert.ok(Math.abs(fit.rSquared - (1 - rss / tss)) < 1e-12);
});

Deno.test("ordinaryLeastSquares() rejects bad input with InputError naming the argument", async (t) => {
  const x = new Float64Array([1, 2, 3, 4, 5]);
  const y = new Float64Array([1, 2, 3, 4, 6]);
  await t.step("NaN in y", () => {
    assert.throws(
      () => ordinaryLeastSquares([x], new Float64Array([1, NaN, 3, 4, 5])),
      { name: "InputError", field: "y", reason: "not_finite", index: 1 },
    );
  });
  await t.step("Infinity in a column", () => {
    assert.throws(
      () => ordinaryLeastSquares([x, new Float64Array([1, 2, Infinity, 4, 5])], y),
      { field: "columns", reason: "not_finite", index: 1, value: Infinity },
    );
  });
  await t.step("length mismatch", () => {
    assert.throws(() => ordinaryLeastSquares([x.subarray(0, 4)], y), {
      field: "columns",
      reason: "length_mismatch",
      index: 0,
    });
  });
  await t.step("too few points", () => {
    assert.throws(
      () => ordinaryLeastSquares([x.subarray(0, 2)], y.subarray(0, 2)),
      { field: "y", reason: "too_few_points", value: 2 },
    );
  });
  await t.step("collinear columns", () => {
    const twice = x.map((v) => 2 * v);
    // design column 2 (after the intercept and x) is collinear with those before it
    assert.throws(() => ordinaryLeastSquares([x, twice], y), {
      field: "columns",
      reason: "collinear",
      index: 2,
    });
  });
  await t.step("constant regressor with intercept", () => {
    assert.throws(() => ordinaryLeastSquares([new Float64Array(5).fill(3)], y), {
      reason: "collinear",
    });
  });
  await t.step("empty input", () => {
    assert.throws(() => ordinaryLeastSquares([], new Float64Array(0)), {
      field: "y",
      reason: "too_few_points",
    });
  });
});
