import assert from "node:assert/strict";
import {
  combineFieldMonteCarlo,
  fieldAreaWeights,
  fieldCompositeChunk,
  fieldCompositeMonteCarlo,
  fieldFalseDiscoveryRate,
  fieldSignificanceChunk,
  fieldSignificanceMonteCarlo,
  fieldSignificanceTasks,
  jsFloat32Product,
  planFieldComposite,
  planFieldSignificance,
  prepareFieldAnalysis,
  solarSignalMap,
  wasmFloat32Product,
} from "../../../core/field/mod.ts";
import { randomStream } from "../../../core/random/random_stream.ts";
import { syntheticField } from "./synthetic_field.ts";

const window = { minLag: 0, maxLag: 6 };

function setup(seed: number, planted = false) {
  const { field, x } = syntheticField({
    seed,
    planted: planted ? { slope: 0.8, lag: 3, south: 0, north: 60, west: 60, east: 150 } : undefined,
  });
  const inputs = prepareFieldAnalysis(field, x, window);
  const map = solarSignalMap(inputs);
  return { field, x, inputs, map, weights: fieldAreaWeights(field) };
}

Deno.test("fieldSignificanceChunk() results do not depend on chunking or the product engine", async (t) => {
  const { inputs, map, weights } = setup(11, true);
  const plan = planFieldSignificance(inputs, map, weights, { seed: 5, surrogates: 60 });
  const run = (sp: number, cp: number, engine = wasmFloat32Product()) => {
    const tasks = fieldSignificanceTasks(plan, { surrogatesPerTask: sp, cellsPerTask: cp });
    return {
      count: tasks.length,
      result: combineFieldMonteCarlo(plan, tasks.map((k) => fieldSignificanceChunk(k, engine))),
    };
  };
  const one = run(60, 72);
  assert.equal(one.count, 1);
  await t.step("1, 2 and 5 chunks, and 2 × 5, give bit-identical results", () => {
    const two = run(30, 72), five = run(60, 15), ten = run(30, 15);
    assert.deepEqual([two.count, five.count, ten.count], [2, 5, 10]);
    for (const r of [two, five, ten]) assert.deepEqual(r.result, one.result);
  });
  await t.step("the plain-JS engine gives the same decisions as the SIMD kernel", () => {
    assert.deepEqual(run(60, 72, jsFloat32Product()).result, one.result);
  });
  await t.step("deciding every comparison in float64 changes nothing", () => {
    const strict = { ...plan };
    strict.sigHi = new Float32Array(plan.sigHi.length).fill(Infinity);
    strict.sigLo = new Float32Array(plan.sigLo.length);
    strict.exHi = new Float32Array(plan.exHi.length).fill(Infinity);
    strict.exLo = new Float32Array(plan.exLo.length);
    const tally = fieldSignificanceChunk({
      plan: strict,
      surrogateStart: 0,
      surrogateEnd: 60,
      cellStart: 0,
      cellEnd: plan.cellCount,
    });
    assert.ok(tally.rechecked > 0);
    const r = combineFieldMonteCarlo(plan, [tally]);
    assert.deepEqual(r, one.result);
  });
  await t.step("a missing or doubled chunk is refused", () => {
    const tasks = fieldSignificanceTasks(plan, { surrogatesPerTask: 30 });
    const tallies = tasks.map((k) => fieldSignificanceChunk(k));
    assert.throws(() => combineFieldMonteCarlo(plan, tallies.slice(1)), /cover/);
    assert.throws(() => combineFieldMonteCarlo(plan, [...tallies, tallies[0]]), /overlap/);
  });
});

Deno.test("fieldSignificanceMonteCarlo() recovers a signal planted in one region (invented case)", () => {
  const { field, inputs, map, weights } = setup(21, true);
  const r = fieldSignificanceMonteCarlo(inputs, map, weights, { seed: 9, surrogates: 199 });
  assert.ok(r.pField <= 0.01, `field p ${r.pField}`);
  // neighbouring lags share most of the signal (the predictor is AR(1), φ = 0.7)
  assert.ok(Math.abs(map.lags[r.observedBestIndex] - 3) <= 1);
  // per-cell Monte Carlo p: small inside the box, rarely outside
  const nLon = field.lon.length;
  let inside = 0, insideHit = 0, outsideHit = 0, outside = 0;
  for (let c = 0; c < 72; c++) {
    const la = field.lat[Math.floor(c / nLon)], lo = field.lon[c % nLon];
    const box = la >= 0 && la <= 60 && lo >= 60 && lo <= 150;
    if (box) {
      inside++;
      if (r.cellP[c] <= 0.05) insideHit++;
    } else {
      outside++;
      if (r.cellP[c] <= 0.05) outsideHit++;
    }
  }
  assert.equal(insideHit, inside);
  assert.ok(outsideHit / outside < 0.15, `${outsideHit} of ${outside} cells outside`);
});

