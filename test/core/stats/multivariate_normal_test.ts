import assert from "node:assert/strict";
import { choleskyLower, drawMultivariateNormal, ensembleSummary } from "../../../core/stats/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { InputError } from "../../../core/errors.ts";

Deno.test("drawMultivariateNormal() recovers mean and covariance of N(μ, Σ)", () => {
  const mean = [1360.8, 135, 0.96];
  const cov = [[1e-3, 2e-3, -1e-5], [2e-3, 9, 1e-4], [-1e-5, 1e-4, 4e-4]];
  const L = choleskyLower(cov);
  // LLᵀ = Σ (definition of the Cholesky factor)
  for (let a = 0; a < 3; a++) {
    for (let b = 0; b < 3; b++) {
      const s = L[a].reduce((acc, v, k) => acc + v * L[b][k], 0);
      assert.ok(Math.abs(s - cov[a][b]) < 1e-15 + 1e-12 * Math.abs(cov[a][b]));
    }
  }
  const n = 40_000, s = randomStream(11);
  const x = Array.from({ length: n }, () => drawMultivariateNormal(mean, L, s));
  const m = mean.map((_, a) => x.reduce((acc, v) => acc + v[a], 0) / n);
  for (let a = 0; a < 3; a++) {
    // 5 standard errors of a sample mean (common practice)
    assert.ok(Math.abs(m[a] - mean[a]) < 5 * Math.sqrt(cov[a][a] / n));
    for (let b = 0; b < 3; b++) {
      const c = x.reduce((acc, v) => acc + (v[a] - m[a]) * (v[b] - m[b]), 0) / (n - 1);
      const se = Math.sqrt((cov[a][a] * cov[b][b] + cov[a][b] ** 2) / n);
      assert.ok(Math.abs(c - cov[a][b]) < 5 * se, `cov[${a}][${b}] ${c} vs ${cov[a][b]}`);
    }
  }
});

Deno.test("choleskyLower() refuses non-finite and indefinite matrices, passes a zero matrix", () => {
  const refused = (e: unknown) => e instanceof InputError && e.field === "covariance";
  assert.throws(() => choleskyLower([[1, NaN], [NaN, 1]]), refused);
  assert.throws(() => choleskyLower([[1, 2], [2, 1]]), refused);
  assert.throws(() => choleskyLower([[1, 0]]), refused);
  assert.deepEqual(choleskyLower([[0, 0], [0, 0]]), [[0, 0], [0, 0]]);
  assert.throws(
    () => drawMultivariateNormal([0, 0], [[1]], randomStream(1)),
    (e) => e instanceof InputError && e.field === "lower",
  );
});

Deno.test("ensembleSummary() agrees with R's mean, sd and type-7 quantiles", () => {
  // R 4.2.2 (r-base-core): x <- c(3, 1, 4, 1, 5, 9, 2, 6); mean 3.875, sd 2.748376,
  // quantile(x, c(0.025, 0.975)) = 1.000, 8.475
  const x = [3, 1, 4, 1, 5, 9, 2, 6];
  const s = ensembleSummary(Float64Array.from(x), 8);
  assert.ok(Math.abs(s.mean[0] - 3.875) < 1e-12);
  assert.ok(Math.abs(s.sd[0] - 2.748376) < 1e-6);
  assert.ok(Math.abs(s.lower[0] - 1) < 1e-12 && Math.abs(s.upper[0] - 8.475) < 1e-12);
  const g = ensembleSummary(Float64Array.of(1, NaN, 2, 3), 2);
  assert.ok(Number.isNaN(g.mean[1]) && g.mean[0] === 1.5);
  assert.throws(
    () => ensembleSummary(Float64Array.of(1, 2, 3), 2),
    (e) => e instanceof InputError && e.field === "members",
  );
  assert.throws(() => ensembleSummary(Float64Array.of(1), 0), InputError);
});
