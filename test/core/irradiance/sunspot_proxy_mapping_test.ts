import assert from "node:assert/strict";
import { InputError } from "../../../core/errors.ts";
import {
  evaluateSunspotMapping,
  fitSaturatingSunspotMapping,
  fitSunspotMapping,
} from "../../../core/irradiance/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";

// Holland & Vaughn 1984, as Hathaway 2010 eq. 3 (C): F10.7 = 67 + 0.97 R + 17.6 (e^{−0.035R} − 1)
const hollandVaughn = (r: number) => 67 + 0.97 * r + 17.6 * (Math.exp(-0.035 * r) - 1);

Deno.test("Holland–Vaughn check values of shared/SCIENCE.md §3", () => {
  // D: R = 0, 50, 100, 150 → 67.0, 101.0, 146.9, 195.0 sfu
  [[0, 67.0], [50, 101.0], [100, 146.9], [150, 195.0]].forEach(([r, f]) => {
    assert.ok(Math.abs(hollandVaughn(r) - f) < 0.05, `R = ${r}`);
  });
});

Deno.test("fitSunspotMapping() prefers the saturating form for curved data by AIC", () => {
  const s = randomStream(11);
  const r: number[] = [], f: number[] = [];
  for (let i = 0; i < 300; i++) {
    const x = 200 * s.uniform();
    r.push(x);
    f.push(0.15 + 3e-4 * 80 * (1 - Math.exp(-x / 80)) + 2e-4 * s.normal());
  }
  const c = fitSunspotMapping(r, f);
  assert.equal(c.chosen.form, "saturating");
  assert.ok(c.saturating!.aic < c.linear.aic);
  const R0 = c.chosen.coefficients[2], se = c.chosen.standardErrors[2];
  assert.ok(Math.abs(R0 - 80) < 3 * se, `R0 ${R0} ± ${se}`);
});

Deno.test("fitSunspotMapping() keeps the linear form for linear data", () => {
  const s = randomStream(12);
  const r: number[] = [], f: number[] = [];
  for (let i = 0; i < 300; i++) {
    const x = 200 * s.uniform();
    r.push(x);
    f.push(0.15 + 6.5e-5 * x + 2e-4 * s.normal());
  }
  const c = fitSunspotMapping(r, f);
  assert.equal(c.chosen.form, "linear");
  assert.ok(Math.abs(c.chosen.coefficients[1] - 6.5e-5) < 3 * c.chosen.standardErrors[1]);
  // the mapped value's parameter variance grows away from the data centre
  const v = new Float64Array(2), pv = new Float64Array(2);
  evaluateSunspotMapping(c.chosen, [100, 400], v, pv);
  assert.ok(pv[1] > pv[0]);
});

Deno.test("fitSaturatingSunspotMapping() recovers an exact saturating relation", () => {
  const r = Array.from({ length: 30 }, (_, i) => i * 8);
  const f = r.map((x) => 2 + 0.5 * 60 * (1 - Math.exp(-x / 60)));
  const m = fitSaturatingSunspotMapping(r, f);
  assert.ok(Math.abs(m.coefficients[0] - 2) < 1e-6);
  assert.ok(Math.abs(m.coefficients[1] - 0.5) < 1e-6);
  assert.ok(Math.abs(m.coefficients[2] - 60) < 1e-4);
});

Deno.test("sunspot mappings reject too few points and bad values", () => {
  const refused = (field: string, reason: string, index?: number) => (e: unknown) =>
    e instanceof InputError && e.field === field && e.reason === reason && e.index === index;
  assert.throws(() => fitSunspotMapping([1, 2, 3], [1, 2, 3]), refused("r", "too_few_points"));
  assert.throws(
    () => fitSunspotMapping([1, 2, NaN, 4, 5], [1, 2, 3, 4, 5]),
    refused("r", "not_finite", 2),
  );
  assert.throws(
    () => fitSunspotMapping([1, 2, -3, 4, 5], [1, 2, 3, 4, 5]),
    refused("r", "out_of_range", 2),
  );
});

Deno.test("sunspot mappings match scipy curve_fit and numpy polyfit", async () => {
  // fixtures/reference/sunspot_mapping_scipy.py (versions in its JSON)
  const ref = JSON.parse(
    await Deno.readTextFile(
      new URL("../../../fixtures/reference/sunspot_mapping_scipy.json", import.meta.url),
    ),
  );
  const c = fitSunspotMapping(ref.data.R, ref.data.F);
  const sat = c.saturating!, lin = c.linear;
  // different optimisers reach the same least-squares minimum: 1e-5 relative on coefficients,
  // 1e-3 on the Gauss–Newton standard errors (evaluated at slightly different optima)
  ref.saturating.coefficients.forEach((v: number, j: number) => {
    assert.ok(Math.abs(sat.coefficients[j] - v) <= 1e-5 * Math.abs(v), `sat coef ${j}`);
    const se = ref.saturating.standardErrors[j];
    assert.ok(Math.abs(sat.standardErrors[j] - se) <= 1e-3 * se, `sat se ${j}`);
  });
  assert.ok(sat.residualRms ** 2 * sat.n <= ref.saturating.rss * (1 + 1e-9));
  ref.linear.coefficients.forEach((v: number, j: number) => {
    assert.ok(Math.abs(lin.coefficients[j] - v) <= 1e-9 * Math.abs(v), `lin coef ${j}`);
    const se = ref.linear.standardErrors[j];
    assert.ok(Math.abs(lin.standardErrors[j] - se) <= 1e-8 * se, `lin se ${j}`);
  });
  assert.equal(c.chosen.form, "saturating");
});
