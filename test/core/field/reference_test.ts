/**
 * Gridded-field analyses against outside references: numpy 1.24, scipy 1.10, statsmodels 0.13
 * and xarray 2023.01 (Debian), values written by fixtures/field/make_reference.py on a
 * constructed field with a planted signal (the exact versions are in the JSON).
 */
import assert from "node:assert/strict";
import {
  areaWeightedMean,
  benjaminiHochberg,
  type GriddedField,
  planFieldComposite,
  prepareFieldAnalysis,
  solarSignalMap,
} from "../../../core/field/mod.ts";

const ref = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/field/reference.json", import.meta.url)),
);

const lat = Float64Array.from(ref.grid.lat as number[]);
const lon = Float64Array.from(ref.grid.lon as number[]);
const nTime = ref.grid.n_time as number;
const values = Float32Array.from(ref.field as (number | null)[], (v) => v ?? NaN);
const field: GriddedField = { values, nTime, lat, lon };
const predictor = Float64Array.from(ref.predictor as number[]);
const control = Float64Array.from(ref.control as number[]);
const G = lat.length * lon.length;

function close(actual: number, expected: number, rel: number, abs: number, what: string) {
  assert.ok(
    Math.abs(actual - expected) <= rel * Math.abs(expected) + abs,
    `${what}: ${actual} vs ${expected}`,
  );
}

Deno.test("solarSignalMap() agrees with scipy/statsmodels per cell and lag (no controls)", () => {
  const inputs = prepareFieldAnalysis(field, predictor, {
    minLag: 0,
    maxLag: 3,
    preprocess: { method: "linear" },
    seasonalPeriod: 12,
  });
  assert.deepEqual(Array.from(inputs.cells), ref.analysed_cells);
  const map = solarSignalMap(inputs);
  const P = ref.plain;
  // the preprocessed field is held in float32 (relative rounding 6e-8), hence 1e-5
  (ref.analysed_cells as number[]).forEach((c, i) => {
    for (let j = 0; j < 4; j++) {
      const o = j * G + c, at = `cell ${c} lag ${j}`;
      close(map.perLag.r[o], P.r[i][j], 1e-5, 1e-7, `r ${at} (scipy.stats.pearsonr)`);
      close(map.perLag.slope[o], P.slope[i][j], 1e-5, 1e-7, `slope ${at} (statsmodels OLS)`);
      close(map.perLag.slopeSe[o], P.slope_se[i][j], 1e-5, 1e-9, `SE ${at} (statsmodels bse)`);
      close(map.r1Predictor[j], P.r1_predictor[i][j], 1e-9, 1e-12, `r1 predictor ${at} (acf)`);
      close(map.perLag.r1Field[o], P.r1_field[i][j], 1e-5, 1e-7, `r1 field ${at} (acf)`);
      close(map.perLag.nEff[o], P.n_eff[i][j], 1e-5, 1e-7, `N_eff ${at} (Bretherton 1999)`);
      close(map.perLag.t[o], P.t[i][j], 1e-5, 1e-7, `t ${at}`);
      close(map.perLag.p[o], P.p[i][j], 1e-4, 1e-10, `p ${at} (scipy.stats.t.sf)`);
    }
  });
});

Deno.test("solarSignalMap() with a control agrees with statsmodels multiple regression", () => {
  const inputs = prepareFieldAnalysis(field, predictor, {
    minLag: 0,
    maxLag: 3,
    preprocess: { method: "linear" },
    seasonalPeriod: 12,
    controls: [{ name: "enso", values: control }],
  });
  const map = solarSignalMap(inputs);
  const R = ref.control_regression;
  (ref.analysed_cells as number[]).forEach((c, i) => {
    for (let j = 0; j < 4; j++) {
      const o = j * G + c, at = `cell ${c} lag ${j}`;
      close(map.perLag.slope[o], R.slope[i][j], 1e-5, 1e-7, `slope ${at} (OLS y ~ 1 + x + z)`);
      close(map.perLag.slopeSe[o], R.slope_se[i][j], 1e-5, 1e-9, `SE ${at} (statsmodels bse)`);
      close(map.perLag.r[o], R.r[i][j], 1e-5, 1e-7, `partial r ${at}`);
      close(map.r1Predictor[j], R.r1_predictor[i][j], 1e-8, 1e-10, `r1 predictor ${at}`);
      close(map.perLag.r1Field[o], R.r1_field[i][j], 1e-5, 1e-7, `r1 field ${at}`);
      close(map.perLag.nEff[o], R.n_eff[i][j], 1e-5, 1e-7, `N_eff ${at}`);
      close(map.perLag.p[o], R.p[i][j], 1e-4, 1e-10, `p ${at} (N_eff − 3 df)`);
    }
  });
});

