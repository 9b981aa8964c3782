import assert from "node:assert/strict";
import { heliographicMu, julianDay, solarDiscGeometry } from "../../../core/irradiance/mod.ts";

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
