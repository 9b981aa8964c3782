import assert from "node:assert/strict";
import { polynomialTrendResiduals } from "../../../core/climate/polynomial_trend_residuals.ts";

Deno.test("polynomialTrendResiduals() removes a least-squares polynomial and keeps gaps", async (t) => {
  await t.step("an exact polynomial of the degree leaves zeros", () => {
    const q = Float64Array.from({ length: 30 }, (_, i) => 2 - 0.3 * i + 0.01 * i * i);
    q[7] = NaN;
    const r = polynomialTrendResiduals(q, 2);
    assert.ok(Number.isNaN(r[7]));
    for (let i = 0; i < 30; i++) if (i !== 7) assert.ok(Math.abs(r[i]) < 1e-12, `${i}: ${r[i]}`);
  });
  await t.step("degree 0 removes the mean of the values present", () => {
    const r = polynomialTrendResiduals(Float64Array.of(1, NaN, 2, 3, 6), 0);
    assert.deepEqual(Array.from(r).map((v) => (Number.isNaN(v) ? null : v)), [-2, null, -1, 0, 3]);
  });
  await t.step("residuals of a linear fit are orthogonal to the constant and the index", () => {
    const x = Float64Array.from({ length: 40 }, (_, i) => Math.sin(i) + 0.05 * i);
    const r = polynomialTrendResiduals(x, 1);
    const s0 = r.reduce((a, v) => a + v, 0), s1 = r.reduce((a, v, i) => a + v * i, 0);
    // normal equations of least squares (Draper & Smith 1998, ch. 5)
    assert.ok(Math.abs(s0) < 1e-10 && Math.abs(s1) < 1e-9, `${s0} ${s1}`);
  });
  await t.step("too few values and a bad degree are refused by name", () => {
    assert.throws(() => polynomialTrendResiduals(Float64Array.of(1, 2, NaN, 3, 4), 1), {
      name: "InputError",
      field: "x",
      reason: "too_few_points",
      value: 4,
    });
    assert.throws(() => polynomialTrendResiduals(new Float64Array(10), 3 as 2), {
      field: "degree",
    });
  });
});
