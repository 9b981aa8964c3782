import assert from "node:assert/strict";
import { praisWinsten } from "../../../core/stats/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { assertClose, proxyCase, rRef, smRef } from "./regression_fixtures.ts";

Deno.test("praisWinsten() matches iterated statsmodels GLS with AR(1) covariance", () => {
  // statsmodels GLS(sigma = ρ^|i−j|) iterated on the same ρ estimator,
  // fixtures/reference/regression_statsmodels.py (versions in its JSON)
  const ref = smRef.proxy_prais_winsten;
  const d = proxyCase();
  const fit = praisWinsten([d.facular, d.spsi], d.tsi, { tolerance: 1e-12 });
  assert.ok(fit.converged);
  assert.ok(Math.abs(fit.rho - ref.rho) < 1e-8, `rho ${fit.rho} vs ${ref.rho}`);
  assertClose(fit.coefficients, ref.coefficients, 1e-9, "coefficients");
  assertClose(fit.standardErrors, ref.standardErrors, 1e-6, "standard errors");
});

Deno.test("praisWinsten() agrees with R arima(xreg) maximum likelihood to a fraction of an SE", () => {
  // R arima(tsi, c(1,0,0), xreg, method = "ML") (fixtures/reference/regression_r.R): a
  // different estimator of the same model, so agreement is within 0.1 SE, not to digits
  const ar = rRef.proxy.arima;
  const d = proxyCase();
  const fit = praisWinsten([d.facular, d.spsi], d.tsi);
  assert.ok(Math.abs(fit.rho - ar.coefficients[0]) < 0.1 * ar.standardErrors[0]);
  for (let j = 0; j < 3; j++) {
    const diff = Math.abs(fit.coefficients[j] - ar.coefficients[j + 1]);
    assert.ok(diff < 0.1 * ar.standardErrors[j + 1], `coef ${j}: diff ${diff}`);
    const seRatio = fit.standardErrors[j] / ar.standardErrors[j + 1];
    assert.ok(seRatio > 0.95 && seRatio < 1.05, `se ratio ${seRatio}`);
  }
  // ML maximises the same exact AR(1) likelihood, so it can only be higher, and barely
  assert.ok(fit.logLikelihood <= ar.loglik + 1e-6);
  assert.ok(ar.loglik - fit.logLikelihood < 0.05);
  // statsmodels GLSAR (Cochrane–Orcutt, Yule–Walker ρ) is close too
  const gl = smRef.proxy_glsar;
  assert.ok(Math.abs(fit.rho - gl.rho) < 0.01);
});

Deno.test("praisWinsten() recovers the generator of the constructed case within 95 % intervals", () => {
  const truth = rRef.proxy.truth;
  const d = proxyCase();
  const fit = praisWinsten([d.facular, d.spsi], d.tsi);
  // intercept = S_Q − a·F_Q, slope on facular = a, slope on S_Q·PSI = −b
  const want = [truth.SQ - truth.a * truth.FQ, truth.a, -truth.b];
  want.forEach((w, j) => {
    assert.ok(fit.lower[j] <= w && w <= fit.upper[j], `coef ${j}: ${w} not in CI`);
  });
});

Deno.test("praisWinsten() on white noise keeps ρ near 0 and β near OLS", () => {
  const n = 500, x = new Float64Array(n), y = new Float64Array(n);
  const rs = randomStream(7);
  for (let t = 0; t < n; t++) {
    x[t] = t / n;
    y[t] = 2 + 3 * x[t] + 0.1 * rs.normal();
  }
  const fit = praisWinsten([x], y);
  // |ρ̂| of white noise is about 1/√n = 0.045: 4 standard errors (common practice)
  assert.ok(Math.abs(fit.rho) < 0.18);
  assert.ok(Math.abs(fit.coefficients[1] - 3) < 0.1);
});

Deno.test("praisWinsten() rejects too few points", () => {
  const x = new Float64Array([1, 2, 3]);
  assert.throws(() => praisWinsten([x], new Float64Array([1, 2, 4])), {
    name: "InputError",
    field: "y",
    reason: "too_few_points",
    value: 3,
  });
});
