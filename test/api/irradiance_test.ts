import assert from "node:assert/strict";
import { demoFileEntries, loadDemo } from "../../api/demo.ts";
import { assertProblem, makeTestApp, type TestService } from "./helpers.ts";
import { julianDay, solarDiscGeometry } from "../../core/irradiance/mod.ts";
import { periodKey, periodOfKey } from "../../core/series/mod.ts";
import { parseIsoTime } from "../../core/time/mod.ts";
import { fitSunspotMapping } from "../../core/irradiance/sunspot_proxy_mapping.ts";
import { camelKeys, camelName, snakeKeys, snakeName } from "../../api/analyses/common/keys.ts";

// deno-lint-ignore no-explicit-any
type Json = any;

const manifest: Json = JSON.parse(
  Deno.readTextFileSync(new URL("../../fixtures/demo/manifest.json", import.meta.url)),
);
const groups2001: Json = JSON.parse(
  Deno.readTextFileSync(new URL("../../fixtures/demo/spot_groups_2001.json", import.meta.url)),
);

async function demoIds(svc: TestService): Promise<Record<string, string>> {
  const entries = await demoFileEntries();
  const ids = await loadDemo(svc.store);
  return Object.fromEntries(entries.map((e, i) => [e.file, ids[i]]));
}

/** Every object key below `v`, with its path, that is not snake_case like the rest of the API. */
function nonSnakeKeys(v: Json, path = ""): string[] {
  if (Array.isArray(v)) return v.flatMap((x, i) => nonSnakeKeys(x, `${path}/${i}`));
  if (v === null || typeof v !== "object") return [];
  return Object.entries(v).flatMap(([k, x]) => [
    ...(/^[a-z][a-z0-9_]*$/.test(k) ? [] : [`${path}/${k}`]),
    ...nonSnakeKeys(x, `${path}/${k}`),
  ]);
}

async function created(res: Response): Promise<Json> {
  const body = await res.json();
  assert.equal(res.status, 201, JSON.stringify(body).slice(0, 800));
  // requests, results, structured warnings and outputs all speak snake_case
  assert.deepEqual(nonSnakeKeys({ params: body.params, result: body.result }), []);
  return body;
}

