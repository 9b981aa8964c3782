/**
 * Every core computation with a long loop stops with a StoppedError soon after its
 * `shouldStop` answers true, and gives the same numbers as without it while it answers false.
 */
import assert from "node:assert/strict";
import {
  areaWeightedMean,
  attributionRegression,
  ensembleSummary,
  fieldAreaWeights,
  fieldCompositeChunk,
  fieldSignificanceChunk,
  fieldSignificanceTasks,
  fitCycleSequence,
  forcingMembers,
  forecastCycle,
  hathawayShape,
  hindcastCaseTask,
  lagSearchSurrogateChunk,
  lombScargle,
  lombScargleChunk,
  monteCarloMaximaChunk,
  planFieldComposite,
  planFieldSignificance,
  planLagSearchTest,
  planSurrogateLagTest,
  prepareFieldAnalysis,
  randomStream,
  reconstructionEnsembleChunk,
  reconstructionEnsemblePlan,
  solarSignalMap,
  spectralBandEnsembleChunk,
  spectralBandEnsemblePlan,
  StoppedError,
  superposedEpoch,
  surrogateLagChunk,
  throwIfStopped,
} from "../../core/mod.ts";

/** A `shouldStop` that answers true from its `after`-th call on, counting its calls. */
function stopAfter(after: number) {
  const probe = { calls: 0, shouldStop: () => ++probe.calls > after };
  return probe;
}

const rng = randomStream(11);
const n = 600;
const time = Float64Array.from({ length: n }, (_, i) => 1900 + i / 12 + 0.01 * rng.uniform());
const value = Float64Array.from(time, (t) => Math.sin((2 * Math.PI * t) / 11) + 0.3 * rng.normal());
const frequency = Float64Array.from({ length: 2000 }, (_, k) => 0.01 + k * 0.002);

Deno.test("throwIfStopped() throws only when shouldStop answers true", () => {
  throwIfStopped(undefined, "x");
  throwIfStopped({}, "x");
  throwIfStopped({ shouldStop: () => false }, "x");
  assert.throws(() => throwIfStopped({ shouldStop: () => true }, "sum"), {
    name: "StoppedError",
    message: "Cannot sum: stopped on request",
  });
});

Deno.test("lombScargle() polls every 64 frequencies and stops; the numbers are unchanged", () => {
  const plain = lombScargle(time, value, frequency);
  assert.deepEqual(lombScargle(time, value, frequency, { shouldStop: () => false }), plain);
  const probe = stopAfter(3);
  assert.throws(() => lombScargle(time, value, frequency, probe), StoppedError);
  assert.equal(probe.calls, 4, "stopped at the fourth block of 64 frequencies");
  assert.throws(
    () => lombScargleChunk({ time, value, frequency }, { shouldStop: () => true }),
    StoppedError,
  );
});

Deno.test("monteCarloMaximaChunk() stops between and inside replicates", () => {
  const input = { time, value, frequency, seed: 3, replicates: 50, null: "ar1" as const };
  const probe = stopAfter(10);
  assert.throws(() => monteCarloMaximaChunk(input, probe), StoppedError);
  assert.ok(probe.calls <= 11);
  const few = { ...input, replicates: 3 };
  assert.deepEqual(
    monteCarloMaximaChunk(few, { shouldStop: () => false }),
    monteCarloMaximaChunk(few),
  );
});

Deno.test("surrogateLagChunk() stops before its next surrogate", () => {
  const y = Float64Array.from(value, (v, i) => (i >= 6 ? value[i - 6] : v) + 0.1 * Math.cos(i));
  const plan = planSurrogateLagTest(value, y, { minLag: -24, maxLag: 24, seed: 5 });
  const probe = stopAfter(7);
  assert.throws(() => surrogateLagChunk({ plan, start: 0, end: 500 }, probe), StoppedError);
  assert.equal(probe.calls, 8);
  const part = { plan, start: 0, end: 20 };
  assert.deepEqual(surrogateLagChunk(part, { shouldStop: () => false }), surrogateLagChunk(part));
});

