/**
 * Blackbody band fractions against scipy's quadrature of Planck's law
 * (fixtures/reference/blackbody_fraction_scipy.py, versions in the JSON).
 */
import assert from "node:assert/strict";
import { blackbodyBandFraction } from "../../../core/irradiance/mod.ts";

const ref = JSON.parse(
  await Deno.readTextFile(
    new URL("../../../fixtures/reference/blackbody_fraction_scipy.json", import.meta.url),
  ),
);

Deno.test("blackbodyBandFraction() agrees with scipy.integrate.quad of Planck's law to 1e-10", () => {
  for (const c of ref.cases) {
    const got = blackbodyBandFraction(c.lower_nm, c.upper_nm ?? Infinity, c.temperature_k);
    assert.ok(
      Math.abs(got - c.fraction) < 1e-10,
      `${c.lower_nm}–${c.upper_nm} nm at ${c.temperature_k} K: ${got} vs ${c.fraction}`,
    );
  }
});

Deno.test("blackbodyBandFraction() adds up over adjacent bands and refuses bad bounds", () => {
  const parts = [0, 300, 1000, 1440, 2500, Infinity];
  let s = 0;
  for (let i = 1; i < parts.length; i++) s += blackbodyBandFraction(parts[i - 1], parts[i]);
  assert.ok(Math.abs(s - 1) < 1e-13);
  assert.throws(() => blackbodyBandFraction(500, 400), { field: "upper" });
  assert.throws(() => blackbodyBandFraction(-1, 400), { field: "lower" });
  assert.throws(() => blackbodyBandFraction(400, 500, 0), { field: "temperature" });
});