Deno.test("irradiance endpoints: darkening → model → reconstruction → forcing on the demo", async (t) => {
  const svc = await makeTestApp();
  try {
    const ids = await demoIds(svc);
    const truth = manifest.truth.tsi;

    let psiId = "";
    await t.step(
      "darkening from total daily area uses the disc-average factor and saves series",
      async () => {
        const run = await created(
          await svc.post("/v1/irradiance/darkening", { total_area: ids["sunspot_area_daily.csv"] }),
        );
        assert.match(run.result.position_factor, /disc average.*exactly 1/);
        const saved = Object.fromEntries(
          run.saved_series.map((s: Json) => [s.output, s.id]),
        );
        assert.ok(saved.psi && saved.darkening);
        psiId = saved.psi;
        // PSI = 0.32·A·1e-6 (Hudson et al. 1982 with factor 1): check the largest day
        const area = (await svc.store.getSeries(ids["sunspot_area_daily.csv"]))!;
        const maxA = Math.max(...area.value);
        assert.ok(Math.abs(run.result.summary.max_psi - 0.32 * maxA * 1e-6) < 1e-12);
      },
    );

    await t.step(
      "darkening from group records: per-group μ, true and projected areas agree",
      async () => {
        const recs = groups2001.records as Json[];
        const body = (areaKind: "true" | "projected") => ({
          groups: {
            time: recs.map((r) => r.date),
            area: recs.map((r) => (areaKind === "true" ? r.area_msh : r.projected_area_msd)),
            area_kind: areaKind,
            position: { kind: "mu", mu: recs.map((r) => r.mu) },
          },
        });
        const a = await created(await svc.post("/v1/irradiance/darkening", body("true")));
        const b = await created(await svc.post("/v1/irradiance/darkening", body("projected")));
        const pa = a.result.outputs.psi.value, pb = b.result.outputs.psi.value;
        assert.equal(pa.length, pb.length);
        // the demo rounds projected areas to 0.1 millionth: agreement to a few percent
        let diff = 0, tot = 0;
        for (let i = 0; i < pa.length; i++) (diff += Math.abs(pa[i] - pb[i])), (tot += pa[i]);
        assert.ok(diff / tot < 0.03, `relative difference ${diff / tot}`);
        // one day by hand: Σ C·A·μ(3μ+2)/2
        const day = recs[0].date;
        const expect = recs.filter((r) => r.date === day).reduce(
          (s, r) => s + 0.32 * r.area_msh * 1e-6 * r.mu * (3 * r.mu + 2) / 2,
          0,
        );
        assert.ok(Math.abs(pa[0] - expect) < 1e-15);
        assert.match(a.result.position_factor, /per group/);
      },
    );

    await t.step(
      "darkening from heliographic coordinates uses the date's B0 (Meeus ch. 29)",
      async () => {
        const recs = (groups2001.records as Json[]).slice(0, 300);
        const run = await created(
          await svc.post("/v1/irradiance/darkening", {
            groups: {
              time: recs.map((r) => r.date),
              area: recs.map((r) => r.area_msh),
              position: {
                kind: "heliographic",
                latitude: recs.map((r) => r.latitude_deg),
                longitude: recs.map((r) => r.cmd_deg),
              },
              source: recs.map((_, i) => (i < 150 ? "station A" : "station B")),
            },
            contrast: { kind: "area_dependent" },
          }),
        );
        assert.match(run.result.position_factor, /Meeus 1998/);
        assert.ok(run.result.warnings.some((w: string) => /1\.15–1\.25/.test(w)));
      },
    );

    await t.step(
      "Carrington longitudes give the same PSI as central-meridian distances",
      async () => {
        const recs = (groups2001.records as Json[]).slice(0, 120);
        const l0 = recs.map((r) => {
          const noon = periodOfKey(periodKey(parseIsoTime(r.date).decimalYear, "daily"), "daily")
            .middle;
          return solarDiscGeometry(julianDay(noon)).l0Deg;
        });
        const body = (from: "central_meridian" | "carrington") => ({
          groups: {
            time: recs.map((r) => r.date),
            area: recs.map((r) => r.area_msh),
            position: {
              kind: "heliographic",
              latitude: recs.map((r) => r.latitude_deg),
              longitude: recs.map((r, i) =>
                from === "carrington" ? (r.cmd_deg + l0[i]) % 360 : r.cmd_deg
              ),
              longitude_from: from,
            },
          },
        });
        const a = await created(
          await svc.post("/v1/irradiance/darkening", body("central_meridian")),
        );
        const b = await created(await svc.post("/v1/irradiance/darkening", body("carrington")));
        a.result.outputs.psi.value.forEach((v: number, i: number) => {
          assert.ok(Math.abs(v - b.result.outputs.psi.value[i]) < 1e-12);
        });
      },
    );

    let modelId = "";
    await t.step("model recovers the demo generator within 95 % intervals", async () => {
      const run = await created(
        await svc.post("/v1/irradiance/models", {
          tsi: ids["tsi_daily.csv"],
          terms: [
            {
              name: "mg",
              role: "facular",
              series: ids["facular_index_daily.csv"],
              quiet_level: truth.F_Q,
            },
            { name: "psi", role: "sunspot_darkening", series: psiId },
          ],
          sunspot_number: ids["sunspot_number_monthly.csv"],
        }),
      );
      modelId = run.id;
      const m = run.result.model, f = run.result.fit;
      const want = [truth.S_Q, truth.a, truth.b];
      want.forEach((w, j) => {
        assert.ok(
          f.lower[j] <= w && w <= f.upper[j],
          `${m.names[j]} ${w} ∉ [${f.lower[j]}, ${f.upper[j]}]`,
        );
      });
      assert.ok(Math.abs(m.rho - truth.noise.ar1) < 0.05);
      // the OLS comparison: same coefficients to a fraction of an SE, narrower (too narrow) SEs
      const alt = run.result.alternative;
      assert.equal(alt.method, "ols");
      for (let j = 0; j < 3; j++) {
        assert.ok(Math.abs(alt.coefficients[j] - m.coefficients[j]) < 2 * f.standard_errors[j]);
        assert.ok(alt.standard_errors[j] < f.standard_errors[j]);
      }
      assert.ok(f.cross_validation.rmse > 0 && f.cross_validation.folds === 5);
      assert.equal(run.result.mappings.sunspot_version, "2");
      assert.ok(["linear", "saturating"].includes(run.result.mappings.terms.mg.chosen.form));
      // no quiet-Sun-scale warning: the demo is on the 1360.8 W m-2 scale
      assert.ok(
        !run.result.warnings.some((w: string) => /quiet-Sun level/.test(w)),
        run.result.warnings.join(" | "),
      );
    });

    let recId = "";
    await t.step(
      "annual reconstruction back-extends to 1700 and covers the generator's truth",
      async () => {
        const run = await created(
          await svc.post("/v1/irradiance/reconstructions", {
            model: modelId,
            proxies: [
              { term: "mg", series: ids["facular_index_daily.csv"] },
              { term: "psi", series: psiId },
            ],
            sunspot_number: ids["sunspot_number_monthly.csv"],
            period: { start: "1700", end: "2024" },
            resolution: "annual",
          }),
        );
        recId = run.id;
        const r = run.result;
        assert.ok(r.coverage.back_extended.cells >= 270);
        assert.ok(r.coverage.direct.cells >= 40);
        assert.equal(r.scenario.kind, "none");
        // cycle amplitude within the published range (SCIENCE.md §1: 0.9–1.6 W m-2)
        assert.ok(r.cycle_amplitude.median >= 0.9 && r.cycle_amplitude.median <= 1.6);
        // the demo's pre-1978 truth is TSI = S_Q + γ·R (manifest truth.tsi_proxy_mapping)
        const gamma = manifest.truth.tsi_proxy_mapping.gamma_w_m2_per_sunspot_number;
        const ss = (await svc.store.getSeries(ids["sunspot_number_monthly.csv"]))!;
        const yearly = new Map<number, number[]>();
        ss.time.forEach((t, i) => {
          const y = Math.floor(t);
          if (!yearly.has(y)) yearly.set(y, []);
          yearly.get(y)!.push(ss.value[i]);
        });
        const o = r.outputs.tsi;
        let hit = 0, total = 0;
        o.time.forEach((t: number, i: number) => {
          const y = Math.floor(t);
          if (y >= 1978 || !yearly.has(y) || o.value[i] === null) return;
          const rs = yearly.get(y)!;
          const tr = truth.S_Q + gamma * rs.reduce((a, b) => a + b, 0) / rs.length;
          total++;
          if (o.lower[i] <= tr && tr <= o.upper[i]) hit++;
        });
        assert.ok(total > 250);
        // the bands are prediction intervals for measured TSI (residual noise included), so they
        // over-cover this noise-free truth (277 of 278 years when written); 90 % is the floor
        assert.ok(hit / total >= 0.9, `coverage of the pre-1978 truth ${hit}/${total}`);
        // back-extended years have wider intervals than direct ones
        const width = (i: number) => o.upper[i] - o.lower[i];
        const iBack = o.time.findIndex((t: number) => t > 1800);
        const iDirect = o.time.findIndex((t: number) => t > 2000);
        assert.ok(width(iBack) > width(iDirect));
        assert.ok(r.cautions.some((c: string) => /model-dependent/.test(c)));
      },
    );

    await t.step(
      "a period of whole ISO months or days gives exactly those cells (12 months, 31 days)",
      async () => {
        const rec = async (period: { start: string; end: string }, resolution: string) =>
          (await created(
            await svc.post("/v1/irradiance/reconstructions", {
              model: modelId,
              proxies: [
                { term: "mg", series: ids["facular_index_daily.csv"] },
                { term: "psi", series: psiId },
              ],
              period,
              resolution,
            }),
          )).result;
        // 2001-01..2001-12 once returned 13 cells and 2001-01-01..2001-01-31 32: the period end
        // is exclusive of the period after it (core/series periodKeyRange)
        const monthly = await rec({ start: "2001-01", end: "2001-12" }, "monthly");
        assert.equal(monthly.coverage.cells, 12);
        assert.equal(monthly.outputs.tsi.time.length, 12);
        assert.ok(monthly.outputs.tsi.time.at(-1) < 2002);
        const daily = await rec({ start: "2001-01-01", end: "2001-01-31" }, "daily");
        assert.equal(daily.coverage.cells, 31);
        assert.ok(daily.outputs.tsi.time.at(-1) < parseIsoTime("2001-02-01").start);
        assert.equal((await rec({ start: "2001", end: "2001" }, "annual")).coverage.cells, 1);
      },
    );

    await t.step("422: the model must be an irradiance-models run", async () => {
      const p = await assertProblem(
        await svc.post("/v1/irradiance/reconstructions", {
          model: recId,
          period: { start: "2001", end: "2002" },
        }),
        422,
      );
      assert.equal(p.errors[0].pointer, "/model");
      assert.equal(p.kind, "irradiance-reconstructions");
    });

    await t.step("reconstruction outputs come as JSON and CSV and can be saved", async () => {
      const j = await svc.get(`/v1/runs/${recId}/outputs/tsi`);
      assert.equal(j.status, 200);
      const csv = await svc.get(`/v1/runs/${recId}/outputs/tsi`, { accept: "text/csv" });
      assert.equal(csv.status, 200);
      assert.match(await csv.text(), /1700/);
      const saved = await svc.post(`/v1/runs/${recId}/outputs/tsi/series`, {});
      assert.equal(saved.status, 201);
    });

    await t.step("model and reconstruction runs replay byte for byte", async () => {
      for (const id of [modelId, recId]) {
        const res = await svc.post(`/v1/runs/${id}/replay`, {});
        const body = await res.json();
        assert.equal(res.status, 200, JSON.stringify(body));
        assert.equal(body.identical, true);
      }
    });

    await t.step(
      "a secular background scenario is labelled and rises by delta_tsi between its periods",
      async () => {
        const run = await created(
          await svc.post("/v1/irradiance/reconstructions", {
            model: modelId,
            proxies: [
              { term: "mg", series: ids["facular_index_daily.csv"] },
              { term: "psi", series: psiId },
            ],
            sunspot_number: ids["sunspot_number_monthly.csv"],
            period: { start: "1700", end: "2024" },
            resolution: "annual",
            background: {
              kind: "sunspot_running_mean",
              reference_minimum: { start: "1700", end: "1720" },
              later_period: { start: "1950", end: "2000" },
              delta_tsi: 1.0,
            },
          }),
        );
        assert.equal(run.result.scenario.kind, "sunspot_running_mean");
        // by construction the background rises by delta_tsi from the reference to the later period
        const base = (await (await svc.get(`/v1/runs/${recId}`)).json()).result.outputs.tsi;
        const o = run.result.outputs.tsi;
        const meanDiff = (a: number, b: number) => {
          let s = 0, c = 0;
          o.time.forEach((t: number, i: number) => {
            if (t >= a && t < b && o.value[i] !== null) (s += o.value[i] - base.value[i]), c++;
          });
          return s / c;
        };
        // ISO periods name whole years: "1700" to "1720" is [1700, 1721)
        const rise = meanDiff(1950, 2001) - meanDiff(1700, 1721);
        // (annual cell means of B against period means of the monthly running mean: 1 % slack)
        assert.ok(Math.abs(rise - 1.0) < 0.01, `background rise ${rise}`);
        assert.match(run.result.scenario.label, /SCENARIO/);
        assert.ok(run.result.cautions.some((c: string) => /SCENARIO/.test(c)));
      },
    );

    await t.step("422: a background reference period with no sunspot data", async () => {
      const p = await assertProblem(
        await svc.post("/v1/irradiance/reconstructions", {
          model: modelId,
          sunspot_number: ids["sunspot_number_monthly.csv"],
          period: { start: "1700", end: "1800" },
          resolution: "annual",
          background: {
            kind: "sunspot_running_mean",
            reference_minimum: { start: "1600", end: "1650" },
            later_period: { start: "1950", end: "2000" },
            delta_tsi: 1.0,
          },
        }),
        422,
      );
      assert.equal(p.errors[0].pointer, "/background/reference_minimum");
    });

    await t.step("forcing from the reconstruction relative to a reference period", async () => {
      const run = await created(
        await svc.post("/v1/forcing", {
          reconstruction: recId,
          reference: { kind: "period", period: { start: "1986", end: "1996" } },
        }),
      );
      const o = run.result.outputs.forcing;
      const rec = (await (await svc.get(`/v1/runs/${recId}`)).json()).result.outputs.tsi;
      const i = rec.time.findIndex((t: number) => t > 1990 && t < 1991);
      // IPCC AR6 WG1 §7.3.4.4: ΔF = ΔTSI (1 − 0.29)/4
      const want = (rec.value[i] - run.result.reference.tsi) * 0.71 / 4;
      assert.ok(Math.abs(o.value[i] - want) < 1e-12);
      assert.ok(o.uncertainty[i] > 0);
      assert.equal(o.quantity, "radiative_forcing");
    });

    await t.step("422: version mismatch without a conversion, accepted with one", async () => {
      const ss = (await svc.store.getSeries(ids["sunspot_number_monthly.csv"]))!;
      const v1 = {
        name: "V1 copy",
        quantity: "sunspot_number",
        units: "1",
        version: "1",
        time: Array.from(ss.time).slice(0, 600),
        value: Array.from(ss.value).slice(0, 600).map((v) => v * 0.6),
      };
      const body = {
        model: modelId,
        sunspot_number: v1,
        period: { start: "1700", end: "1740" },
        resolution: "annual",
      };
      const p = await assertProblem(await svc.post("/v1/irradiance/reconstructions", body), 422);
      assert.equal(p.errors[0].pointer, "/sunspot_number");
      assert.equal(p.reason, "version_mismatch");
      assert.equal(p.version, "1");
      assert.equal(p.model_version, "2");
      await created(
        await svc.post("/v1/irradiance/reconstructions", {
          ...body,
          sunspot_conversion: { factor: 1 / 0.6, note: "test" },
        }),
      );
    });

    await t.step("422: reconstruction period outside every proxy's coverage", async () => {
      const p = await assertProblem(
        await svc.post("/v1/irradiance/reconstructions", {
          model: modelId,
          sunspot_number: ids["sunspot_number_monthly.csv"],
          period: { start: "1500", end: "1600" },
        }),
        422,
      );
      assert.equal(p.errors[0].pointer, "/period");
    });

    await t.step("422: collinear proxies report the condition number", async () => {
      const p = await assertProblem(
        await svc.post("/v1/irradiance/models", {
          tsi: ids["tsi_daily.csv"],
          terms: [
            { name: "mg", role: "facular", series: ids["facular_index_daily.csv"] },
            { name: "mg_again", role: "other", series: ids["facular_index_daily.csv"] },
          ],
        }),
        422,
      );
      assert.equal(p.errors[0].pointer, "/terms");
      assert.equal(p.reason, "collinear");
      assert.ok(p.condition_number === null || p.condition_number > 1000);
    });

    await t.step("422: no overlap, and fewer points than coefficients + 2", async () => {
      const noOverlap = await assertProblem(
        await svc.post("/v1/irradiance/models", {
          tsi: ids["tsi_daily.csv"],
          terms: [{ name: "mg", role: "facular", series: ids["facular_index_daily.csv"] }],
          period: { start: "1900", end: "1910" },
        }),
        422,
      );
      assert.equal(noOverlap.errors[0].pointer, "/terms");
      assert.equal(noOverlap.reason, "no_overlap");
      const few = await assertProblem(
        await svc.post("/v1/irradiance/models", {
          tsi: ids["tsi_daily.csv"],
          terms: [{ name: "mg", role: "facular", series: ids["facular_index_daily.csv"] }],
          period: { start: "2001-01-01", end: "2001-01-03" },
        }),
        422,
      );
      assert.equal(few.errors[0].pointer, "/tsi");
      assert.equal(few.reason, "too_few_points");
      assert.equal(few.needed, 4);
    });

    await t.step("422: forcing reference period with no data", async () => {
      const p = await assertProblem(
        await svc.post("/v1/forcing", {
          tsi: ids["tsi_daily.csv"],
          reference: { kind: "period", period: { start: "1900", end: "1901" } },
        }),
        422,
      );
      assert.equal(p.errors[0].pointer, "/reference/period");
    });

    await t.step("422 from schema: both or neither of groups/total_area; bad μ", async () => {
      await assertProblem(await svc.post("/v1/irradiance/darkening", {}), 422);
      const p = await assertProblem(
        await svc.post("/v1/irradiance/darkening", {
          groups: { time: ["2001-01-01"], area: [10], position: { kind: "mu", mu: [1.5] } },
        }),
        422,
      );
      assert.match(JSON.stringify(p.errors), /position/);
    });
  } finally {
    await svc.close();
  }
});

