import assert from "node:assert/strict";
import {
  errorModelVariance,
  fitLinearSunspotMapping,
  fitSaturatingSunspotMapping,
  predictionIntervalKernel,
  proxyReconstructionErrorModel,
  proxyReconstructionVariance,
  reconstructFromProxies,
  reconstructFromProxiesMany,
  type ReconstructionCells,
  reconstructionDesign,
  type ReconstructionModel,
} from "../../../core/irradiance/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";

/**
 * Several band models on two terms (facular and PSI), both mapped from sunspot number (a
 * linear and a saturating mapping), over cells of mixed lengths (days, then months) that span
 * several blocks of the variance sums and end in a partial one, with cells without any value,
 * and the sunspot number's own error (correlated and independent). Invented numbers (seeded).
 */
function bandCase() {
  const s = randomStream(16, 0);
  const n = 7_000, direct0 = 4_000;
  const days = new Float64Array(n).map((_, i) => (i < 2_500 ? 30.436875 : 1));
  const r = new Float64Array(n).map((_, i) =>
    i % 997 === 5 ? NaN : 80 + 70 * Math.sin(i / 300) + 5 * s.normal()
  );
  const f = r.map((x) => 0.15 + 6e-5 * x + 1e-4 * s.normal());
  const psi = r.map((x) => 1e-4 * Math.max(0, x) + 2e-5 * s.normal());
  const calR = Array.from({ length: 60 }, (_, i) => 4 * i);
  const mapF = fitLinearSunspotMapping(calR, calR.map((x) => 0.15 + 6e-5 * x + 1e-5 * s.normal()));
  const mapP = fitSaturatingSunspotMapping(
    calR,
    calR.map((x) => 2e-2 * (1 - Math.exp(-x / 150)) + 1e-5 * s.normal()),
  );
  const cells: ReconstructionCells = {
    days,
    direct: [f, psi].map((a) => a.map((v, i) => (i >= direct0 ? v : NaN))),
    mappings: [mapF, mapP],
    sunspot: r,
    sunspotUncertainty: {
      correlated: r.map((x) => 0.05 * x + 1),
      independent: r.map((x, i) => (i % 13 === 0 ? NaN : 0.1 * x + 2)),
      correlationYears: 20,
    },
  };
  const models: ReconstructionModel[] = Array.from({ length: 5 }, (_, b) => ({
    coefficients: [1 + b, 40 / (b + 1), 3 + b],
    covariance: [[1e-6, 2e-7, 0], [2e-7, 1e-2, 1e-4], [0, 1e-4, 4e-3]],
    terms: [{ role: "facular", quietLevel: 0.15 }, { role: "sunspot_darkening", quietLevel: 0 }],
    psiReference: 1360.8,
    residualSd: 0.01 * (b + 1),
    rho: 0.1 * b,
    stepDays: 1,
    // the last band cannot back-extend: its mapped cells have no value
    backExtension: b === 4 ? null : { residualSd: 0.02, rho: 0.3, stepDays: 30.436875 },
  }));
  return { models, cells };
}

/** True when two typed arrays hold the same bytes (NaN payloads and signed zeros included). */
function sameBytes(a: ArrayLike<number> & { buffer: ArrayBufferLike }, b: typeof a): boolean {
  const x = new Uint8Array(a.buffer), y = new Uint8Array(b.buffer);
  return x.length === y.length && x.every((v, i) => v === y[i]);
}

Deno.test("reconstructFromProxiesMany() with errorModel: false gives the full path's numbers bit for bit", () => {
  const { models, cells } = bandCase();
  const z = models.map((_, b) => 1.96 + 0.01 * b);
  const full = reconstructFromProxiesMany(models, cells, z);
  const lean = reconstructFromProxiesMany(models, cells, z, { errorModel: false });
  assert.equal(lean.length, models.length);
  lean.forEach((l, b) => {
    const f = full[b];
    // the case exercises every source of the error model and every source code
    if (b === 0) {
      assert.deepEqual(f.errorModel.factors.map((p) => p.source).sort(), [
        "calibration",
        "calibration",
        "calibration",
        "mapping",
        "mapping",
        "mapping",
        "mapping",
        "mapping",
      ]);
      assert.deepEqual([...new Set(f.errorModel.processes.map((p) => p.source))], [
        "residual",
        "input",
      ]);
      assert.deepEqual([...new Set(l.source)].sort(), [0, 1, 2]);
    }
    for (const key of ["value", "sd", "lower", "upper"] as const) {
      assert.ok(sameBytes(l[key], f[key]), `band ${b}: ${key} differs`);
    }
    assert.ok(sameBytes(l.source, f.source), `band ${b}: source differs`);
    assert.ok(!("errorModel" in l) && !("components" in l));
    // and each equals the single-model reconstruction
    const one = reconstructFromProxies(models[b], cells, z[b]);
    assert.ok(sameBytes(l.sd, one.sd) && sameBytes(l.value, one.value));
  });
});