Deno.test("benjaminiHochberg() gives statsmodels' fdr_bh mask on the lag-2 p-values", () => {
  const inputs = prepareFieldAnalysis(field, predictor, {
    minLag: 0,
    maxLag: 3,
    preprocess: { method: "linear" },
    seasonalPeriod: 12,
  });
  const map = solarSignalMap(inputs);
  const p = (ref.analysed_cells as number[]).map((c) => map.perLag.p[2 * G + c]);
  const bh = benjaminiHochberg(p, 0.1);
  assert.deepEqual(Array.from(bh.rejected), ref.fdr_lag2_q010);
  // the planted box holds most discoveries (invented recovery case)
  const box = ref.planted;
  const hits = (ref.analysed_cells as number[]).filter((_, i) => bh.rejected[i] === 1);
  const inBox = hits.filter((c) => {
    const la = lat[Math.floor(c / lon.length)], lo = lon[c % lon.length];
    return la >= box.south && la <= box.north && lo >= box.west && lo <= box.east;
  });
  assert.ok(inBox.length >= 4, `${inBox.length} of the 6 planted cells found`);
});

Deno.test("areaWeightedMean() agrees with xarray's weighted mean and numpy region means", () => {
  const gappy = Float32Array.from(values);
  for (const [t0, t1, i0, i1, j0, j1] of ref.gaps as number[][]) {
    for (let t = t0; t < t1; t++) {
      for (let i = i0; i < i1; i++) {
        for (let j = j0; j < j1; j++) gappy[t * G + i * lon.length + j] = NaN;
      }
    }
  }
  const f: GriddedField = { values: gappy, nTime, lat, lon };
  const A = ref.area_means;
  const check = (
    m: ReturnType<typeof areaWeightedMean>,
    mean: (number | null)[],
    cover: number[],
    what: string,
  ) => {
    for (let t = 0; t < nTime; t++) {
      close(m.coverage[t], cover[t], 1e-12, 1e-14, `${what} coverage at ${t}`);
      if (mean[t] === null) assert.equal(m.defined[t], 0, `${what} undefined at ${t}`);
      else close(m.mean[t], mean[t]!, 1e-12, 1e-13, `${what} mean at ${t}`);
    }
  };
  const globe = areaWeightedMean(f, { minCoverage: A.min_coverage });
  check(globe, A.globe, A.globe_coverage, "globe");
  // xarray's weighted mean has no coverage rule: compare where ours is defined
  for (let t = 0; t < nTime; t++) {
    if (globe.defined[t]) close(globe.mean[t], A.globe_xarray[t], 1e-12, 1e-13, `xarray ${t}`);
  }
  // months 10–19 and 30 keep just under half the area (one cell is missing throughout),
  // month 40 only the northernmost row
  assert.equal(globe.undefinedSteps, 12);
  const band = areaWeightedMean(f, {
    region: { kind: "band", ...A.band },
    minCoverage: A.min_coverage,
  });
  check(band, A.band.mean, A.band.coverage, "band");
  const { south, north } = A.box;
  const box = areaWeightedMean(f, {
    region: { kind: "box", south, north, west: 300, east: 60 },
    minCoverage: A.min_coverage,
  });
  check(box, A.box.mean, A.box.coverage, "box across 0°");
  // the same box in the −180..180 convention selects the same cells
  const box2 = areaWeightedMean(f, {
    region: { kind: "box", south, north, west: -60, east: 60 },
    minCoverage: A.min_coverage,
  });
  assert.deepEqual(Array.from(box2.mean), Array.from(box.mean));
});

Deno.test("planFieldComposite() agrees with scipy's pooled two-sample t per cell", () => {
  const C = ref.composite;
  const plan = planFieldComposite(field, new Float64Array(G).fill(1), {
    epochs: C.epochs,
    contrastEpochs: C.contrast_epochs,
    from: C.from,
    to: C.to,
    preprocess: { method: "linear" },
    seasonalPeriod: 12,
  });
  assert.equal(plan.observed.df, 8);
  (ref.analysed_cells as number[]).forEach((c, i) => {
    close(plan.observed.composite[c], C.difference[i], 1e-5, 1e-7, `difference at ${c}`);
    close(plan.observed.t[c], C.t[i], 1e-5, 1e-7, `t at ${c} (scipy.stats.ttest_ind)`);
    close(plan.observed.p[c], C.p[i], 1e-4, 1e-10, `p at ${c} (scipy.stats.ttest_ind)`);
  });
});
