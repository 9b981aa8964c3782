import assert from "node:assert/strict";
import {
  ar1CellMeans,
  differenceFromMeanVariance,
  errorModelVariance,
  modelledSunspotUncertainty,
  type ReconstructionErrorModel,
  SUNSPOT_UNCERTAINTY_ERAS,
  sunspotUncertaintyAtCells,
  sunspotUncertaintyEra,
  varianceByPeriod,
} from "../../../core/irradiance/mod.ts";
import { InputError } from "../../../core/errors.ts";

/** Exact covariance of the means of blocks of an AR(1) series (σ²ρ^|s−t|, summed by brute force). */
function blockCovariance(sizes: number[], sd: number, rho: number): number[][] {
  const starts = sizes.map((_, k) => sizes.slice(0, k).reduce((a, b) => a + b, 0));
  return sizes.map((a, i) =>
    sizes.map((b, j) => {
      let s = 0;
      for (let p = 0; p < a; p++) {
        for (let q = 0; q < b; q++) s += rho ** Math.abs(starts[i] + p - starts[j] - q);
      }
      return (sd * sd * s) / (a * b);
    })
  );
}

Deno.test("ar1CellMeans() equals the brute-force covariance of block means", () => {
  // definition of the AR(1) autocovariance σ²ρ^|k| (Box, Jenkins & Reinsel 2008, §3.1.3)
  for (const rho of [0.7, -0.4, 0]) {
    const sizes = [31, 28, 31, 30];
    const c = blockCovariance(sizes, 0.15, rho);
    const got = ar1CellMeans(sizes, 0.15, rho, 1);
    sizes.forEach((_, i) => {
      assert.ok(Math.abs(got.sd[i] ** 2 - c[i][i]) < 1e-14, `var ${i} rho ${rho}`);
      if (i === 0) return assert.equal(got.lag1[0], 0);
      const r = c[i - 1][i] / Math.sqrt(c[i - 1][i - 1] * c[i][i]);
      assert.ok(Math.abs(got.lag1[i] - r) < 1e-12, `lag1 ${i} rho ${rho}: ${got.lag1[i]} vs ${r}`);
    });
  }
});

Deno.test("ar1CellMeans() reads a coarse process at the middles of short cells", () => {
  // daily cells of a monthly process: σ² each, correlation ρ^(1/30) between days (OU form)
  const d = ar1CellMeans([1, 1, 1], 0.3, 0.8, 30);
  assert.ok(Math.abs(d.sd[2] - 0.3) < 1e-15);
  assert.ok(Math.abs(d.lag1[1] - 0.8 ** (1 / 30)) < 1e-15);
  assert.equal(ar1CellMeans([1, 1], 0.3, -0.5, 30).lag1[1], 0);
  // months of 28–31 days with a 30.44-day step: m = max(1, d/step), never NaN for ρ < 0
  const m = ar1CellMeans([31, 28, 31, 30], 0.3, -0.3, 30.436875);
  assert.ok([...m.sd, ...m.lag1].every(Number.isFinite));
  const refused = (field: string) => (e: unknown) => e instanceof InputError && e.field === field;
  assert.throws(() => ar1CellMeans([1], 0.1, 1, 1), refused("rho"));
  assert.throws(() => ar1CellMeans([0], 0.1, 0.5, 1), refused("days"));
  assert.throws(() => ar1CellMeans([1], -1, 0.5, 1), refused("sd"));
  assert.throws(() => ar1CellMeans([1], 1, 0.5, 0), refused("stepDays"));
});

Deno.test("the sunspot uncertainty model grows back in time and averages into cells", async (t) => {
  await t.step("eras: 5 % since 1981 up to 40 % before 1749 (the documented model)", () => {
    assert.equal(sunspotUncertaintyEra(2000).relativeScaleSd, 0.05);
    assert.equal(sunspotUncertaintyEra(1700).relativeScaleSd, 0.4);
    const s = SUNSPOT_UNCERTAINTY_ERAS.map((e) => e.relativeScaleSd);
    for (let i = 1; i < s.length; i++) assert.ok(s[i] <= s[i - 1], "decreasing towards today");
  });
  await t.step("values: s·R and α·√(R/d); a missing value has no uncertainty", () => {
    const u = modelledSunspotUncertainty([1760.5, 1990.04, 1990.12], [100, 81, NaN], 30.436875);
    assert.ok(Math.abs(u.correlated[0] - 25) < 1e-12);
    assert.ok(Math.abs(u.independent[1] - 1 * Math.sqrt(81 / 30.436875)) < 1e-12);
    assert.ok(Number.isNaN(u.correlated[2]));
    assert.throws(() => modelledSunspotUncertainty([1], [1, 2], 1), InputError);
  });
  await t.step("cells: correlated part averaged, independent part √Σσ²/n (hand-worked)", () => {
    const time = [1990.04, 1990.12, 1990.2, 1991.5];
    const value = [80, NaN, 100, 50];
    const u = sunspotUncertaintyAtCells(
      time,
      value,
      {
        correlated: Float64Array.of(4, 99, 6, 2.5),
        independent: Float64Array.of(3, 99, 4, 1),
      },
      "annual",
      [1989, 1990, 1991],
    );
    assert.ok(Number.isNaN(u.correlated[0]));
    assert.equal(u.correlated[1], 5);
    assert.equal(u.independent[1], 2.5); // √(9 + 16)/2: the missing value does not count
    assert.equal(u.independent[2], 1);
  });
});

