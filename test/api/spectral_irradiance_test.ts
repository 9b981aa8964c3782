/**
 * Spectral irradiance over HTTP: band models on the SYNTHETIC demo record (recovery of the
 * generator's true band parameters, recorded in fixtures/demo/manifest.json), the spectral
 * reconstruction back to 1700 with integrals, its long-form CSV and charts, the integral check
 * on a constructed spectrum whose bands add up exactly to a TSI record, and bad input.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import {
  createdRun,
  DEMO,
  DEMO_BANDS,
  demoIrradianceModel,
  demoSpectralModel,
} from "./demo_inputs.ts";
import { blackbodyBandFraction } from "../../core/irradiance/mod.ts";
import { randomStream } from "../../core/random/mod.ts";
import { DEMO_SPECTRAL_BANDS } from "../../api/schemas/examples.ts";

const demoDir = new URL("../../fixtures/demo/", import.meta.url);

/** Debian's python3-xarray (with netCDF4 and cftime) for reading NetCDF back. */
const HAS_XARRAY = (() => {
  try {
    return new Deno.Command("/usr/bin/python3", {
      args: ["-c", "import xarray, netCDF4, cftime"],
      stdout: "null",
      stderr: "null",
    }).outputSync().success;
  } catch {
    return false;
  }
})();

/** Reads a spectrum file with xarray (cftime decoding) and prints what the test compares. */
const XARRAY_READER = `
import json, sys, warnings
import numpy as np, xarray as xr
warnings.simplefilter("error", xr.SerializationWarning)
with xr.open_dataset(sys.argv[1], use_cftime=True) as ds:
    nan = lambda a: [[None if np.isnan(v) else float(v) for v in row] for row in np.asarray(a)]
    print(json.dumps({
        "dims": {k: int(v) for k, v in ds.sizes.items()},
        "calendar": ds.time.encoding.get("calendar"),
        "units": ds.ssi.attrs["units"],
        "standard_name": ds.ssi.attrs.get("standard_name"),
        "conventions": ds.attrs["Conventions"],
        "wavelength_bounds_attr": ds.wavelength.attrs.get("bounds"),
        "bnds": ds.wavelength_bnds.values.tolist(),
        "ssi": nan(ds.ssi.values),
        "unc": nan(ds.ssi_uncertainty.values),
        "years": [d.year for d in ds.time.values],
    }))
`;
const BANDS = DEMO_BANDS;
const TRUTH = JSON.parse(await Deno.readTextFile(new URL("manifest.json", demoDir))).truth;

