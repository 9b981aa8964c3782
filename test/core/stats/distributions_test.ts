import assert from "node:assert/strict";
import {
  chiSquareCdf,
  normalCdf,
  normalQuantile,
  tCdf,
  tQuantile,
} from "../../../core/stats/mod.ts";

Deno.test("distribution wrappers match R's pt/qt/pnorm/qnorm/pchisq", () => {
  // R 4.2.2 (Debian r-base-core), Rscript -e 'options(digits=10); qt(0.975,3); pt(-1.5,7);
  // qnorm(0.995); pchisq(10,4)' → 3.18244630528 0.08864924349 2.57582930355 0.95957231801
  assert.ok(Math.abs(tQuantile(0.975, 3) - 3.18244630528) < 1e-9);
  assert.ok(Math.abs(tCdf(-1.5, 7) - 0.08864924349) < 1e-10);
  assert.ok(Math.abs(tCdf(tQuantile(0.3, 7.5), 7.5) - 0.3) < 1e-12);
  assert.ok(Math.abs(normalQuantile(0.995) - 2.57582930355) < 1e-9);
  assert.ok(Math.abs(normalCdf(normalQuantile(0.123)) - 0.123) < 1e-12);
  assert.ok(Math.abs(chiSquareCdf(10, 4) - 0.95957231801) < 1e-10);
  assert.equal(tCdf(Infinity, 3), 1);
});

Deno.test("distribution wrappers reject NaN and bad parameters", () => {
  assert.throws(() => tCdf(NaN, 3), { name: "InputError", field: "x", reason: "not_finite" });
  assert.throws(() => tCdf(1, 0), { field: "df", reason: "out_of_range", value: 0 });
  assert.throws(() => tQuantile(1.5, 3), { field: "p", value: 1.5 });
  assert.throws(() => normalCdf(0, 0, -1), { field: "sd" });
  assert.throws(() => normalQuantile(-0.1), { field: "p" });
  assert.throws(() => chiSquareCdf(1, Infinity), { field: "k", value: Infinity });
});