/** A small error model: one shared factor, one AR process, one independent process. */
function smallModel(): ReconstructionErrorModel {
  return {
    cells: 6,
    factors: [{
      source: "calibration",
      label: "offset and slope",
      loading: Float64Array.of(0.2, 0.25, 0.3, 0.35, 0.4, 0.45),
    }],
    processes: [
      {
        source: "residual",
        label: "AR",
        loading: Float64Array.of(0.1, 0.1, 0, 0.12, 0.12, 0.12),
        lag1: Float64Array.of(0, 0.8, 0.7, 0.6, 0.5, 0.9),
      },
      {
        source: "input",
        label: "independent",
        loading: Float64Array.of(0.05, -0.05, 0.05, 0, 0.05, 0.05),
        lag1: new Float64Array(6),
      },
    ],
  };
}

/** The full covariance matrix the model implies, element by element. */
function fullCovariance(em: ReconstructionErrorModel): number[][] {
  const n = em.cells;
  const C = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      for (const f of em.factors) C[i][j] += f.loading[i] * f.loading[j];
      for (const p of em.processes) {
        let r = 1;
        for (let k = Math.min(i, j) + 1; k <= Math.max(i, j); k++) r *= p.lag1[k];
        C[i][j] += p.loading[i] * p.loading[j] * r;
      }
    }
  }
  return C;
}

Deno.test("differenceFromMeanVariance() equals the direct quadratic form wᵀCw", () => {
  // Var(x_t − m̄) = wᵀCw with w = e_t − (1/n)·1_ref: a direct numerical check of the
  // Var(x_t) + Var(m̄) − 2Cov(x_t, m̄) accumulation
  const em = smallModel();
  const C = fullCovariance(em);
  const ref = [0, 1, 1, 0, 1, 0];
  const d = differenceFromMeanVariance(em, ref);
  const n = em.cells, nr = 3;
  for (let t = 0; t < n; t++) {
    const w = ref.map((r, i) => (i === t ? 1 : 0) - r / nr);
    let q = 0;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) q += w[i] * C[i][j] * w[j];
    assert.ok(Math.abs(d.variance[t] - q) < 1e-15, `cell ${t}: ${d.variance[t]} vs ${q}`);
  }
  let mv = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) mv += (ref[i] * ref[j] * C[i][j]) / 9;
  assert.ok(Math.abs(d.meanVariance - mv) < 1e-15);
  // and the plain variances are the diagonal
  const v = errorModelVariance(em);
  for (let t = 0; t < n; t++) assert.ok(Math.abs(v.total[t] - C[t][t]) < 1e-15);
  assert.ok(Math.abs(v.bySource.input[1] - 0.0025) < 1e-15);
  assert.throws(() => differenceFromMeanVariance(em, [0, 0, 0, 0, 0, 0]), InputError);
  assert.throws(() => differenceFromMeanVariance(em, [1]), InputError);
});

Deno.test("varianceByPeriod() averages variances per block and names the dominant source", () => {
  const t = [1748.5, 1749.5, 1750.5, 1751.5, 1990.5];
  const nan = NaN;
  const b = varianceByPeriod(
    t,
    {
      calibration: Float64Array.of(1, 1, 1, nan, 1),
      residual: Float64Array.of(2, 2, 2, nan, 9),
      mapping: Float64Array.of(0, 0, 0, nan, 0),
      input: Float64Array.of(5, 7, 8, nan, 0),
    },
    50,
    Float64Array.of(8, 10, 11, nan, 10),
  );
  assert.deepEqual(b.map((x) => [x.start, x.end, x.cells, x.dominant]), [
    [1700, 1750, 2, "input"],
    [1750, 1800, 1, "input"],
    [1950, 2000, 1, "residual"],
  ]);
  assert.equal(b[0].variance.input, 6);
  assert.equal(b[0].total, 9);
  assert.equal(b[0].ensembleVariance, 9);
  assert.ok(Math.abs(b[2].share.residual - 0.9) < 1e-12);
  assert.throws(
    () => varianceByPeriod(t, b[0].variance as never, 0, null),
    (e) => e instanceof InputError && e.field === "blockYears",
  );
});

Deno.test("varianceByPeriod() equals the plain definition on long series with gaps", () => {
  // means of the finite cells per block, sums left to right: the same to the last bit
  const n = 20_000, years = 50;
  const time = Float64Array.from({ length: n }, (_, i) => 1601.3 + i / 36.5);
  const col = (k: number) =>
    Float64Array.from({ length: n }, (_, i) => (i % (31 + k) === 0 ? NaN : (i * k % 17) / 7));
  const comps = { calibration: col(1), residual: col(2), mapping: col(3), input: col(4) };
  const ens = col(5);
  const sources = ["calibration", "residual", "mapping", "input"] as const;
  const want = new Map<number, { sums: number[]; ens: number; cells: number }>();
  for (let i = 0; i < n; i++) {
    const v = sources.map((s) => comps[s][i]);
    if (!v.every(Number.isFinite) || !Number.isFinite(ens[i])) continue;
    const start = Math.floor(time[i] / years) * years;
    const b = want.get(start) ?? { sums: [0, 0, 0, 0], ens: 0, cells: 0 };
    v.forEach((x, j) => (b.sums[j] += x));
    b.ens += ens[i];
    b.cells++;
    want.set(start, b);
  }
  const got = varianceByPeriod(time, comps, years, ens);
  assert.deepEqual(got.map((b) => b.start), [...want.keys()]);
  got.forEach((b) => {
    const w = want.get(b.start)!;
    assert.equal(b.cells, w.cells);
    assert.deepEqual(sources.map((s) => b.variance[s]), w.sums.map((x) => x / w.cells));
    assert.equal(b.ensembleVariance, w.ens / w.cells);
  });
});
