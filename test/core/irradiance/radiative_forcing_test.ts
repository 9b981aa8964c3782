import assert from "node:assert/strict";
import { InputError } from "../../../core/errors.ts";
import { forcingSeries, radiativeForcing } from "../../../core/irradiance/mod.ts";

Deno.test("radiativeForcing() reproduces the IPCC AR6 conversion", () => {
  // IPCC AR6 WG1 §7.3.4.4 (C): ΔF = ΔTSI (1 − α)/4, α = 0.29; D: 1 W m-2 → 0.1775
  assert.ok(Math.abs(radiativeForcing(1) - 0.1775) < 1e-12);
  // arithmetic without any model: −4.5 W m-2 dip (Chapman et al. 2004 size) → −0.79875
  assert.ok(Math.abs(radiativeForcing(-4.5) + 0.79875) < 1e-12);
  assert.ok(Math.abs(radiativeForcing(1, 0.3) - 0.175) < 1e-12);
  // a solar-cycle amplitude of ~1.1 W m-2 gives ~0.2 W m-2 (IPCC AR4 §6.6.3.1, C)
  assert.ok(Math.abs(radiativeForcing(1.1) - 0.2) < 0.01);
});

Deno.test("radiativeForcing() rejects NaN and bad albedo", () => {
  const refused = (field: string) => (e: unknown) => e instanceof InputError && e.field === field;
  assert.throws(() => radiativeForcing(NaN), refused("deltaTsi"));
  assert.throws(() => radiativeForcing(1, 1), refused("albedo"));
  assert.throws(() => radiativeForcing(1, -0.1), refused("albedo"));
});

Deno.test("forcingSeries() references the period mean and carries uncertainty", () => {
  const t = [2000.5, 2001.5, 2002.5, 2003.5];
  const tsi = [1361, 1361.2, 1362, NaN];
  const sd = [0.1, 0.3, 0.2, 0.2];
  const f = forcingSeries(t, tsi, sd, { start: 2000, end: 2002 });
  assert.ok(Math.abs(f.referenceTsi - 1361.1) < 1e-12);
  assert.equal(f.referencePoints, 2);
  assert.ok(Math.abs(f.value[2] - 0.9 * 0.1775) < 1e-12);
  assert.ok(Number.isNaN(f.value[3]));
  // independent errors: Var(x − m̄) = σ² + Σσ_ref²/n² − 2σ²/n inside the reference
  const refVar = (0.01 + 0.09) / 4;
  assert.ok(Math.abs(f.referenceSd! - Math.sqrt(refVar)) < 1e-12);
  assert.ok(Math.abs(f.sd![2] - 0.1775 * Math.sqrt(0.04 + refVar)) < 1e-12);
  assert.ok(Math.abs(f.sd![0] - 0.1775 * Math.sqrt(0.01 + refVar - 0.01)) < 1e-12);
  assert.throws(
    () => forcingSeries(t, tsi, null, { start: 1900, end: 1910 }),
    (e) => e instanceof InputError && e.field === "reference" && e.reason === "no_overlap",
  );
});