Deno.test("fieldSignificanceMonteCarlo() rejects at about the nominal rate without a signal", () => {
  // 120 independent invented fields, 99 surrogates each: at α = 0.05 the number of rejections
  // is Binomial(120, ≤ 0.05) if the test is valid; 0..14 covers 99.9 % of Binomial(120, 0.05)
  const fields = 120;
  let rejected = 0;
  for (let k = 0; k < fields; k++) {
    const { inputs, map, weights } = setup(1000 + k);
    const r = fieldSignificanceMonteCarlo(inputs, map, weights, { seed: k, surrogates: 99 });
    if (r.pField <= 0.05) rejected++;
  }
  assert.ok(rejected >= 1 && rejected <= 14, `${rejected} of ${fields} rejected`);
});

Deno.test("composite maps: chunk-independent Monte Carlo that finds a planted response", async (t) => {
  // invented case: a box warms by 1.2 units in the 6 steps after each of 8 epochs
  const { field } = syntheticField({ seed: 31 });
  const epochs = [20, 48, 76, 104, 132, 160, 188, 216];
  const G = 72, nLon = 12;
  for (const e of epochs) {
    for (let s = e; s < e + 6; s++) {
      for (let c = 0; c < G; c++) {
        const la = field.lat[Math.floor(c / nLon)], lo = field.lon[c % nLon];
        if (la >= 0 && la <= 60 && lo >= 60 && lo <= 150) field.values[s * G + c] += 1.2;
      }
    }
  }
  const weights = fieldAreaWeights(field);
  const plan = planFieldComposite(field, weights, {
    epochs,
    from: 0,
    to: 5,
    seed: 4,
    replicates: 199,
  });
  const whole = fieldCompositeMonteCarlo(plan, 199);
  await t.step("1, 2 and 5 chunks give bit-identical results", () => {
    assert.deepEqual(fieldCompositeMonteCarlo(plan, 100), whole);
    const five = [0, 15, 30, 45, 60, 72].slice(0, -1).map((c0, k, a) =>
      fieldCompositeChunk({
        plan,
        replicateStart: 0,
        replicateEnd: 199,
        cellStart: c0,
        cellEnd: k + 1 < a.length ? a[k + 1] : 72,
      })
    );
    assert.deepEqual(combineFieldMonteCarlo(plan, five), whole);
  });
  await t.step("the field is significant and FDR marks the box", () => {
    assert.ok(whole.pField <= 0.01, `p ${whole.pField}`);
    const fdr = fieldFalseDiscoveryRate(plan.observed.p, weights);
    assert.ok(fdr.fieldSignificant);
    const nBox = [...fdr.rejected].filter((v, c) => {
      const la = field.lat[Math.floor(c / nLon)], lo = field.lon[c % nLon];
      return v === 1 && la >= 0 && la <= 60 && lo >= 60 && lo <= 150;
    }).length;
    assert.ok(nBox >= 4 && fdr.count - nBox <= 1, `${nBox} of ${fdr.count} in the box`);
  });
});

Deno.test("fieldSignificanceMonteCarlo() reports the wide, bimodal null of a near-sinusoidal predictor", () => {
  // invented case: a cycle-length oscillation over the whole field, unrelated in phase to a
  // nearly sinusoidal predictor; phase surrogates of the predictor are sinusoids of random
  // phase, and many line up with it, so the null is wide and bimodal (derived)
  const n = 480;
  const { field } = syntheticField({ seed: 41, n });
  const s = randomStream(9);
  const x = Float64Array.from(
    { length: n },
    (_, t) => Math.sin((2 * Math.PI * t) / 132) + 0.1 * s.normal(),
  );
  for (let t = 0; t < n; t++) {
    for (let c = 0; c < 72; c++) {
      field.values[t * 72 + c] += 0.8 * Math.sin((2 * Math.PI * t) / 132 + 2 + c / 72);
    }
  }
  const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 12 });
  const r = fieldSignificanceMonteCarlo(inputs, solarSignalMap(inputs), fieldAreaWeights(field), {
    seed: 3,
    surrogates: 199,
  });
  assert.ok(r.observedBest > 0.9); // nearly every cell "significant" locally...
  assert.ok(r.pField > 0.05); // ...yet not unusual against the surrogates
  assert.ok(r.nullBest.bimodality > 5 / 9);
  assert.ok(r.warnings.some((w) => w.includes("bimodal")));
});