Deno.test("spectral models on the demo record recover the true band parameters", async (t) => {
  const svc = await makeTestApp();
  const { spectral } = await demoSpectralModel(svc, { ranges: [{ lower: 200, upper: 400 }] });
  const r = spectral.result;
  const truth = TRUTH.spectral;
  await t.step(
    "true S_Q,i, a_i and b_i inside their 95 % intervals at about the nominal rate",
    () => {
      assert.equal(r.bands.length, 32);
      let hit = 0, total = 0;
      // the demo's facular quiet level is 0.15; the model's is the TSI model's (its 1st
      // percentile), so the true intercept is S_Q,i + a_i (F_Q,model − 0.15)
      const fq = r.tsi_model.model.terms[0].quiet_level;
      r.bands.forEach(
        (
          b: {
            coefficients: number[];
            standard_errors: number[];
            lower: number[];
            upper: number[];
          },
          i: number,
        ) => {
          const tb = truth.bands[i];
          const want = [tb.quiet_w_m2_nm + tb.a_w_m2_nm * (fq - 0.15), tb.a_w_m2_nm, tb.b_w_m2_nm];
          want.forEach((v, k) => {
            total++;
            if (v >= b.lower[k] && v <= b.upper[k]) hit++;
            assert.ok(
              Math.abs(v - b.coefficients[k]) < 4.5 * b.standard_errors[k],
              `band ${i} β${k}`,
            );
          });
        },
      );
      // 96 intervals: 91 ± 2 expected; 91 when written
      assert.ok(hit >= 86, `${hit} of ${total} true values inside their 95 % intervals`);
    },
  );
  await t.step("every band reports its variance explained and cross-validated skill", () => {
    for (const b of r.bands) {
      assert.ok(b.r_squared > 0.7 && b.r_squared <= 1, `R² ${b.r_squared}`);
      assert.ok(b.cross_validation.variance_explained > 0.65);
      assert.ok(b.back_extension.residual_sd > 0);
    }
  });
  await t.step(
    "UV varies by per cent over a cycle, the visible by 0.1 %, the infrared in anti-phase",
    () => {
      const rel = (lo: number) =>
        r.bands.find((b: { band: { lower: number } }) => b.band.lower === lo).cycle.relative;
      assert.ok(rel(200) > 0.01 && rel(200) < 0.05, `200–220 nm ${rel(200)}`);
      assert.ok(rel(500) > 1e-4 && rel(500) < 2e-3, `500–525 nm ${rel(500)}`);
      assert.ok(rel(1600) < 0, `1600–1800 nm ${rel(1600)}`);
      assert.deepEqual(r.cycles.length, 1);
    },
  );
  await t.step("the integral check states the coverage and does not require agreement", () => {
    const c = r.integral_check;
    // the demo's quiet spectrum is a 5772 K blackbody: the bands hold exactly that share (D)
    const share = blackbodyBandFraction(200, 2400);
    assert.ok(Math.abs(c.coverage.blackbody_fraction - share) < 1e-12);
    assert.ok(Math.abs(c.coverage.quiet_level_ratio - share) < 2e-4);
    assert.equal(c.full_coverage, false);
    assert.equal(c.agrees, null);
    assert.match(c.verdict, /not TSI/);
    // the bands hold 97 % of a and b minus the remainder below 200 / above 2400 nm
    const a = c.coefficients[1], b = c.coefficients[2];
    assert.ok(Math.abs(a.integral - 0.97 * TRUTH.tsi.a) < 3 * a.integral_se, `a ${a.integral}`);
    const bIn = TRUTH.tsi.b - truth.outside_bands.b;
    assert.ok(Math.abs(b.integral - bIn) < 3 * b.integral_se, `b ${b.integral}`);
  });
  await t.step("a range integral is the weighted sum of its bands' coefficients", () => {
    const range = r.ranges[0];
    assert.deepEqual(range.range, { lower: 200, upper: 400 });
    assert.equal(range.bands, 10);
    const sum = [0, 1, 2].map((k) =>
      r.bands.slice(0, 10).reduce(
        (s: number, b: { coefficients: number[] }) => s + 20 * b.coefficients[k],
        0,
      )
    );
    range.coefficients.forEach((c: number, k: number) =>
      assert.ok(Math.abs(c - sum[k]) < 1e-9 * Math.abs(sum[k]))
    );
  });
  await svc.close();
});

