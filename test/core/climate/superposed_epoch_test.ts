import assert from "node:assert/strict";
import { superposedEpoch } from "../../../core/climate/superposed_epoch.ts";
import { randomStream } from "../../../core/random/random_stream.ts";

function noise(n: number, seed: number): Float64Array {
  const s = randomStream(seed, 0);
  return Float64Array.from({ length: n }, () => s.normal());
}

Deno.test("superposedEpoch() recovers a known response with a band that covers it", () => {
  const n = 1200;
  const x = noise(n, 3);
  const epochs = Array.from({ length: 20 }, (_, i) => 40 + i * 57);
  // response: +0.8 for offsets 1..4 after each epoch (invented recovery case)
  for (const e of epochs) for (let j = 1; j <= 4; j++) x[e + j] += 0.8;
  const r = superposedEpoch(x, epochs, {
    before: 10,
    after: 10,
    seed: 2,
    bootstrap: 500,
    randomSets: 500,
  });
  assert.equal(r.offsets[10], 0);
  for (let j = 1; j <= 4; j++) {
    assert.ok(r.lower[10 + j]! < 0.8 && 0.8 < r.upper[10 + j]!, `band covers at +${j}`);
    assert.ok(r.pPerOffset[10 + j]! < 0.05);
  }
  assert.ok(r.pFamilyWise < 0.01);
  assert.equal(r.minSpacing, 57);
  assert.deepEqual(r.count.slice(0, 3), [20, 20, 20]);
});

Deno.test("superposedEpoch() p-values on pure noise are not small too often", () => {
  // 40 independent noise records, random-epoch test at α = 0.1: expect about 4 rejections;
  // binomial(40, 0.1) exceeds 10 with probability < 0.002
  let reject = 0;
  for (let s = 0; s < 40; s++) {
    const x = noise(600, 100 + s);
    const epochs = Array.from({ length: 8 }, (_, i) => 30 + i * 70);
    const r = superposedEpoch(x, epochs, {
      before: 5,
      after: 5,
      seed: s,
      bootstrap: 20,
      randomSets: 199,
    });
    if (r.pFamilyWise <= 0.1) reject++;
  }
  assert.ok(reject <= 10, `rejections ${reject}`);
});

Deno.test("superposedEpoch() baseline, missing values, dropped epochs and errors", async (t) => {
  await t.step("pre-epoch baseline removes each epoch's level", () => {
    const x = new Float64Array(100);
    const epochs = [20, 50, 80];
    epochs.forEach((e, i) => {
      for (let j = -5; j <= 5; j++) x[e + j] = 10 * i + (j > 0 ? 1 : 0);
    });
    const r = superposedEpoch(x, epochs, {
      before: 5,
      after: 5,
      seed: 1,
      preEpochBaseline: true,
      bootstrap: 10,
      randomSets: 10,
    });
    assert.ok(Math.abs(r.composite[0]!) < 1e-12 && Math.abs(r.composite[10]! - 1) < 1e-12);
  });
  await t.step("NaN skipped per offset; epochs near the ends dropped", () => {
    const x = noise(200, 9);
    x[52] = NaN;
    const r = superposedEpoch(x, [2, 50, 100, 150, 198], {
      before: 5,
      after: 5,
      seed: 1,
      bootstrap: 10,
      randomSets: 10,
    });
    assert.deepEqual(r.used, [50, 100, 150]);
    assert.deepEqual(r.dropped, [2, 198]);
    assert.equal(r.count[7], 2);
  });
  await t.step("errors", () => {
    const x = noise(100, 1);
    assert.throws(
      () => superposedEpoch(x, [50], { before: 5, after: 5, seed: 1 }),
      { name: "InputError", field: "epochIndices", reason: "too_few_points", value: 1 },
    );
    assert.throws(() => superposedEpoch(x, [20, 60], { before: -1, after: 5, seed: 1 }), {
      field: "before",
      value: -1,
    });
    assert.throws(
      () => superposedEpoch(x, [20, 60], { before: 5, after: 5, seed: 1, bootstrap: 0 }),
      { field: "bootstrap", value: 0 },
    );
    assert.throws(
      () => superposedEpoch(x, [20, 60], { before: 0, after: 5, seed: 1, preEpochBaseline: true }),
      { field: "before", value: 0 },
    );
  });
});
