import assert from "node:assert/strict";
import { neweyWest, neweyWestDefaultLag, ordinaryLeastSquares } from "../../../core/stats/mod.ts";
import { assertClose, proxyCase, readLongley, smRef } from "./regression_fixtures.ts";

Deno.test("neweyWest() matches statsmodels cov_type=HAC on the proxy case", () => {
  // statsmodels OLS.fit(cov_type="HAC", maxlags=L, use_correction=True),
  // fixtures/reference/regression_statsmodels.py
  const ref = smRef.proxy_hac;
  const d = proxyCase();
  const ols = ordinaryLeastSquares([d.facular, d.spsi], d.tsi);
  assert.equal(neweyWestDefaultLag(ols.n), ref.maxlags);
  const nw = neweyWest(ols);
  assertClose(nw.standardErrors, ref.standardErrors, 1e-8, "HAC SE");
  nw.covariance.forEach((row, i) => assertClose(row, ref.covariance[i], 1e-7, `cov ${i}`));
  assertClose(nw.pValues, ref.pValues, 1e-6, "HAC p", 1e-12);
});

Deno.test("neweyWest() matches statsmodels HAC on longley", () => {
  const ref = smRef.longley_hac;
  const { x, employed } = readLongley();
  const nw = neweyWest(ordinaryLeastSquares(x, employed), { maxLags: ref.maxlags });
  assertClose(nw.standardErrors, ref.standardErrors, 1e-6, "HAC SE longley");
});

Deno.test("neweyWest() rejects a lag outside [0, n − 1]", () => {
  const x = new Float64Array([1, 2, 3, 4, 5]);
  const fit = ordinaryLeastSquares([x], new Float64Array([1, 3, 2, 5, 4]));
  assert.throws(() => neweyWest(fit, { maxLags: 5 }), {
    name: "InputError",
    field: "maxLags",
    reason: "out_of_range",
    value: 5,
  });
  assert.throws(() => neweyWest(fit, { maxLags: 1.5 }), { field: "maxLags", value: 1.5 });
});
