/**
 * End to end through the API: the constructed field of fixtures/field/make_reference.py
 * (numpy PCG64, a response of 0.3 per predictor unit at lag 2 planted in one box) written as
 * NetCDF, uploaded, mapped against its predictor uploaded as a series, and compared with the
 * values scipy 1.10, statsmodels 0.13 and xarray 2023.01 computed for the same field
 * (fixtures/field/reference.json; versions in the JSON).
 */
import assert from "node:assert/strict";
import {
  assertProblem,
  makeTestApp,
  monthlySeries,
  type TestService,
  uploadSeries,
} from "../helpers.ts";
import { gridNetcdf } from "./grid_file.ts";
import { openBlasFloat32Product, productEngine } from "../../../api/workers/openblas_product.ts";

const ref = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/field/reference.json", import.meta.url)),
);
const lat = ref.grid.lat as number[], lon = ref.grid.lon as number[];
const N = ref.grid.n_time as number, G = lat.length * lon.length;
const START = 1990;

function close(actual: number | null, expected: number, rel: number, abs: number, what: string) {
  assert.ok(actual !== null, `${what}: null`);
  assert.ok(
    Math.abs(actual - expected) <= rel * Math.abs(expected) + abs,
    `${what}: ${actual} vs ${expected}`,
  );
}

async function upload(svc: TestService, bytes: Uint8Array<ArrayBuffer>, query = "") {
  return await svc.app.request(`/v1/fields${query}`, {
    method: "POST",
    headers: { "content-type": "application/x-netcdf" },
    body: bytes,
  });
}

async function setUp(svc: TestService) {
  const res = await upload(
    svc,
    gridNetcdf({ startYear: START, nTime: N, lat, lon, values: ref.field }),
    "?quantity=temperature_anomaly",
  );
  const body = await res.json();
  assert.equal(res.status, 201, JSON.stringify(body));
  const x = ref.predictor as number[], z = ref.control as number[];
  const solar = await uploadSeries(
    svc,
    monthlySeries("constructed predictor", "tsi", "W m-2", START, N, (i) => x[i]),
  );
  const enso = await uploadSeries(
    svc,
    monthlySeries("constructed control", "enso_index", "1", START, N, (i) => z[i]),
  );
  return { field: body.field.id as string, solar, enso, upload: body };
}

async function runMap(svc: TestService, body: Record<string, unknown>) {
  const res = await svc.post("/v1/solar-signal-maps", body);
  const json = await res.json();
  assert.equal(res.status, 201, JSON.stringify(json).slice(0, 2000));
  return json;
}

const variable = (
  result: { map: { variables: { name: string; values: (number | null)[] }[] } },
  name: string,
) => result.map.variables.find((v) => v.name === name)!.values;

Deno.test("solar-signal-maps agrees with scipy/statsmodels per cell and lag, through the API", async () => {
  const svc = await makeTestApp();
  try {
    const { field, solar, upload: up } = await setUp(svc);
    // the upload decoded the missing cell and the gap from the _FillValue
    assert.equal(up.field.missing, N + 1);
    const runBody = await runMap(svc, {
      field,
      solar,
      min_lag: 0,
      max_lag: 3,
      preprocess: "linear",
      deseasonalise: true,
      surrogates: 0,
      keep_lag_maps: true,
    });
    const r = runBody.result;
    assert.deepEqual(runBody.input_fields, [field]);
    assert.equal(r.n, N);
    assert.equal(r.cells.analysed, (ref.analysed_cells as number[]).length);
    const P = ref.plain;
    (ref.analysed_cells as number[]).forEach((c, i) => {
      for (let j = 0; j < 4; j++) {
        const at = `cell ${c} lag ${j}`;
        close(r.lag_maps.r[j][c], P.r[i][j], 1e-5, 1e-7, `r ${at} (scipy.stats.pearsonr)`);
        close(r.lag_maps.p[j][c], P.p[i][j], 1e-4, 1e-10, `p ${at} (scipy.stats.t.sf)`);
      }
      // the best lag's statistics are those of the reference at that lag
      const best = variable(r, "best_lag")[c]!;
      close(
        variable(r, "slope")[c],
        P.slope[i][best],
        1e-5,
        1e-7,
        `slope cell ${c} (statsmodels OLS)`,
      );
      close(
        variable(r, "slope_se")[c],
        P.slope_se[i][best],
        1e-5,
        1e-9,
        `SE cell ${c} (statsmodels bse)`,
      );
      close(
        variable(r, "n_eff")[c],
        P.n_eff[i][best],
        1e-5,
        1e-7,
        `N_eff cell ${c} (Bretherton 1999)`,
      );
      close(variable(r, "r1_field")[c], P.r1_field[i][best], 1e-5, 1e-7, `r1 cell ${c} (acf)`);
    });
    r.lags.forEach((l: { r1_predictor: number }, j: number) =>
      close(l.r1_predictor, P.r1_predictor[0][j], 1e-9, 1e-12, `r1 predictor lag ${j}`)
    );
    // cells left out are null everywhere
    const left = Array.from({ length: G }, (_, c) => c).filter((c) =>
      !ref.analysed_cells.includes(c)
    );
    for (const c of left) assert.equal(variable(r, "r")[c], null);
    assert.equal(r.slope_units, "K/(W m-2)");
    assert.ok(r.cautions.some((s: string) => s.startsWith("A map has many cells")));
  } finally {
    await svc.close();
  }
});