/** Months of an invented cycle from its minimum, and their times. */
function cycle(months: number, a = 0.002) {
  const r = randomStream(2);
  const t = Array.from({ length: months }, (_, i) => 2000 + i / 12);
  const v = t.map((x) => hathawayShape((x - 2000) * 12 + 2, { t0: 0, a }) + 5 * r.normal());
  return { t, v };
}

Deno.test("forecastCycle() and hindcastCaseTask() stop before their next bootstrap replicate", () => {
  const { t, v } = cycle(40);
  const curveTime = Array.from({ length: 150 }, (_, i) => 2000 + i / 12);
  const probe = stopAfter(5);
  assert.throws(
    () => forecastCycle(t, v, { seed: 1, curveTime, replicates: 200, ...probe }),
    StoppedError,
  );
  assert.equal(probe.calls, 6);
  const whole = cycle(140);
  const input = {
    cycle: {
      id: 1,
      time: whole.t,
      value: whole.v,
      start: 2000,
      maximum: { time: 2004, value: Math.max(...whole.v) },
    },
    monthsUsed: 36,
    caseIndex: 0,
    options: { seed: 1, replicates: 100 },
  };
  assert.throws(() => hindcastCaseTask(input, { shouldStop: () => true }), StoppedError);
});

Deno.test("fitCycleSequence() stops before its next fit", () => {
  const t = Array.from({ length: 264 }, (_, i) => 1900 + i / 12);
  const v = t.map((x) =>
    hathawayShape((x - 1900) * 12, { t0: -6, a: 0.002 }) +
    hathawayShape((x - 1900) * 12, { t0: 126, a: 0.0015 })
  );
  const windows = [{ start: 0, end: 130 }, { start: 130, end: 264 }];
  const probe = stopAfter(1);
  assert.throws(() => fitCycleSequence(t, v, windows, probe), StoppedError);
  assert.equal(probe.calls, 2, "the first independent fit ran, the second did not");
});

Deno.test("attributionRegression() stops before its next fit of the lag search", () => {
  const m = 400;
  const solar = Float64Array.from({ length: m }, (_, i) => Math.sin((2 * Math.PI * i) / 132));
  const noise = randomStream(4);
  const y = Float64Array.from(
    { length: m },
    (_, i) => 0.1 * (i >= 12 ? solar[i - 12] : 0) + 0.02 * noise.normal(),
  );
  const probe = stopAfter(10);
  assert.throws(
    () =>
      attributionRegression(y, [{ name: "solar", values: solar, minLag: 0, maxLag: 40 }], {
        errors: "ols_hac",
        ...probe,
      }),
    StoppedError,
  );
  assert.equal(probe.calls, 11);
});

Deno.test("superposedEpoch() stops before its next bootstrap replicate or random set", () => {
  const x = Float64Array.from({ length: 600 }, (_, i) => Math.sin(i / 5));
  const epochs = [60, 180, 300, 420, 540];
  const options = { before: 10, after: 10, seed: 1, bootstrap: 300, randomSets: 300 };
  const early = stopAfter(100);
  assert.throws(() => superposedEpoch(x, epochs, { ...options, ...early }), StoppedError);
  const late = stopAfter(400);
  assert.throws(() => superposedEpoch(x, epochs, { ...options, ...late }), StoppedError);
  assert.deepEqual(
    superposedEpoch(x, epochs, { ...options, shouldStop: () => false }),
    superposedEpoch(x, epochs, options),
  );
});

Deno.test("lagSearchSurrogateChunk() stops before its next surrogate and inside its lag search", () => {
  const m = 240;
  const x = Float64Array.from({ length: m }, (_, i) => Math.sin(i / 9) + 0.2 * Math.cos(i * 1.7));
  const y = Float64Array.from({ length: m }, (_, i) => (i >= 3 ? x[i - 3] : 0) + Math.cos(i * 1.3));
  const regs = [{ name: "x", values: x, minLag: 0, maxLag: 12 }];
  const plan = planLagSearchTest(y, regs, 0, { errors: "ols_hac", seed: 2 });
  // each surrogate polls once, then once per fit of its 13 lags
  const probe = stopAfter(20);
  assert.throws(() => lagSearchSurrogateChunk({ plan, start: 0, end: 50 }, probe), StoppedError);
  assert.equal(probe.calls, 21);
  const part = { plan, start: 0, end: 3 };
  assert.deepEqual(
    lagSearchSurrogateChunk(part, { shouldStop: () => false }),
    lagSearchSurrogateChunk(part),
  );
});