Deno.test("spectral reconstruction back to 1700: bands, integrals, the TSI comparison, CSV and charts", async (t) => {
  const svc = await makeTestApp();
  const { spectral, psi } = await demoSpectralModel(svc, { ranges: [{ lower: 200, upper: 400 }] });
  const rec = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", {
    model: spectral.id,
    sunspot_number: DEMO.SSN,
    proxies: [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: psi }],
    period: { start: "1700", end: "2025" },
    resolution: "annual",
    ranges: [{ lower: 200, upper: 400 }, { lower: 150, upper: 300 }],
  });
  const r = rec.result;
  const s = r.spectrum;
  await t.step("every band has a value at every year, back-extended before 1978", () => {
    assert.equal(s.bands.length, 32);
    assert.equal(s.time.length, 326);
    assert.ok(s.value.every((v: (number | null)[]) => v.every((x) => x !== null)));
    assert.equal(r.coverage.direct.start, 1978.5);
    assert.ok(r.coverage.back_extended.cells > 270);
    // the band grows wider back in time? at least not narrower than in the direct era
    const u0 = s.uncertainty[0];
    assert.ok(u0[0] >= u0[300], "1700 is at least as uncertain as 2000");
  });
  await t.step("the integral output is the sum of band values × widths", () => {
    const integral = r.outputs.integral.value;
    for (const i of [0, 150, 325]) {
      const sum = s.bands.reduce(
        (acc: number, b: { lower: number; upper: number }, k: number) =>
          acc + (b.upper - b.lower) * s.value[k][i],
        0,
      );
      assert.ok(Math.abs(integral[i] - sum) < 1e-4, `year ${s.time[i]}: ${integral[i]} vs ${sum}`);
    }
  });
  await t.step(
    "a range partly outside the bands is integrated over the covered part and says so",
    () => {
      const part = r.ranges.find((x: { output: string }) => x.output === "range_150_300");
      assert.deepEqual(part.missing, [[150, 200]]);
      assert.equal(part.covered_nm, 100);
      assert.ok(r.warnings.some((w: string) => /150–200 nm/.test(w)));
      const full = r.outputs.range_200_400.value[200];
      const sum = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9].reduce((a, k) => a + 20 * s.value[k][200], 0);
      assert.ok(Math.abs(full - sum) < 1e-5);
    },
  );
  await t.step("the comparison with TSI states the partial coverage and the offset", () => {
    const c = r.consistency;
    assert.equal(c.full_coverage, false);
    assert.equal(c.compared_cells, 326);
    // the bands miss the TSI model's quiet level outside 200–2400 nm (manifest: about 54 W m-2)
    const outside = TRUTH.spectral.outside_bands.quiet_w_m2;
    assert.ok(Math.abs(c.mean_difference + outside) < 0.1, `mean difference ${c.mean_difference}`);
    assert.match(c.verdict, /not TSI/);
    assert.ok(r.outputs.tsi.value.every((v: number | null) => v !== null));
  });
  await t.step("the spectrum as long-form CSV: one row per year and band", async () => {
    const res = await svc.get(`/v1/runs/${rec.id}/spectrum?format=csv`);
    assert.equal(res.status, 200);
    assert.match(res.headers.get("content-type")!, /text\/csv/);
    const text = await res.text();
    const rows = text.split("\n").filter((l) => l && !l.startsWith("#"));
    assert.equal(
      rows[0],
      "date,decimal_year,band_lower_nm,band_upper_nm,value,uncertainty,lower,upper",
    );
    assert.equal(rows.length - 1, 326 * 32);
    assert.match(text, /# units: W m-2 nm-1/);
    const first = rows[1].split(",");
    assert.deepEqual(first.slice(0, 4), ["1700", "1700.5", "200", "220"]);
    assert.equal(Number(first[4]), s.value[0][0]);
    const json = await (await svc.get(`/v1/runs/${rec.id}/spectrum`)).json();
    assert.deepEqual(json.bands, s.bands);
    const none = await svc.get(`/v1/runs/${spectral.id}/spectrum`);
    await assertProblem(none, 404);
  });
  await t.step("the spectrum as NetCDF-CF on a model calendar, read back by xarray", async (t) => {
    const res = await svc.get(`/v1/runs/${rec.id}/spectrum?format=netcdf&calendar=noleap`);
    assert.equal(res.status, 200, await res.clone().text());
    const bytes = new Uint8Array(await res.arrayBuffer());
    if (!HAS_XARRAY) {
      if (Deno.env.get("CI")) assert.fail("python3-xarray is missing on CI");
      console.warn("spectral NetCDF read-back skipped: /usr/bin/python3 lacks xarray");
      return;
    }
    const dir = await Deno.makeTempDir({ prefix: "sunlag-ssi-" });
    try {
      await Deno.writeFile(`${dir}/ssi.nc`, bytes);
      const out = await new Deno.Command("/usr/bin/python3", {
        args: ["-c", XARRAY_READER, `${dir}/ssi.nc`],
      }).output();
      assert.ok(out.success, new TextDecoder().decode(out.stderr));
      const x = JSON.parse(new TextDecoder().decode(out.stdout));
      await t.step("dimensions, calendar, units and CF names", () => {
        assert.deepEqual(x.dims, { time: 326, wavelength: 32, bnds: 2 });
        assert.equal(x.calendar, "noleap");
        assert.equal(x.units, "W m-2 nm-1");
        assert.equal(x.standard_name, "solar_irradiance_per_unit_wavelength");
        assert.equal(x.conventions, "CF-1.10");
        assert.equal(x.wavelength_bounds_attr, "wavelength_bnds");
      });
      await t.step("the same band bounds, values and uncertainties", () => {
        assert.deepEqual(
          x.bnds,
          s.bands.map((b: { lower: number; upper: number }) => [b.lower, b.upper]),
        );
        for (let b = 0; b < 32; b++) {
          for (let i = 0; i < 326; i++) {
            assert.equal(x.ssi[i][b], s.value[b][i]);
            assert.equal(x.unc[i][b], s.uncertainty[b][i]);
          }
        }
        // annual means keep their years on noleap: 1700 … 2025
        assert.deepEqual([x.years[0], x.years[325]], [1700, 2025]);
      });
    } finally {
      await Deno.remove(dir, { recursive: true });
    }
  });
  await t.step(
    "charts: bands over time, the variability view, an unknown view refused",
    async () => {
      for (const v of ["", "?view=variability"]) {
        const res = await svc.get(`/v1/runs/${rec.id}/chart.svg${v}`);
        assert.equal(res.status, 200);
        const svg = await res.text();
        assert.match(
          svg,
          v ? /Relative solar-cycle variability/ : /Reconstructed spectral irradiance/,
        );
      }
      const bad = await assertProblem(await svc.get(`/v1/runs/${rec.id}/chart.svg?view=nope`), 422);
      assert.equal(bad.errors[0].pointer, "/view");
      const model = await svc.get(`/v1/runs/${spectral.id}/chart.svg`);
      assert.match(await model.text(), /anti-phase/);
    },
  );
  await svc.close();
});