Deno.test("proxyReconstructionVariance() equals the total of errorModelVariance() bit for bit", async (t) => {
  const { models, cells } = bandCase();
  for (const [b, model] of models.entries()) {
    await t.step(`band ${b}`, () => {
      const design = reconstructionDesign(model, cells);
      const total = errorModelVariance(proxyReconstructionErrorModel(model, cells, design)).total;
      const v = proxyReconstructionVariance(model, cells, design);
      assert.ok(sameBytes(v, total));
      assert.ok(v.some((x) => x > 0));
    });
  }
  await t.step("one cell, and no cells", () => {
    for (const n of [1, 0]) {
      const c: ReconstructionCells = {
        days: cells.days.slice(0, n),
        direct: cells.direct.map((a) => a.slice(0, n)),
        mappings: cells.mappings,
        sunspot: cells.sunspot!.slice(0, n),
      };
      const design = reconstructionDesign(models[0], c);
      const total = errorModelVariance(proxyReconstructionErrorModel(models[0], c, design)).total;
      assert.ok(sameBytes(proxyReconstructionVariance(models[0], c, design), total));
    }
  });
});

Deno.test("proxyReconstructionVariance() reports a bad cell length and a bad process as the full model does", () => {
  const { models, cells } = bandCase();
  const days = new Float64Array(cells.days);
  days[5_000] = 0;
  const bad = { ...cells, days };
  const design = reconstructionDesign(models[0], bad);
  const message = (f: () => unknown) => {
    try {
      f();
    } catch (e) {
      return (e as Error).message;
    }
    return "no error";
  };
  const expected = message(() => proxyReconstructionErrorModel(models[0], bad, design));
  assert.match(expected, /cell 5000 has 0 days/);
  assert.equal(message(() => proxyReconstructionVariance(models[0], bad, design)), expected);
  const rho = { ...models[0], rho: 1 };
  const d0 = reconstructionDesign(rho, cells);
  const e2 = message(() => proxyReconstructionErrorModel(rho, cells, d0));
  assert.match(e2, /rho must be in/);
  assert.equal(message(() => proxyReconstructionVariance(rho, cells, d0)), e2);
});

Deno.test("reconstructFromProxiesMany() with errorModel: false on daily cells (one length, odd count, linear mappings) gives the full path's numbers bit for bit", () => {
  // the kernel's column-free residual loadings and its linear mapping loadings, a partial
  // last block of odd length, cells without any value, and a band that cannot back-extend
  const { models, cells } = bandCase();
  const n = 6_145;
  const r = cells.sunspot!.slice(0, n);
  const calR = Array.from({ length: 60 }, (_, i) => 4 * i);
  const mapP = fitLinearSunspotMapping(calR, calR.map((x) => 1e-4 * x + 1e-6 * Math.sin(x)));
  const daily: ReconstructionCells = {
    days: new Float64Array(n).fill(1),
    direct: cells.direct.map((a) => a.slice(0, n).map((v, i) => (i >= 3_001 ? v : NaN))),
    mappings: [cells.mappings[0], mapP],
    sunspot: r,
  };
  const z = models.map((_, b) => 1.96 + 0.01 * b);
  const full = reconstructFromProxiesMany(models, daily, z);
  const lean = reconstructFromProxiesMany(models, daily, z, { errorModel: false });
  assert.deepEqual([...new Set(lean[0].source)].sort(), [0, 1, 2]);
  assert.ok(full[0].errorModel.factors.every((f) => f.source !== "input"));
  lean.forEach((l, b) => {
    for (const key of ["value", "sd", "lower", "upper"] as const) {
      assert.ok(sameBytes(l[key], full[b][key]), `band ${b}: ${key} differs`);
    }
    assert.ok(l.sd.some((x) => x > 0));
  });
});

Deno.test("reconstructFromProxiesMany() with errorModel: false on one cell and on none", () => {
  const { models, cells } = bandCase();
  for (const n of [1, 0]) {
    const c: ReconstructionCells = {
      days: cells.days.slice(4_000, 4_000 + n),
      direct: cells.direct.map((a) => a.slice(4_000, 4_000 + n)),
      mappings: cells.mappings,
      sunspot: cells.sunspot!.slice(4_000, 4_000 + n),
    };
    const z = models.map(() => 1.96);
    const full = reconstructFromProxiesMany(models, c, z);
    const lean = reconstructFromProxiesMany(models, c, z, { errorModel: false });
    lean.forEach((l, b) => {
      assert.equal(l.value.length, n);
      for (const key of ["value", "sd", "lower", "upper"] as const) {
        assert.ok(sameBytes(l[key], full[b][key]), `${n} cells, band ${b}: ${key} differs`);
      }
    });
  }
});

Deno.test("predictionIntervalKernel() declines a model with more loadings than it holds", () => {
  const n = 5, mask = new Uint8Array(n).fill(1), x = new Float64Array(n).fill(2);
  const k = predictionIntervalKernel(n);
  if (!k) return; // without WebAssembly SIMD the plain path runs anyway
  const out = () => ({
    value: new Float64Array(n),
    sd: new Float64Array(n),
    lower: new Float64Array(n),
    upper: new Float64Array(n),
  });
  assert.equal(k.bind([Array(17).fill(null), [], [], []], [x], [1, 1], mask, 1.96), false);
  // 16 loadings computed in TypeScript: each enters as itself, squared
  assert.equal(k.bind([Array(16).fill(null), [], [], []], [x], [1, 1], mask, 1.96), true);
  for (let j = 0; j < 16; j++) k.scratch(j).fill(j === 3 ? 3 : j === 7 ? 4 : 0);
  const o = out();
  k.cells(0, n, o);
  assert.deepEqual([...o.value], [3, 3, 3, 3, 3]);
  assert.deepEqual([...o.sd], [5, 5, 5, 5, 5]);
});