Deno.test("snakeKeys/camelKeys: core results to API JSON and back; snake_case JSON unchanged", () => {
  const choice = fitSunspotMapping([0, 30, 60, 90, 120, 150, 180], [
    0.15,
    0.1531,
    0.1559,
    0.1591,
    0.1619,
    0.1651,
    0.1679,
  ]);
  const api = snakeKeys({ terms: { mg_ii: choice } }) as Json;
  const chosen = api.terms.mg_ii.chosen;
  assert.equal(chosen.sunspot_max, 180);
  assert.ok(Array.isArray(chosen.standard_errors) && "r_squared" in chosen);
  assert.deepEqual(nonSnakeKeys(api), []);
  // stored results of either spelling read the same (JSON writes infinities as null)
  const json = (v: unknown) => JSON.parse(JSON.stringify(v));
  assert.deepEqual(snakeKeys(api), api);
  assert.deepEqual(snakeKeys(json({ terms: { mg_ii: choice } })), api);
  assert.deepEqual(camelKeys(chosen), json(choice.chosen));
  assert.equal(snakeName("adjRSquared"), "adj_r_squared");
  assert.equal(camelName("adj_r_squared"), "adjRSquared");
});

Deno.test("irradiance models: a term whose quantity does not fit its role is warned about", async () => {
  const svc = await makeTestApp();
  await loadDemo(svc.store);
  const TSI = "sha256:4de66a40b207591db1232e642ce89992bf2df2f556d26f12ada5d636c0034a0f";
  const TEMP = "sha256:dc57cafa9ebf93093645c18f5c57f2c59cb3dfc8505841586e88f241a195e480";
  const res = await svc.post("/v1/irradiance/models", {
    tsi: TSI,
    terms: [{ name: "odd", series: TEMP, role: "facular" }],
  });
  const run = await res.json();
  assert.equal(res.status, 201, JSON.stringify(run));
  assert.ok(
    run.result.warnings.some((w: string) => /role facular .* quantity temperature_anomaly/.test(w)),
    JSON.stringify(run.result.warnings),
  );
  await svc.close();
});
