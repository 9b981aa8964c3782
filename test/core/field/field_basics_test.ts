import assert from "node:assert/strict";
import {
  areaWeightedMean,
  benjaminiHochberg,
  CELL_CONSTANT,
  CELL_MISSING,
  cellAreasFromBounds,
  cosLatitudeWeights,
  fieldFalseDiscoveryRate,
  type GriddedField,
  prepareFieldAnalysis,
  regionMembership,
  solarSignalMap,
} from "../../../core/field/mod.ts";
import { laggedCorrelationTable } from "../../../core/climate/lagged_correlation.ts";
import { randomStream } from "../../../core/random/random_stream.ts";

function grid(nLat: number, nLon: number, nTime = 1, fill = 0): GriddedField {
  const lat = Float64Array.from({ length: nLat }, (_, i) => -90 + (180 / nLat) * (i + 0.5));
  const lon = Float64Array.from({ length: nLon }, (_, j) => (360 / nLon) * j);
  return { values: new Float32Array(nTime * nLat * nLon).fill(fill), nTime, lat, lon };
}

Deno.test("area weights: cos(latitude) and exact areas from bounds", async (t) => {
  await t.step("a pole cell has weight 0 (cos 90° exactly)", () => {
    assert.deepEqual(Array.from(cosLatitudeWeights([90, -90], 1)), [0, 0]);
  });
  await t.step("areas of a global 5° grid add up to 4π sr (derived)", () => {
    const lb = new Float64Array(72), ob = new Float64Array(144);
    for (let i = 0; i < 36; i++) [lb[2 * i], lb[2 * i + 1]] = [-90 + 5 * i, -85 + 5 * i];
    for (let j = 0; j < 72; j++) [ob[2 * j], ob[2 * j + 1]] = [5 * j, 5 * j + 5];
    const a = cellAreasFromBounds(lb, ob);
    assert.ok(Math.abs(a.reduce((s, v) => s + v, 0) - 4 * Math.PI) < 1e-12);
    // on a regular grid the areas are proportional to cos(latitude) of the centre (derived:
    // sin(φ + h) − sin(φ − h) = 2 sin h cos φ)
    const ratio = a[20 * 72] / a[0];
    assert.ok(
      Math.abs(ratio - Math.cos((12.5 * Math.PI) / 180) / Math.cos((87.5 * Math.PI) / 180)) < 1e-9,
    );
  });
  await t.step("wrapping longitude bounds give the short width", () => {
    const a = cellAreasFromBounds([-90, 90], [357.5, 2.5]);
    assert.ok(Math.abs(a[0] - 2 * ((5 * Math.PI) / 180)) < 1e-15);
  });
  await t.step("bad input is refused with the field named", () => {
    assert.throws(() => cosLatitudeWeights([95], 1), /lat\[0\]/);
    assert.throws(() => cellAreasFromBounds([0, 0], [0, 10]), /zero latitude width/);
    assert.throws(() => cellAreasFromBounds([0, 10, 20], [0, 10]), /latBounds/);
  });
});

Deno.test("regionMembership() selects boxes across 0° and the date line in both conventions", () => {
  const f = grid(2, 36); // longitudes 0, 10, ..., 350
  const count = (m: Float64Array) => m.reduce((s, v) => s + v, 0);
  const box = (west: number, east: number) =>
    regionMembership(f, { kind: "box", south: -90, north: 90, west, east });
  assert.equal(count(box(340, 20)), 2 * 5); // 340, 350, 0, 10, 20
  assert.deepEqual(box(340, 20), box(-20, 20));
  assert.equal(count(box(170, -170)), 2 * 3); // 170, 180, 190
  assert.equal(count(box(-180, 180)), 72); // a full circle
  assert.throws(() => regionMembership(f, { kind: "band", south: 10, north: -10 }), /south/);
  assert.throws(() => regionMembership(f, { kind: "band", south: 89.5, north: 90 }), /no cell/);
  assert.throws(
    () => regionMembership(f, { kind: "mask", mask: [2, ...new Array(71).fill(0)] }),
    /mask\[0\]/,
  );
});

Deno.test("areaWeightedMean() renormalises over present cells and applies the coverage rule", () => {
  const f = grid(2, 2, 3, 1);
  f.values.set([NaN, NaN, NaN, NaN], 4); // step 1: nothing
  f.values.set([5, NaN, NaN, NaN], 8); // step 2: a quarter of the area
  const m = areaWeightedMean(f, { minCoverage: 0.2 });
  assert.deepEqual(Array.from(m.defined), [1, 0, 1]);
  assert.equal(m.mean[0], 1);
  assert.equal(m.mean[2], 5);
  assert.deepEqual(Array.from(m.coverage), [1, 0, 0.25]);
  assert.ok(Number.isNaN(m.mean[1]));
  assert.throws(() => areaWeightedMean(f, { minCoverage: 2 }), /minCoverage/);
  assert.throws(() => areaWeightedMean(f, { weights: [1, 1] }), /weights has 2/);
  assert.throws(() => areaWeightedMean(f, { weights: [1, -1, 1, 1] }), /weights\[1\]/);
});