Deno.test("solar-signal-maps: the FDR mask at one lag is statsmodels' fdr_bh; controls match OLS y ~ 1 + x + z", async () => {
  const svc = await makeTestApp();
  try {
    const { field, solar, enso } = await setUp(svc);
    const one = (await runMap(svc, {
      field,
      solar,
      min_lag: 2,
      max_lag: 2,
      preprocess: "linear",
      alpha_global: 0.05, // α_FDR = 2 × 0.05 = q 0.10 of the reference
      surrogates: 0,
    })).result;
    const mask = (ref.analysed_cells as number[]).map((c) => variable(one, "significant")[c]);
    assert.deepEqual(mask, ref.fdr_lag2_q010, "multipletests(method='fdr_bh', alpha=0.10)");
    assert.equal(one.field_significance.fdr.alpha_fdr, 0.1);
    const withControl = (await runMap(svc, {
      field,
      solar,
      controls: [{ name: "enso", series: enso }],
      min_lag: 2,
      max_lag: 2,
      preprocess: "linear",
      surrogates: 0,
    })).result;
    const R = ref.control_regression;
    (ref.analysed_cells as number[]).forEach((c, i) => {
      close(variable(withControl, "slope")[c], R.slope[i][2], 1e-5, 1e-7, `slope cell ${c}`);
      close(variable(withControl, "slope_se")[c], R.slope_se[i][2], 1e-5, 1e-9, `SE cell ${c}`);
      close(variable(withControl, "p")[c], R.p[i][2], 1e-4, 1e-10, `p cell ${c} (N_eff − 3 df)`);
    });
    assert.deepEqual(withControl.controls, ["enso"]);
  } finally {
    await svc.close();
  }
});

/** A small Monte Carlo map request (lags 0–3, 199 surrogates) on the set-up inputs. */
function monteCarloBody(ids: { field: string; solar: string }, seed: number) {
  return { field: ids.field, solar: ids.solar, min_lag: 0, max_lag: 3, surrogates: 199, seed };
}

Deno.test("solar-signal-maps: the Monte Carlo test gives the same digest on 1 thread and on 2 workers, and replays", async () => {
  const body = (ids: { field: string; solar: string }) => monteCarloBody(ids, 5);
  const a = await makeTestApp();
  const b = await makeTestApp({ workers: 2 });
  try {
    const ia = await setUp(a), ib = await setUp(b);
    const ra = await runMap(a, body(ia));
    const rb = await runMap(b, body(ib));
    assert.equal(ra.result_digest, rb.result_digest);
    const mc = ra.result.field_significance.monte_carlo;
    assert.equal(mc.surrogates, 199);
    // this small field's planted box (6 of 70 cells) does not stand out against the wide null
    // of a nearly sinusoidal predictor; recovery is tested in core (test/core/field) and shown
    // by the demo. Here: the test's shape and its independence of the worker count.
    assert.equal(mc.observed_fraction.length, 4);
    assert.ok(mc.p_field > 0 && mc.p_field <= 1);
    assert.equal(mc.null_best.histogram.reduce((a: number, b: number) => a + b, 0), 199);
    const cellP = variable(ra.result, "p_monte_carlo");
    assert.ok(cellP.every((v: number | null) => v === null || (v > 0 && v <= 1)));
    // the same request again replays to the same digest
    const replay = await a.post(`/v1/runs/${ra.id}/replay`, {});
    assert.equal((await replay.json()).identical, true);
  } finally {
    await a.close();
    await b.close();
  }
});

Deno.test("solar-signal-maps: the Monte Carlo digest is the same with SUNLAG_BLAS=off and auto", async () => {
  const body = (ids: { field: string; solar: string }) => monteCarloBody(ids, 8);
  const digest = async (blas: "off" | "auto", workers: number, engine: string) => {
    const svc = await makeTestApp({ config: { blas }, workers });
    try {
      const run = await runMap(svc, body(await setUp(svc)));
      // in-thread runs use this thread's engine: the one the configuration asked for
      if (workers === 0) assert.equal(productEngine().name, engine);
      return run.result_digest as string;
    } finally {
      await svc.close();
    }
  };
  const blas = openBlasFloat32Product() ? "openblas-sgemm" : "wasm-simd-f32";
  const off = await digest("off", 0, "wasm-simd-f32");
  assert.equal(await digest("auto", 0, blas), off);
  assert.equal(await digest("auto", 2, blas), off);
  assert.equal(await digest("off", 2, "wasm-simd-f32"), off);
});

Deno.test("solar-signal-maps: a field with no time overlap, and a field a run uses, answer problems", async () => {
  const svc = await makeTestApp();
  try {
    const { field, solar } = await setUp(svc);
    const late = await uploadSeries(
      svc,
      monthlySeries("late predictor", "tsi", "W m-2", 2100, 60, (i) => Math.sin(i / 7)),
    );
    const res = await svc.post("/v1/solar-signal-maps", { field, solar: late, surrogates: 0 });
    const p = await assertProblem(res, 422);
    assert.equal(p.errors[0].pointer, "/solar");
    assert.match(p.errors[0].message, /no time step/);
    await runMap(svc, { field, solar, surrogates: 0, max_lag: 2 });
    const del = await svc.app.request(`/v1/fields/${field}`, { method: "DELETE" });
    const conflict = await assertProblem(del, 409);
    assert.equal(conflict.runs.length, 1);
  } finally {
    await svc.close();
  }
});

Deno.test("a run on a gridded field is not bundled: the problem says how to move it", async () => {
  const svc = await makeTestApp();
  try {
    const { field, solar } = await setUp(svc);
    const run = await runMap(svc, { field, solar, surrogates: 0, max_lag: 2 });
    const p = await assertProblem(await svc.get(`/v1/runs/${run.id}/bundle`), 409);
    assert.deepEqual(p.fields, [field]);
    assert.match(p.detail, /same NetCDF file/);
  } finally {
    await svc.close();
  }
});
