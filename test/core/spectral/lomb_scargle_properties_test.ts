import assert from "node:assert/strict";
import fc from "fast-check";
import { lombScargle } from "../../../core/spectral/mod.ts";
import { weightedMovingAverage } from "../../../core/cycles/mod.ts";

// Properties that follow from the definitions (Scargle 1982, eq. 10: τ makes the periodogram
// independent of the time origin; the mean is removed; "standard" power is scale-free).
const series = fc.array(
  fc.record({
    dt: fc.double({ min: 0.01, max: 2, noNaN: true }),
    y: fc.double({ min: -100, max: 100, noNaN: true }),
  }),
  { minLength: 8, maxLength: 60 },
).map((pts) => {
  let t = 0;
  return { t: pts.map((p) => (t += p.dt)), y: pts.map((p) => p.y) };
}).filter(({ y }) => Math.max(...y) - Math.min(...y) > 1e-3);
const freqs = [0.05, 0.13, 0.31, 0.77];

Deno.test("lombScargle() is unchanged by a time shift, an added constant and a scale factor", () => {
  fc.assert(
    fc.property(
      series,
      fc.double({ min: -500, max: 500, noNaN: true }),
      fc.double({ min: -50, max: 50, noNaN: true }),
      fc.double({ min: 0.1, max: 10, noNaN: true }),
      ({ t, y }, shift, offset, scale) => {
        const p0 = lombScargle(t, y, freqs, { normalization: "standard" });
        const p1 = lombScargle(
          t.map((x) => x + shift),
          y.map((v) => scale * v + offset),
          freqs,
          { normalization: "standard" },
        );
        for (let k = 0; k < freqs.length; k++) {
          assert.ok(Math.abs(p0[k] - p1[k]) < 1e-7, `k ${k}: ${p0[k]} vs ${p1[k]}`);
          assert.ok(p0[k] >= -1e-12 && p0[k] <= 1 + 1e-9);
        }
      },
    ),
    { numRuns: 200, seed: 7 },
  );
});

Deno.test("weightedMovingAverage() is linear where its windows are complete", () => {
  fc.assert(
    fc.property(
      fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 15, maxLength: 80 }),
      fc.double({ min: -5, max: 5, noNaN: true }),
      fc.double({ min: -5, max: 5, noNaN: true }),
      (x, a, b) => {
        const w = [0.5, 1, 1, 1, 0.5];
        const y = x.map((v, i) => Math.sin(i) * 10 + v / 2);
        const lhs = weightedMovingAverage(x.map((v, i) => a * v + b * y[i]), w);
        const sx = weightedMovingAverage(x, w), sy = weightedMovingAverage(y, w);
        for (let i = 2; i < x.length - 2; i++) {
          assert.ok(Math.abs(lhs[i] - (a * sx[i] + b * sy[i])) < 1e-8 * (1 + Math.abs(lhs[i])));
        }
      },
    ),
    { numRuns: 200, seed: 11 },
  );
});
