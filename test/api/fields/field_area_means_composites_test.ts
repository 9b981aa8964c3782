/**
 * The area-mean and composite-map analyses end to end through the API, on the constructed
 * field of fixtures/field/make_reference.py, against xarray 2023.01's weighted mean, numpy's
 * region means and scipy 1.10's ttest_ind (fixtures/field/reference.json; versions there).
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, type TestService } from "../helpers.ts";
import { gridNetcdf } from "./grid_file.ts";

const ref = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/field/reference.json", import.meta.url)),
);
const lat = ref.grid.lat as number[], lon = ref.grid.lon as number[];
const N = ref.grid.n_time as number, G = lat.length * lon.length;

function close(actual: number | null, expected: number, rel: number, abs: number, what: string) {
  assert.ok(actual !== null, `${what}: null`);
  assert.ok(
    Math.abs(actual - expected) <= rel * Math.abs(expected) + abs,
    `${what}: ${actual} vs ${expected}`,
  );
}

async function uploadField(svc: TestService, values: ArrayLike<number | null>): Promise<string> {
  const res = await svc.app.request("/v1/fields?quantity=temperature_anomaly", {
    method: "POST",
    headers: { "content-type": "application/x-netcdf" },
    body: gridNetcdf({ startYear: 1990, nTime: N, lat, lon, values }),
  });
  const body = await res.json();
  assert.equal(res.status, 201, JSON.stringify(body));
  return body.field.id;
}

/** The reference field with the gaps of the area-mean case. */
function gappy(): (number | null)[] {
  const v = [...ref.field] as (number | null)[];
  for (const [t0, t1, i0, i1, j0, j1] of ref.gaps as number[][]) {
    for (let t = t0; t < t1; t++) {
      for (let i = i0; i < i1; i++) {
        for (let j = j0; j < j1; j++) v[t * G + i * lon.length + j] = null;
      }
    }
  }
  return v;
}

Deno.test("field-area-means agrees with xarray's weighted mean and numpy's region means, and saves a series", async () => {
  const svc = await makeTestApp();
  try {
    const field = await uploadField(svc, gappy());
    const A = ref.area_means;
    const mean = async (region: unknown) => {
      const res = await svc.post("/v1/field-area-means", {
        field,
        region,
        min_coverage: A.min_coverage,
      });
      const run = await res.json();
      assert.equal(res.status, 201, JSON.stringify(run).slice(0, 500));
      return run;
    };
    const check = (
      out: { value: (number | null)[] },
      cov: { value: number[] },
      m: (number | null)[],
      c: number[],
      what: string,
    ) => {
      for (let t = 0; t < N; t++) {
        close(cov.value[t], c[t], 1e-12, 1e-14, `${what} coverage ${t}`);
        if (m[t] === null) assert.equal(out.value[t], null, `${what} undefined at ${t}`);
        // the field travels as float32 through NetCDF, as in the reference
        else close(out.value[t], m[t]!, 1e-12, 1e-12, `${what} mean ${t}`);
      }
    };
    const globe = await mean({ kind: "globe" });
    const g = globe.result;
    assert.equal(g.weights, "cos_latitude");
    check(g.outputs.area_mean, g.outputs.coverage, A.globe, A.globe_coverage, "globe");
    for (let t = 0; t < N; t++) {
      const v = g.outputs.area_mean.value[t];
      if (v !== null) close(v, A.globe_xarray[t], 1e-12, 1e-12, `xarray weighted mean ${t}`);
    }
    assert.equal(g.undefined_steps, 12);
    // the mean is a stored series with the run as its origin
    assert.equal(globe.saved_series.length, 1);
    const saved = await (await svc.get(`/v1/series/${globe.saved_series[0].id}`)).json();
    assert.equal(saved.derived_from, globe.id);
    assert.equal(saved.n, N - 12);
    const band = (await mean({ kind: "band", south: A.band.south, north: A.band.north })).result;
    check(band.outputs.area_mean, band.outputs.coverage, A.band.mean, A.band.coverage, "band");
    const box =
      (await mean({ kind: "box", south: A.box.south, north: A.box.north, west: 300, east: 60 }))
        .result;
    check(box.outputs.area_mean, box.outputs.coverage, A.box.mean, A.box.coverage, "box across 0°");
    // a mask field on another grid is refused at its pointer
    const other = await svc.app.request("/v1/fields", {
      method: "POST",
      headers: { "content-type": "application/x-netcdf" },
      body: gridNetcdf({
        startYear: 1990,
        nTime: 2,
        lat: [-45, 45],
        lon: [0, 180],
        values: [1, 0, 1, 0, 1, 0, 1, 0],
      }),
    });
    const maskId = (await other.json()).field.id;
    const bad = await svc.post("/v1/field-area-means", {
      field,
      region: { kind: "mask", mask_field: maskId },
    });
    const p = await assertProblem(bad, 422);
    assert.equal(p.errors[0].pointer, "/region/mask_field");
  } finally {
    await svc.close();
  }
});

Deno.test("field-composites agrees with scipy's pooled two-sample t per cell; Monte Carlo is worker-independent", async () => {
  const svc = await makeTestApp();
  const two = await makeTestApp({ workers: 2 });
  try {
    const C = ref.composite;
    const iso = (k: number) =>
      `${1990 + Math.floor(k / 12)}-${String((k % 12) + 1).padStart(2, "0")}`;
    const body = (field: string, sets: number) => ({
      field,
      epoch_dates: C.epochs.map(iso),
      contrast_dates: C.contrast_epochs.map(iso),
      from_years: C.from / 12,
      to_years: (C.to + 1) / 12,
      preprocess: "linear",
      random_sets: sets,
      seed: 3,
    });
    const field = await uploadField(svc, ref.field);
    const res = await svc.post("/v1/field-composites", body(field, 0));
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 800));
    const r = run.result;
    assert.equal(r.df, 8);
    assert.deepEqual(r.window, { from: C.from, to: C.to });
    const v = (n: string) => r.map.variables.find((x: { name: string }) => x.name === n).values;
    (ref.analysed_cells as number[]).forEach((c, i) => {
      close(v("composite")[c], C.difference[i], 1e-5, 1e-7, `difference at ${c}`);
      close(v("t")[c], C.t[i], 1e-5, 1e-7, `t at ${c} (scipy.stats.ttest_ind)`);
      close(v("p")[c], C.p[i], 1e-4, 1e-10, `p at ${c} (scipy.stats.ttest_ind)`);
    });
    const a = await (await svc.post("/v1/field-composites", body(field, 199))).json();
    const field2 = await uploadField(two, ref.field);
    const b = await (await two.post("/v1/field-composites", body(field2, 199))).json();
    assert.equal(a.result_digest, b.result_digest);
    assert.ok(a.result.field_significance.monte_carlo.p_field > 0);
  } finally {
    await svc.close();
    await two.close();
  }
});
