import assert from "node:assert/strict";
import {
  HATHAWAY_C,
  hathawayAmplitudeFor,
  hathawayMaximum,
  hathawayPeak,
  hathawayRiseMonths,
  hathawayShape,
  hathawayWidth,
  waldmeierRiseMonths,
} from "../../../core/cycles/mod.ts";

Deno.test("hathawayPeak() matches the peak identity x* = 1.081, g(x*) = 0.5038", async (t) => {
  // SCIENCE.md §6 (D): x^3/(exp(x^2) − 0.71) peaks at 0.5038 at x = 1.081.
  const { x, g } = hathawayPeak(0.71);
  assert.ok(Math.abs(x - 1.081) < 5e-4, `x* = ${x}`);
  assert.ok(Math.abs(g - 0.5038) < 5e-5, `g(x*) = ${g}`);

  await t.step("agrees with a brute-force grid maximum", () => {
    // independent check: dense grid search on g(x) = x^3/(exp(x^2) − c)
    let bestX = 0, bestG = -Infinity;
    for (let i = 1; i <= 300_000; i++) {
      const xi = i * 1e-5;
      const gi = xi ** 3 / (Math.exp(xi * xi) - HATHAWAY_C);
      if (gi > bestG) [bestX, bestG] = [xi, gi];
    }
    assert.ok(Math.abs(bestX - x) < 2e-5);
    assert.ok(Math.abs(bestG - g) < 1e-9);
  });

  await t.step("c = 0 gives the closed form x* = sqrt(1.5)", () => {
    // derivative of x^3 exp(−x^2) vanishes at 3 = 2x^2 (D)
    assert.ok(Math.abs(hathawayPeak(0).x - Math.sqrt(1.5)) < 1e-12);
  });

  await t.step("rejects c outside [0, 1)", () => {
    assert.throws(() => hathawayPeak(1), RangeError);
    assert.throws(() => hathawayPeak(-0.1), RangeError);
    assert.throws(() => hathawayPeak(NaN), RangeError);
  });
});

Deno.test("hathawayShape() peaks at t0 + x* b with F_max = 0.5038 a b^3", async (t) => {
  const a = 0.003, t0 = 12, b = hathawayWidth(a);
  const fMax = hathawayMaximum(a);
  // SCIENCE.md §6 (D): F_max = 0.5038 a b^3
  assert.ok(Math.abs(fMax / (a * b ** 3) - 0.5038) < 5e-5);
  let best = -Infinity, bestT = 0;
  for (let k = 0; k <= 20_000; k++) {
    const tk = t0 + k * 0.01;
    const f = hathawayShape(tk, { t0, a });
    if (f > best) [best, bestT] = [f, tk];
  }
  assert.ok(Math.abs(best - fMax) < 1e-6 * fMax);
  assert.ok(Math.abs(bestT - t0 - hathawayRiseMonths(a)) < 0.011);

  await t.step("is zero before and at t0, and decays without NaN far after", () => {
    assert.equal(hathawayShape(t0 - 1, { t0, a }), 0);
    assert.equal(hathawayShape(t0, { t0, a }), 0);
    assert.equal(hathawayShape(t0 + 1e6, { t0, a }), 0);
  });

  await t.step("rejects non-finite times and non-positive a or b", () => {
    assert.throws(() => hathawayShape(NaN, { t0, a }), RangeError);
    assert.throws(() => hathawayShape(1, { t0: Infinity, a }), RangeError);
    assert.throws(() => hathawayShape(1, { t0, a: 0 }), RangeError);
    assert.throws(() => hathawayShape(1, { t0, a, b: -1 }), RangeError);
    assert.throws(() => hathawayShape(1, { t0, a, c: 1.2 }), RangeError);
  });
});

Deno.test("hathawayWidth() follows b = 27.12 + 25.15/(a·1e3)^(1/4) (from memory)", () => {
  // SCIENCE.md §6 (M, from memory): arithmetic re-derived here
  assert.ok(Math.abs(hathawayWidth(16e-3) - (27.12 + 25.15 / 2)) < 1e-12);
  assert.throws(() => hathawayWidth(0), RangeError);
  assert.throws(() => hathawayWidth(Infinity), RangeError);
});

Deno.test("hathawayAmplitudeFor() inverts hathawayMaximum()", () => {
  for (const m of [10, 100, 150, 200, 300]) {
    assert.ok(Math.abs(hathawayMaximum(hathawayAmplitudeFor(m)) - m) < 1e-9 * m);
  }
  assert.throws(() => hathawayAmplitudeFor(0), RangeError);
});

Deno.test("hathawayRiseMonths() with b(a) shows the Waldmeier effect of Hathaway 2010 eq. 7", () => {
  // Rise times from the shape function with the width b(a) (from memory), for cycles whose
  // maxima are 100, 150, 200 (V1), against rise ≈ 35 + 1800/amplitude (Hathaway 2010,
  // Living Rev. Sol. Phys. 7, 1, eq. 7; C). Computed here: 53.3, 50.0, 47.9 months from the
  // shape function; 53.0, 47.0, 44.0 from the relation. The shape function's rise is counted
  // from t0, which precedes the smoothed minimum, and the relation is a fit with scatter of
  // several months, so the two are compared to 10 % and for the same ordering.
  const rows = [100, 150, 200].map((m) => ({
    m,
    shape: hathawayRiseMonths(hathawayAmplitudeFor(m)),
    waldmeier: waldmeierRiseMonths(m),
  }));
  assert.deepEqual(rows.map((r) => r.waldmeier), [53, 47, 44]);
  const expectedShape = [53.29, 49.95, 47.94]; // derived by this code, recorded above
  rows.forEach((r, i) => {
    assert.ok(Math.abs(r.shape - expectedShape[i]) < 0.01, `${r.m}: ${r.shape}`);
    assert.ok(Math.abs(r.shape - r.waldmeier) / r.waldmeier < 0.1, `${r.m}: ${JSON.stringify(r)}`);
  });
  assert.ok(rows[0].shape > rows[1].shape && rows[1].shape > rows[2].shape);
  assert.throws(() => waldmeierRiseMonths(0), RangeError);
});