/**
 * A constructed record (invented, seeded): monthly proxies, ten band records (W m-2 per band)
 * over 100 nm – 100 µm, and a TSI record that is exactly their sum.
 */
function constructedSpectrum(seed: number) {
  const n = 240, s = randomStream(seed);
  const time: string[] = [], f: number[] = [], psi: number[] = [];
  let u = 0;
  for (let i = 0; i < n; i++) {
    time.push(`${2000 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, "0")}`);
    const c = 0.5 * (1 + Math.sin((2 * Math.PI * i) / 132));
    u = 0.5 * u + 0.0005 * s.normal();
    f.push(0.15 + 0.012 * c + u);
    psi.push(Math.max(0, 4e-4 * c * (1 + 0.5 * s.normal())));
  }
  const edges = [100, 200, 300, 400, 500, 700, 1000, 1600, 3000, 10000, 100000];
  const bands = edges.slice(1).map((upper, k) => {
    const lower = edges[k];
    const share = blackbodyBandFraction(lower, upper);
    const a = 135 * share * Math.pow(Math.sqrt(lower * upper) / 500, -1) / 1.1;
    const values: number[] = [];
    let e = 0;
    for (let i = 0; i < n; i++) {
      e = 0.6 * e + 0.02 * share * s.normal();
      values.push(1360.8 * share + a * (f[i] - 0.15) - 0.96 * share * 1360.8 * psi[i] + e);
    }
    return { lower, upper, values };
  });
  const tsi = time.map((_, i) => bands.reduce((acc, b) => acc + b.values[i], 0));
  return { time, f, psi, bands, tsi };
}

Deno.test("the integral check on bands that add up exactly to the TSI record", async (t) => {
  const svc = await makeTestApp();
  const c = constructedSpectrum(7);
  const series = (name: string, quantity: string, units: string, value: number[]) => ({
    name,
    quantity,
    units,
    time: c.time,
    value,
  });
  const mg = series("constructed facular index", "facular_index", "1", c.f);
  const psi = series("constructed PSI", "other", "1", c.psi);
  for (const method of ["ols", "prais_winsten"] as const) {
    await t.step(method, async () => {
      const model = await createdRun(svc, "/v1/irradiance/models", {
        tsi: series("constructed TSI", "tsi", "W m-2", c.tsi),
        terms: [
          { name: "mg", series: mg, role: "facular" },
          { name: "psi", series: psi, role: "sunspot_darkening" },
        ],
        method,
      });
      const spectral = await createdRun(svc, "/v1/irradiance/spectral-models", {
        tsi_model: model.id,
        proxies: [{ term: "mg", series: mg }, { term: "psi", series: psi }],
        bands: c.bands.map((b) => ({
          lower: b.lower,
          upper: b.upper,
          series: series(`band ${b.lower}-${b.upper} nm`, "band_irradiance", "W m-2", b.values),
        })),
        method,
      });
      const check = spectral.result.integral_check;
      // 100 nm – 100 µm holds 99.98 % of a 5772 K blackbody (Planck's law, D)
      assert.equal(check.full_coverage, true);
      assert.equal(check.agrees, true, check.verdict);
      for (const row of check.coefficients) {
        // OLS is linear in the response with one design: the integral IS the TSI fit (D)
        const tol = method === "ols"
          ? 1e-8 * Math.max(1, Math.abs(row.tsi))
          : 0.5 * row.difference_se;
        assert.ok(Math.abs(row.difference) <= tol, `${method} ${row.name}: ${row.difference}`);
      }
      const rec = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", {
        model: spectral.id,
        proxies: [{ term: "mg", series: mg }, { term: "psi", series: psi }],
        period: { start: "2000-01", end: "2019-12" },
      });
      const k = rec.result.consistency;
      assert.equal(k.full_coverage, true);
      assert.equal(k.fraction_within, 1);
      assert.match(k.verdict, /agrees/);
      if (method === "ols") assert.ok(Math.abs(k.mean_difference) < 1e-5);
    });
  }
  await svc.close();
});