/** An invented field of `cells` cells on one latitude row, with a lagged response to x. */
function fieldOf(cells: number, n: number) {
  const r = randomStream(8);
  const x = Float64Array.from({ length: n }, (_, t) => Math.sin((2 * Math.PI * t) / 132));
  const values = new Float32Array(n * cells);
  for (let t = 0; t < n; t++) {
    for (let c = 0; c < cells; c++) {
      values[t * cells + c] = (c % 3 === 0 && t >= 2 ? 0.3 * x[t - 2] : 0) + r.normal();
    }
  }
  const lon = Float64Array.from({ length: cells }, (_, c) => (360 * c) / cells);
  return { x, field: { values, nTime: n, lat: Float64Array.of(10), lon } };
}

Deno.test("prepareFieldAnalysis() and solarSignalMap() stop between blocks of cells", () => {
  const { x, field } = fieldOf(200, 240);
  const window = { minLag: 0, maxLag: 6 };
  const early = stopAfter(2);
  assert.throws(() => prepareFieldAnalysis(field, x, { ...window, ...early }), StoppedError);
  assert.equal(early.calls, 3, "polled every 64 cells");
  const inputs = prepareFieldAnalysis(field, x, window);
  assert.deepEqual(
    prepareFieldAnalysis(field, x, { ...window, shouldStop: () => false }),
    inputs,
  );
  const probe = stopAfter(5);
  assert.throws(() => solarSignalMap(inputs, probe), StoppedError);
  assert.equal(probe.calls, 6, "polled every 16 cells");
  assert.deepEqual(solarSignalMap(inputs, { shouldStop: () => false }), solarSignalMap(inputs));
});

Deno.test("fieldSignificanceChunk() stops before its next block of surrogates", () => {
  const { x, field } = fieldOf(30, 240);
  const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 6 });
  const plan = planFieldSignificance(inputs, solarSignalMap(inputs), fieldAreaWeights(field), {
    seed: 1,
    surrogates: 100,
  });
  const [task] = fieldSignificanceTasks(plan, { surrogatesPerTask: 100 });
  const probe = stopAfter(3);
  assert.throws(() => fieldSignificanceChunk(task, undefined, probe), StoppedError);
  assert.equal(probe.calls, 4, "polled every 8 surrogates");
  const part = { ...task, surrogateEnd: 20 };
  assert.deepEqual(
    fieldSignificanceChunk(part, undefined, { shouldStop: () => false }),
    fieldSignificanceChunk(part),
  );
});

Deno.test("planFieldComposite() and fieldCompositeChunk() stop between cells and random sets", () => {
  const { field } = fieldOf(150, 240);
  const weights = fieldAreaWeights(field);
  const options = { epochs: [20, 80, 140, 200], from: 0, to: 5, replicates: 200 };
  const early = stopAfter(3);
  assert.throws(() => planFieldComposite(field, weights, { ...options, ...early }), StoppedError);
  const plan = planFieldComposite(field, weights, options);
  const input = { plan, replicateStart: 0, replicateEnd: 200, cellStart: 0, cellEnd: 150 };
  const probe = stopAfter(50);
  assert.throws(() => fieldCompositeChunk(input, probe), StoppedError);
  assert.equal(probe.calls, 51, "polled before every random set");
  assert.deepEqual(
    fieldCompositeChunk(input, { shouldStop: () => false }),
    fieldCompositeChunk(input),
  );
});

Deno.test("areaWeightedMean() stops between blocks of time steps", () => {
  const { field } = fieldOf(10, 300);
  const probe = stopAfter(2);
  assert.throws(() => areaWeightedMean(field, probe), StoppedError);
  assert.equal(probe.calls, 3, "polled every 64 steps");
  assert.deepEqual(areaWeightedMean(field, { shouldStop: () => false }), areaWeightedMean(field));
});

