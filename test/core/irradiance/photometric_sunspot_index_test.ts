import assert from "node:assert/strict";
import { InputError } from "../../../core/errors.ts";
import {
  dailyPsi,
  groupPsi,
  psiFromTotalArea,
  psiPositionFactor,
  sunspotContrast,
  sunspotDarkening,
  trueAreaFromProjected,
} from "../../../core/irradiance/mod.ts";

/** An InputError on `field` for `reason`. */
const refused = (field: string, reason: string) => (e: unknown) =>
  e instanceof InputError && e.field === field && e.reason === reason;

const SQ = 1360.8; // Kopp & Lean 2011, GRL 38, L01706 (C)

Deno.test("groupPsi() reproduces the worked example of shared/SCIENCE.md §2, all rows", async (t) => {
  // Hudson et al. 1982 form; worked values derived (D) in SCIENCE.md §2, re-derived here
  const mu = Math.cos(Math.PI / 6);
  await t.step("μ and the position factor", () => {
    assert.ok(Math.abs(mu - 0.866025) < 5e-7);
    assert.ok(Math.abs(psiPositionFactor(mu) - 1.991025) < 5e-7);
    assert.equal(psiPositionFactor(1), 2.5);
    assert.equal(psiPositionFactor(0.5), 0.875);
  });
  await t.step("constant contrast 0.32", () => {
    const psi = groupPsi(1000, mu);
    assert.ok(Math.abs(psi - 6.3713e-4) < 5e-9);
    assert.ok(Math.abs(sunspotDarkening(psi, SQ) + 0.8670) < 5e-5);
  });
  await t.step("area-dependent contrast (Brandt, Stix & Weinhardt 1994; from memory, M)", () => {
    const c = sunspotContrast(1000, { kind: "area_dependent" });
    assert.ok(Math.abs(c - 0.2963) < 5e-5);
    const psi = groupPsi(1000, mu, { kind: "area_dependent" });
    assert.ok(Math.abs(psi - 5.8994e-4) < 5e-9);
    assert.ok(Math.abs(sunspotDarkening(psi, SQ) + 0.8028) < 5e-5);
  });
  await t.step("at disc centre", () => {
    const psi = groupPsi(1000, 1);
    assert.ok(Math.abs(psi - 8.0e-4) < 1e-15);
    assert.ok(Math.abs(sunspotDarkening(psi, SQ) + 1.0886) < 5e-5);
  });
});

Deno.test("psiPositionFactor() averages to exactly 1 over μ uniform in [0, 1]", () => {
  // ∫₀¹ μ(3μ + 2)/2 dμ = (1 + 1)/2 = 1 (D); Simpson's rule is exact for a quadratic
  const n = 10;
  let s = 0;
  for (let i = 0; i <= n; i++) {
    const w = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
    s += w * psiPositionFactor(i / n);
  }
  assert.ok(Math.abs(s / (3 * n) - 1) < 1e-14);
  // so the disc-average PSI of a total area equals C·A
  assert.ok(Math.abs(psiFromTotalArea(500) - 0.32 * 500e-6) < 1e-18);
});

Deno.test("trueAreaFromProjected() undoes the foreshortening A_proj = 2μ A_true", () => {
  // SCIENCE.md §2 (D): A_true = A_proj / (2μ)
  const mu = 0.6;
  assert.ok(Math.abs(trueAreaFromProjected(2 * mu * 250, mu) - 250) < 1e-12);
  assert.throws(() => trueAreaFromProjected(10, 0), refused("mu", "out_of_range"));
});

Deno.test("psi functions reject invalid input", () => {
  assert.throws(() => psiPositionFactor(1.2), refused("mu", "out_of_range"));
  assert.throws(() => psiPositionFactor(NaN), refused("mu", "out_of_range"));
  assert.throws(() => groupPsi(-1, 0.5), refused("areaMsh", "out_of_range"));
  assert.throws(
    () => sunspotContrast(0, { kind: "area_dependent" }),
    refused("areaMsh", "out_of_range"),
  );
  assert.throws(() => dailyPsi([1], [10], null), refused("mu", "invalid"));
  assert.throws(() => dailyPsi([1, 2], [10], [1]), refused("areaMsh", "length_mismatch"));
  // the failing record's field and index
  assert.throws(
    () => dailyPsi([1, 1], [10, 10], [1, 2]),
    (e) => e instanceof InputError && e.field === "mu" && e.index === 1 && e.value === 2,
  );
});

Deno.test("dailyPsi() sums groups per day and keeps spotless days at zero", () => {
  const d = dailyPsi([3, 1, 3, 2], [100, 50, 200, 0], [1, 0.5, 0.5, 1]);
  assert.deepEqual([...d.days], [1, 2, 3]);
  assert.deepEqual([...d.groups], [1, 1, 2]);
  assert.ok(Math.abs(d.psi[0] - 0.32 * 50e-6 * 0.875) < 1e-18);
  assert.equal(d.psi[1], 0);
  assert.ok(Math.abs(d.psi[2] - 0.32 * (100e-6 * 2.5 + 200e-6 * 0.875)) < 1e-18);
});