Deno.test("bad spectral input: a problem naming the band and field, nothing stored", async (t) => {
  const svc = await makeTestApp();
  const { model, proxies } = await (async () => {
    await loadDemo(svc.store);
    const d = await demoIrradianceModel(svc);
    return {
      model: d.model,
      proxies: [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: d.psi }],
    };
  })();
  const counts = async () => ({
    series: (await (await svc.get("/v1/series?limit=1")).json()).total,
    runs: (await (await svc.get("/v1/runs?limit=1")).json()).total,
  });
  const before = await counts();
  const inlineBand = (
    name: string,
    time: string[],
    value: number[],
    units = "W m-2 nm-1",
    quantity = "spectral_irradiance",
  ) => ({
    name,
    quantity,
    units,
    time,
    value,
  });
  const months = (y0: number, n: number) =>
    Array.from(
      { length: n },
      (_, i) => `${y0 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, "0")}`,
    );
  const body = (bands: unknown[]) => ({ tsi_model: model.id, proxies, bands });
  const cases: [string, unknown, string, RegExp][] = [
    [
      "overlapping bands",
      body([BANDS[0], { ...BANDS[1], lower: 215 }]),
      "/bands/1/lower",
      /overlaps/,
    ],
    ["unsorted bands", body([BANDS[1], BANDS[0]]), "/bands/1/lower", /sorted/],
    ["an empty band", body([{ ...BANDS[0], upper: 200 }]), "/bands/0/upper", /exceed/],
    [
      "a band without time overlap with the proxies",
      body([BANDS[0], {
        lower: 220,
        upper: 240,
        series: inlineBand(
          "old band",
          months(1900, 24),
          Array.from({ length: 24 }, (_, i) => 0.25 + 1e-4 * i),
        ),
      }]),
      "/bands/1/series",
      /does not overlap the proxies in time/,
    ],
    [
      "a constant band record",
      body([BANDS[0], {
        lower: 220,
        upper: 240,
        series: inlineBand("flat band", months(2005, 60), Array(60).fill(0.25)),
      }]),
      "/bands/1/series",
      /same value/,
    ],
    [
      "a band that is not spectral irradiance",
      body([BANDS[0], { lower: 220, upper: 240, series: DEMO.TSI }]),
      "/bands/1/series",
      /spectral irradiance/,
    ],
    [
      "a band series in kelvin",
      body([BANDS[0], {
        lower: 220,
        upper: 240,
        series: inlineBand(
          "hot band",
          months(2005, 60),
          Array.from({ length: 60 }, (_, i) => 300 + i),
          "K",
        ),
      }]),
      "/bands/1/series/units",
      /contradict/,
    ],
  ];
  for (const [what, request, pointer, message] of cases) {
    await t.step(what, async () => {
      const res = await svc.post("/v1/irradiance/spectral-models", request);
      const p = await assertProblem(res, 422);
      const e = p.errors.find((x: { pointer: string }) => x.pointer === pointer);
      assert.ok(e, `${what}: ${JSON.stringify(p.errors)}`);
      assert.match(e.message, message);
      assert.deepEqual(await counts(), before, `${what}: nothing stored`);
    });
  }
  await svc.close();
});

Deno.test("the API reference's example bands are demo bands with their content ids", () => {
  for (const b of DEMO_SPECTRAL_BANDS) {
    assert.ok(BANDS.some((x: typeof b) => JSON.stringify(x) === JSON.stringify(b)), b.series);
  }
});
