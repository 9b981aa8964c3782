import assert from "node:assert/strict";
import {
  attributionRegression,
  combineLagSearchChunks,
  lagSearchSurrogateChunk,
  planLagSearchTest,
  pValueAfterLagSearch,
  sidakAdjusted,
} from "../../../core/climate/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { InputError } from "../../../core/errors.ts";

/** A null case r: a noisy 11-year-like cycle and AR(1) noise, unrelated to each other. */
function nullCase(r: number, n = 240) {
  const st = randomStream(100, r);
  const phase = 2 * Math.PI * st.uniform();
  const x = Float64Array.from(
    { length: n },
    (_, i) => Math.sin((2 * Math.PI * i) / 132 + phase) + 0.3 * st.normal(),
  );
  const y = new Float64Array(n);
  let e = 0;
  for (let i = 0; i < n; i++) y[i] = e = 0.6 * e + st.normal();
  return { x, y };
}

Deno.test("lag-search surrogate test: the naive p after an AIC search is far too small", () => {
  // 20 unrelated pairs, lags 0–24 searched, AR(1) errors, 49 surrogates each (seeded): the p
  // of the chosen lag taken as fixed rejects most of them at 5 %; the p that pays for the
  // search rejects about 5 % (derived: the search picks the lag whose x best absorbs y's slow
  // wander, which also lowers the fitted ρ and the standard error)
  let naive = 0, adjusted = 0;
  for (let r = 0; r < 20; r++) {
    const { x, y } = nullCase(r);
    const regs = [{ name: "x", values: x, minLag: 0, maxLag: 24 }];
    const p = pValueAfterLagSearch(y, regs, 0, { errors: "ar1" }).pValue;
    const plan = planLagSearchTest(y, regs, 0, { errors: "ar1", seed: r });
    const c = combineLagSearchChunks(p, [lagSearchSurrogateChunk({ plan, start: 0, end: 49 })]);
    assert.equal(c.surrogates, 49);
    if (p < 0.05) naive++;
    if (c.pValue < 0.05) adjusted++;
  }
  assert.ok(naive >= 10, `naive rejections ${naive} of 20`);
  assert.ok(adjusted <= 3, `adjusted rejections ${adjusted} of 20`);
});

Deno.test("lag-search surrogate test: a real lagged response stays significant", () => {
  const { x } = nullCase(7);
  const st = randomStream(5, 0);
  const y = Float64Array.from(
    { length: 240 },
    (_, i) => (i >= 6 ? x[i - 6] : 0) + 0.5 * st.normal(),
  );
  const regs = [{ name: "x", values: x, minLag: 0, maxLag: 24 }];
  const p = pValueAfterLagSearch(y, regs, 0, { errors: "ols_hac" });
  assert.equal(p.lag, 6);
  const plan = planLagSearchTest(y, regs, 0, { errors: "ols_hac", seed: 1 });
  const chunks = [0, 20, 40].map((s) => lagSearchSurrogateChunk({ plan, start: s, end: s + 20 }));
  const c = combineLagSearchChunks(p.pValue, chunks);
  assert.equal(c.pValue, 1 / 61); // no surrogate reaches it: (1 + 0) / (1 + 60)
  // the same surrogates in one chunk
  const one = combineLagSearchChunks(p.pValue, [
    lagSearchSurrogateChunk({ plan, start: 0, end: 60 }),
  ]);
  assert.deepEqual(one, c);
});

Deno.test("pValueAfterLagSearch() equals the full regression's p-value at the chosen lags", () => {
  const { x, y } = nullCase(3, 150);
  const trend = Float64Array.from({ length: 150 }, (_, i) => i / 12);
  const regs = [
    { name: "solar", values: x, minLag: 0, maxLag: 12 },
    { name: "trend", values: trend, minLag: 0, maxLag: 0 },
  ];
  for (const errors of ["ar1", "ols_hac"] as const) {
    const full = attributionRegression(y, regs, { errors });
    const p = pValueAfterLagSearch(y, regs, 0, { errors });
    assert.equal(p.lag, full.lags.solar);
    assert.equal(p.pValue, full.coefficients[1].pValue);
  }
  assert.throws(
    () => pValueAfterLagSearch(y, regs, 2),
    (e: unknown) => e instanceof InputError && e.field === "index",
  );
});

Deno.test("sidakAdjusted() and the test's input checks", () => {
  // Šidák 1967: 1 − (1 − p)^m; 1 − 0.99^10 = 0.0956179... (derived)
  assert.ok(Math.abs(sidakAdjusted(0.01, 10) - (1 - 0.99 ** 10)) < 1e-15);
  assert.equal(sidakAdjusted(0, 5), 0);
  assert.equal(sidakAdjusted(1, 5), 1);
  assert.ok(sidakAdjusted(1e-12, 25) > 2.4e-11 && sidakAdjusted(1e-12, 25) < 2.6e-11);
  assert.throws(() => sidakAdjusted(1.2, 2), (e: unknown) => e instanceof InputError);
  assert.throws(() => sidakAdjusted(0.1, 0), (e: unknown) => e instanceof InputError);
  const { x, y } = nullCase(1, 60);
  const regs = [{ name: "x", values: x, minLag: 0, maxLag: 2 }];
  assert.throws(
    () => planLagSearchTest(y, regs, 1, { seed: 1 }),
    (e: unknown) => e instanceof InputError && e.field === "tested",
  );
  assert.throws(
    () => planLagSearchTest(y, regs, 0, { seed: -1 }),
    (e: unknown) => e instanceof InputError && e.field === "seed",
  );
  assert.throws(
    () => combineLagSearchChunks(0.1, []),
    (e: unknown) => e instanceof InputError && e.reason === "empty",
  );
});