/** A plan of 300 daily cells with a facular term, as in drawReconstructionMembers' example. */
function ensemblePlan() {
  const cells = 300;
  return reconstructionEnsemblePlan({
    coefficients: [1360.8, 135],
    covariance: [[1e-4, 0], [0, 1]],
    terms: [{ role: "facular", quietLevel: 0.15 }],
    psiReference: 1360.8,
    residualSd: 0.15,
    rho: 0.7,
    stepDays: 1,
    backExtension: null,
  }, {
    days: new Float64Array(cells).fill(1),
    direct: [Float64Array.from({ length: cells }, (_, i) => 0.15 + 0.01 * Math.sin(i / 20))],
    mappings: [null],
    sunspot: null,
  });
}

Deno.test("reconstructionEnsembleChunk() polls before every member and stops; the members are unchanged", () => {
  const input = { plan: ensemblePlan(), seed: 9, first: 40, count: 100 };
  const probe = stopAfter(30);
  assert.throws(() => reconstructionEnsembleChunk(input, probe), StoppedError);
  assert.equal(probe.calls, 31, "polled before every member");
  assert.deepEqual(
    reconstructionEnsembleChunk(input, { shouldStop: () => false }),
    reconstructionEnsembleChunk(input),
  );
});

Deno.test("forcingMembers() polls before every member and stops; the members are unchanged", () => {
  const count = 50, t = Float64Array.from({ length: 120 }, (_, i) => 1990 + (i + 0.5) / 12);
  const members = Float64Array.from(
    { length: count * t.length },
    (_, k) => 1361 + 0.5 * Math.sin(k / 7) + 0.001 * Math.floor(k / t.length),
  );
  const ref = { start: 1992, end: 1995 };
  const probe = stopAfter(10);
  assert.throws(() => forcingMembers(t, members, count, ref, 0.29, probe), StoppedError);
  assert.equal(probe.calls, 11, "polled before every member");
  assert.deepEqual(
    forcingMembers(t, members, count, ref, 0.29, { shouldStop: () => false }),
    forcingMembers(t, members, count, ref),
  );
});

Deno.test("ensembleSummary() polls every 64 points and stops; the summary is unchanged", () => {
  const count = 30, n = 500;
  const members = Float64Array.from({ length: count * n }, (_, k) => Math.sin(k * 0.37));
  const probe = stopAfter(2);
  assert.throws(() => ensembleSummary(members, count, 0.9, probe), StoppedError);
  assert.equal(probe.calls, 3, "polled every 64 points");
  assert.deepEqual(
    ensembleSummary(members, count, 0.9, { shouldStop: () => false }),
    ensembleSummary(members, count, 0.9),
  );
});

Deno.test("spectralBandEnsembleChunk() polls before every member and stops; the members are unchanged", () => {
  const band = (c: number) => ({
    coefficients: [c, 10],
    covariance: [[1e-6, 0], [0, 1e-2]],
    terms: [{ role: "facular" as const, quietLevel: 0.15 }],
    psiReference: 1360.8,
    residualSd: 0.01,
    rho: 0.5,
    stepDays: 1,
    backExtension: null,
  });
  const r = [[1, 0.6], [0.6, 1]];
  const cells = 50;
  const plan = spectralBandEnsemblePlan([band(0.5), band(1.8)], {
    days: new Float64Array(cells).fill(1),
    direct: [Float64Array.from({ length: cells }, (_, i) => 0.15 + 0.01 * Math.sin(i / 5))],
    mappings: [null],
    sunspot: null,
  }, { residual: { lag0: r, lag1: r }, backExtension: null });
  const input = { plan, seed: 4, first: 10, count: 40 };
  const probe = stopAfter(12);
  assert.throws(() => spectralBandEnsembleChunk(input, probe), StoppedError);
  assert.equal(probe.calls, 13, "polled before every member");
  assert.deepEqual(
    spectralBandEnsembleChunk(input, { shouldStop: () => false }),
    spectralBandEnsembleChunk(input),
  );
});