Deno.test("benjaminiHochberg() edge cases", async (t) => {
  await t.step("step-up: a p above its own line can still be rejected", () => {
    // m = 3, q = 0.05: lines 0.0167, 0.0333, 0.05; p_(3) = 0.05 ≤ 0.05 rejects all three
    assert.equal(benjaminiHochberg([0.02, 0.04, 0.05], 0.05).count, 3);
  });
  await t.step("NaN entries are not tests", () => {
    const r = benjaminiHochberg([NaN, 0.01, NaN], 0.05);
    assert.equal(r.tested, 1);
    assert.deepEqual(Array.from(r.rejected), [0, 1, 0]);
  });
  await t.step("no rejection: threshold 0 and field not significant", () => {
    const r = fieldFalseDiscoveryRate([0.5, 0.9], [1, 1]);
    assert.equal(r.pThreshold, 0);
    assert.equal(r.fieldSignificant, false);
    assert.equal(r.areaFraction, 0);
  });
  await t.step("bad input", () => {
    assert.throws(() => benjaminiHochberg([0.1], 1), /q must be/);
    assert.throws(() => benjaminiHochberg([1.5], 0.1), /p\[0\]/);
    assert.throws(() => fieldFalseDiscoveryRate([0.1], [1], { alphaGlobal: 0.6 }), /factor/);
  });
});

Deno.test("solarSignalMap() equals the single-series lagged correlation at every cell", () => {
  const s = randomStream(3);
  const n = 150, f = grid(2, 3, n);
  const x = Float64Array.from({ length: n }, () => s.normal());
  for (let i = 0; i < f.values.length; i++) f.values[i] = s.normal() + 0.3 * x[Math.floor(i / 6)];
  const inputs = prepareFieldAnalysis(f, x, { minLag: -2, maxLag: 3 });
  const map = solarSignalMap(inputs);
  for (let c = 0; c < 6; c++) {
    const y = Float64Array.from({ length: n }, (_, t) => inputs.y[t * 6 + c]);
    const rows = laggedCorrelationTable(inputs.x, y, { minLag: -2, maxLag: 3 });
    rows.forEach((row, j) => {
      const o = j * 6 + c;
      assert.ok(Math.abs(map.perLag.r[o] - row.r) < 1e-12);
      assert.ok(Math.abs(map.r1Predictor[j] - row.r1_solar) < 1e-12);
      assert.ok(Math.abs(map.perLag.r1Field[o] - row.r1_climate) < 1e-12);
      assert.ok(Math.abs(map.perLag.nEff[o] - row.n_eff) < 1e-9);
      assert.ok(Math.abs(map.perLag.p[o] - row.p_analytic!) < 1e-12);
    });
  }
});

Deno.test("solarSignalMap() leaves out gappy and constant cells and says so", () => {
  const s = randomStream(4);
  const n = 60, f = grid(1, 4, n);
  for (let i = 0; i < f.values.length; i++) f.values[i] = s.normal();
  f.values[5 * 4 + 1] = NaN; // cell 1 has a gap
  for (let t = 0; t < n; t++) f.values[t * 4 + 2] = 7; // cell 2 is constant
  const x = Float64Array.from({ length: n }, () => s.normal());
  const map = solarSignalMap(prepareFieldAnalysis(f, x, { minLag: 0, maxLag: 2 }));
  assert.deepEqual(Array.from(map.status), [0, CELL_MISSING, CELL_CONSTANT, 0]);
  assert.ok(Number.isNaN(map.best.r[1]) && Number.isNaN(map.best.r[2]));
  assert.equal(map.warnings.length, 2);
});

Deno.test("prepareFieldAnalysis() refuses bad input naming the field", () => {
  const f = grid(1, 2, 30);
  f.values.forEach((_, i) => (f.values[i] = Math.sin(i)));
  const x = Float64Array.from({ length: 30 }, (_, t) => Math.cos(t));
  assert.throws(
    () => prepareFieldAnalysis(f, x.subarray(1), { minLag: 0, maxLag: 1 }),
    /predictor has 29/,
  );
  assert.throws(() => prepareFieldAnalysis(f, x, { minLag: 2, maxLag: 1 }), /minLag ≤ maxLag/);
  assert.throws(() => prepareFieldAnalysis(f, x, { minLag: 0, maxLag: 28 }), /overlapping pairs/);
  assert.throws(
    () => prepareFieldAnalysis(f, x, { minLag: 0, maxLag: 1, seasonalPeriod: 1 }),
    /seasonalPeriod/,
  );
  const z = Float64Array.from({ length: 30 }, (_, t) => t % 2);
  assert.throws(
    () =>
      prepareFieldAnalysis(f, x, {
        minLag: 0,
        maxLag: 1,
        controls: [{ name: "a", values: z }, { name: "b", values: z }],
      }),
    /collinear/,
  );
  const nanX = Float64Array.from(x);
  nanX[3] = NaN;
  assert.throws(() => prepareFieldAnalysis(f, nanX, { minLag: 0, maxLag: 1 }), /predictor\[3\]/);
  const allGaps = grid(1, 2, 30, NaN);
  assert.throws(() => prepareFieldAnalysis(allGaps, x, { minLag: 0, maxLag: 1 }), /every cell/);
});

Deno.test("prepareFieldAnalysis() high-pass preprocessing runs per cell like the single series", () => {
  const s = randomStream(8);
  const n = 120, f = grid(1, 2, n);
  for (let i = 0; i < f.values.length; i++) f.values[i] = s.normal() + i / 50;
  const x = Float64Array.from({ length: n }, (_, t) => s.normal() + t / 40);
  const inputs = prepareFieldAnalysis(f, x, {
    minLag: 0,
    maxLag: 2,
    preprocess: { method: "high_pass", cutoffSamples: 40 },
  });
  const map = solarSignalMap(inputs);
  assert.ok(map.best.r.every((v) => Number.isFinite(v)));
  // surrogates are drawn from the series before the high-pass (filtered once, as the observations)
  assert.notDeepEqual(Array.from(inputs.surrogateSource), Array.from(inputs.x));
});
