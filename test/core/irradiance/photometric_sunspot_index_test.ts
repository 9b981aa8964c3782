import assert from "node:assert/strict";
import {
  dailyPsi,
  groupPsi,
  heliographicMu,
  julianDay,
  psiFromTotalArea,
  psiPositionFactor,
  solarDiscGeometry,
  sunspotContrast,
  sunspotDarkening,
  trueAreaFromProjected,
} from "../../../core/irradiance/mod.ts";

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
  assert.throws(() => trueAreaFromProjected(10, 0), /mu must be in \(0, 1\]/);
});

Deno.test("psi functions reject invalid input", () => {
  assert.throws(() => psiPositionFactor(1.2), RangeError);
  assert.throws(() => psiPositionFactor(NaN), RangeError);
  assert.throws(() => groupPsi(-1, 0.5), /area must be ≥ 0/);
  assert.throws(() => sunspotContrast(0, { kind: "area_dependent" }), RangeError);
  assert.throws(() => dailyPsi([1], [10], null), /mu is needed/);
  assert.throws(() => dailyPsi([1, 2], [10], [1]), RangeError);
  assert.throws(() => dailyPsi([1], [10], [2]), /record 0/);
});

Deno.test("dailyPsi() sums groups per day and keeps spotless days at zero", () => {
  const d = dailyPsi([3, 1, 3, 2], [100, 50, 200, 0], [1, 0.5, 0.5, 1]);
  assert.deepEqual([...d.days], [1, 2, 3]);
  assert.deepEqual([...d.groups], [1, 1, 2]);
  assert.ok(Math.abs(d.psi[0] - 0.32 * 50e-6 * 0.875) < 1e-18);
  assert.equal(d.psi[1], 0);
  assert.ok(Math.abs(d.psi[2] - 0.32 * (100e-6 * 2.5 + 200e-6 * 0.875)) < 1e-18);
});

Deno.test("solarDiscGeometry() matches Meeus 1998 example 29.a and the B0 annual cycle", () => {
  // Meeus 1998, Astronomical Algorithms, ex. 29.a (from memory, M): 1992 Oct 13.0
  // P = +26.27°, B0 = +5.99°, L0 = 238.63°
  // (Meeus uses the full VSOP87 solar longitude there; our ch. 25 low-precision longitude
  // is good to ~0.01°, so 0.02° is the tolerance)
  const g = solarDiscGeometry(2448908.5);
  assert.ok(Math.abs(g.pDeg - 26.27) < 0.02);
  assert.ok(Math.abs(g.b0Deg - 5.99) < 0.02);
  assert.ok(Math.abs(g.l0Deg - 238.63) < 0.02);
  // B0 is near 0 in early June and early December and reaches ±7.25° in early March /
  // September (common practice); the maximum never exceeds the inclination 7.25°
  let max = 0;
  for (let d = 0; d < 365; d++) {
    max = Math.max(max, Math.abs(solarDiscGeometry(julianDay(2001 + d / 365)).b0Deg));
  }
  assert.ok(max > 7.2 && max <= 7.25);
  const june = solarDiscGeometry(julianDay(2001 + 156 / 365)).b0Deg; // 6 June
  assert.ok(Math.abs(june) < 0.3);
});

Deno.test("heliographicMu() matches the demo records' μ = cos(lat)·cos(CMD) when B0 = 0", () => {
  // fixtures/demo/spot_groups_2001.json states its μ with B0 = 0 (simplified geometry)
  const demo = JSON.parse(
    Deno.readTextFileSync(new URL("../../../fixtures/demo/spot_groups_2001.json", import.meta.url)),
  ) as { records: { latitude_deg: number; cmd_deg: number; mu: number }[] };
  for (const r of demo.records.slice(0, 200)) {
    assert.ok(Math.abs(heliographicMu(r.latitude_deg, r.cmd_deg, 0) - r.mu) < 1e-4);
  }
  assert.ok(heliographicMu(0, 120) < 0); // behind the limb
});

Deno.test("solarDiscGeometry() agrees with sunpy's B0, P and L0 from 1700 to 2030", () => {
  // fixtures/reference/disc_geometry_sunpy.py (sunpy.coordinates.sun, versions in its JSON).
  // B0 and P: the Meeus ch. 25 low-precision solar longitude is good to ~0.01–0.04°.
  // L0: sunpy follows the IAU rotation model (pole fixed in ICRS) while Meeus ch. 29 refers the
  // node to the ecliptic of date; the two definitions drift apart by ~0.1° per century from
  // 2000, irrelevant for μ (at most 1e-3 change near the limb) but a real difference.
  const ref = JSON.parse(
    Deno.readTextFileSync(
      new URL("../../../fixtures/reference/disc_geometry_sunpy.json", import.meta.url),
    ),
  ) as { rows: { jd: number; b0: number; l0: number; p: number }[] };
  for (const r of ref.rows) {
    const g = solarDiscGeometry(r.jd);
    const years = Math.abs(r.jd - 2451545) / 36525 * 100;
    assert.ok(Math.abs(g.b0Deg - r.b0) < 0.05, `B0 at JD ${r.jd}`);
    assert.ok(Math.abs(g.pDeg - r.p) < 0.05, `P at JD ${r.jd}`);
    let d = Math.abs(g.l0Deg - r.l0) % 360;
    if (d > 180) d = 360 - d;
    assert.ok(d < 0.04 + 0.0011 * years, `L0 at JD ${r.jd}: ${d}`);
  }
});
