/**
 * Forcing from a spectral reconstruction's integral, on the SYNTHETIC demo record
 * (fixtures/demo): the covered-range integral and a requested range's, member by member when
 * the run has an ensemble; the same numbers as the same values uploaded as a series (ΔF =
 * ΔS·(1 − α)/4, IPCC AR6 WG1 §7.3.4.4); the caution that a band integral is not TSI in the
 * result, CSV, NetCDF and chart; bad input as problems with nothing stored.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, uploadSeries } from "./helpers.ts";
import { createdRun, DEMO, demoSpectralModel } from "./demo_inputs.ts";
import { memberValues } from "../../api/analyses/spectral_irradiance_reconstructions/ensemble.ts";
import { membersFromJson } from "../../api/analyses/common/ensemble_members.ts";
import { noteText, squash } from "./svg_text.ts";

/** The values of an output uploaded as an annual TSI series (ISO years: stored mid-year). */
function asSeries(name: string, time: number[], value: ArrayLike<number | null>) {
  return {
    name,
    quantity: "tsi",
    units: "W m-2",
    time: time.map((t) => String(Math.floor(t))),
    value: Array.from(value, (v) => (v === null || !Number.isFinite(v) ? null : v)),
  };
}

Deno.test("forcing from a spectral reconstruction's integral, with its members", async (t) => {
  const svc = await makeTestApp();
  try {
    const { model, proxies, spectral } = await demoSpectralModel(svc);
    const request = {
      model: spectral.id,
      sunspot_number: DEMO.SSN,
      proxies,
      period: { start: "1850", end: "2025" },
      resolution: "annual",
      ranges: [{ lower: 200, upper: 400 }],
    };
    const M = 100;
    const rec = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", {
      ...request,
      realizations: M,
      seed: 11,
    });
    const plain = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", request);
    const r = rec.result;
    const reference = { kind: "period", period: { start: "1986", end: "1996" } };
    const f = await createdRun(svc, "/v1/forcing", {
      spectral_reconstruction: { run: rec.id, output: "range_200_400" },
      reference,
    });
    const fo = f.result.outputs.forcing;
    const n = fo.time.length;

    await t.step("one forcing member per member, with the spectral run's band statement", () => {
      assert.deepEqual(fo.time, r.outputs.range_200_400.time);
      assert.equal(
        fo.name,
        "Solar radiative forcing of the 200–400 nm integral (not TSI: that range's variation only)",
      );
      assert.equal(f.result.ensemble.realizations, M);
      assert.equal(f.result.ensemble.seed, 11);
      assert.equal(f.result.band.method, "ensemble_quantiles");
      assert.deepEqual(
        f.result.band.included.map((x: { source: string }) => x.source),
        r.band.included.map((x: { source: string }) => x.source),
      );
      assert.match(f.result.uncertainty_method, /each member against its own reference mean/);
      assert.deepEqual(f.result.spectral, {
        run: rec.id,
        output: "range_200_400",
        lower: 200,
        upper: 400,
        covered_nm: 200,
        missing: [],
        full_coverage: false,
      });
      assert.match(f.result.formula, /ΔS·\(1 − α\)\/4, S the 200–400 nm integral/);
      assert.match(f.result.reference.label, /^mean of the 200–400 nm integral over/);
      // member k of the forcing is (S_k − mean S_k over the reference)(1 − α)/4 of member k of
      // the integral (IPCC AR6 WG1 §7.3.4.4), to the 1 μW m-2 rounding of stored members
      const fm = membersFromJson(f.result.ensemble.members);
      const { start, end } = f.result.reference;
      for (const k of [0, 13, M - 1]) {
        const s = memberValues(r.outputs.range_200_400.value, r.ensemble.outputs.range_200_400, k);
        let sum = 0, count = 0;
        fo.time.forEach((tt: number, i: number) => {
          if (tt >= start && tt < end) (sum += s[i], count++);
        });
        const ref = sum / count;
        for (const i of [0, 60, n - 1]) {
          const want = (s[i] - ref) * (1 - 0.29) / 4;
          assert.ok(Math.abs(fm[k * n + i] - want) <= 1e-6, `member ${k} cell ${i}`);
        }
      }
    });

    await t.step("the caution: a band integral is not TSI, with its range", () => {
      const c = f.result.cautions[0];
      assert.match(c, /^Not TSI: /);
      assert.match(c, /integrated over 200–400 nm \(200 nm covered by bands\)/);
      assert.match(c, /variation of the rest of the spectrum is not included/);
      const cover = r.consistency.spectral_coverage;
      assert.ok(c.includes(`span ${cover.lower}–${cover.upper} nm`));
      // the spectral run's own cautions reach the forcing through the run machinery
      const inherited = (f.result.inherited ?? []).filter((x: { run: string }) => x.run === rec.id);
      assert.ok(inherited.length > 0, "inherits the spectral run's notes");
    });

    await t.step(
      "the covered-range integral: its span, and the caution matches coverage",
      async () => {
        const g = await createdRun(svc, "/v1/forcing", {
          spectral_reconstruction: { run: rec.id },
          reference,
        });
        const cover = r.consistency.spectral_coverage;
        assert.equal(g.result.spectral.output, "integral");
        assert.equal(g.result.spectral.lower, cover.lower);
        assert.equal(g.result.spectral.upper, cover.upper);
        assert.equal(g.result.spectral.full_coverage, r.consistency.full_coverage);
        assert.match(
          g.result.cautions[0],
          r.consistency.full_coverage ? /so S stands for TSI/ : /^Not TSI: /,
        );
        assert.equal(g.result.ensemble.realizations, M);
      },
    );

    await t.step("the same numbers as the integral's values uploaded as a TSI series", async () => {
      const o = r.outputs.range_200_400;
      const series = await uploadSeries(svc, asSeries("integral 200-400", o.time, o.value));
      const viaSeries = await createdRun(svc, "/v1/forcing", { tsi: series, reference });
      const sv = viaSeries.result.outputs.forcing;
      assert.deepEqual(sv.time, fo.time);
      assert.deepEqual(sv.value, fo.value);
      assert.equal(viaSeries.result.reference.tsi, f.result.reference.tsi);
      assert.equal(viaSeries.result.reference.points, f.result.reference.points);
      // and one member uploaded gives that forcing member (to the 1 μW m-2 rounding)
      const k = 7;
      const s = memberValues(o.value, r.ensemble.outputs.range_200_400, k);
      const mid = await uploadSeries(svc, asSeries("member 8", o.time, s));
      const viaMember = await createdRun(svc, "/v1/forcing", { tsi: mid, reference });
      const fm = membersFromJson(f.result.ensemble.members);
      viaMember.result.outputs.forcing.value.forEach((v: number, i: number) => {
        assert.ok(Math.abs(v - fm[k * n + i]) <= 1e-6, `cell ${i}: ${v} vs ${fm[k * n + i]}`);
      });
    });

    await t.step("without an ensemble: the central values, no σ, and a warning", async () => {
      const p = await createdRun(svc, "/v1/forcing", {
        spectral_reconstruction: { run: plain.id, output: "range_200_400" },
        reference,
      });
      assert.deepEqual(p.result.outputs.forcing.value, fo.value);
      assert.equal(p.result.ensemble, null);
      assert.equal(p.result.band, null);
      assert.equal(p.result.outputs.forcing.uncertainty, undefined);
      assert.match(p.result.warnings[0], /has no ensemble, so the forcing has no uncertainty/);
    });

    await t.step("the caution in the CSV, the NetCDF file and the chart", async () => {
      const caution = f.result.cautions[0];
      const csv = await (await svc.get(`/v1/runs/${f.id}/outputs/forcing?format=csv`)).text();
      assert.ok(csv.includes(`# caution: ${caution}`), "CSV # line");
      const nc = new Uint8Array(
        await (await svc.get(`/v1/runs/${f.id}/outputs/forcing?format=netcdf`)).arrayBuffer(),
      );
      assert.ok(new TextDecoder().decode(nc).includes(caution), "NetCDF cautions attribute");
      const svg = await (await svc.get(`/v1/runs/${f.id}/chart.svg?width=1600&height=1400`))
        .text();
      assert.ok(noteText(svg).includes(squash("Not TSI:")), "chart caution");
    });

    await t.step("bad input: problems naming the field, nothing stored", async () => {
      const runs = async () => (await (await svc.get("/v1/runs?limit=1")).json()).total;
      const before = await runs();
      const cases: [Record<string, unknown>, string, RegExp][] = [
        [
          { spectral_reconstruction: { run: rec.id, output: "range_100_200" } },
          "/spectral_reconstruction/output",
          /no integral named "range_100_200"; its integrals are "integral", "range_200_400"/,
        ],
        [
          { spectral_reconstruction: { run: rec.id, output: "tsi" } },
          "/spectral_reconstruction/output",
          /no integral named "tsi"/,
        ],
        [
          { spectral_reconstruction: { run: model.id } },
          "/spectral_reconstruction/run",
          /is a irradiance-models run; a spectral-irradiance-reconstructions run is needed/,
        ],
        [
          { spectral_reconstruction: { run: "01a2360b-0000-7000-8000-0123456789ab" } },
          "/spectral_reconstruction/run",
          /no run has id/,
        ],
        [
          { spectral_reconstruction: { run: "not-a-run" } },
          "/spectral_reconstruction/run",
          /run id/,
        ],
        [
          { spectral_reconstruction: { run: rec.id }, reconstruction: rec.id },
          "/tsi",
          /exactly one of tsi/,
        ],
        [
          { spectral_reconstruction: { run: rec.id, output: "" } },
          "/spectral_reconstruction/output",
          /./,
        ],
      ];
      for (const [body, pointer, message] of cases) {
        const p = await assertProblem(await svc.post("/v1/forcing", { ...body, reference }), 422);
        assert.equal(p.errors[0].pointer, pointer, JSON.stringify(p));
        assert.match(p.errors[0].message, message);
      }
      // a reference period the integral does not reach
      const far = await assertProblem(
        await svc.post("/v1/forcing", {
          spectral_reconstruction: { run: rec.id },
          reference: { kind: "period", period: { start: "1600", end: "1650" } },
        }),
        422,
      );
      assert.equal(far.errors[0].pointer, "/reference/period");
      assert.equal(await runs(), before);
    });

    await t.step("a spectral run that did not succeed: a problem naming the field", async () => {
      const res = await svc.post("/v1/irradiance/spectral-reconstructions", {
        ...request,
        realizations: 100,
        seed: 12,
      }, { prefer: "respond-async" });
      assert.equal(res.status, 202);
      const { id } = await res.json();
      const c = await svc.post(`/v1/runs/${id}/cancel`, {});
      assert.equal((await c.json()).status, "cancelled");
      await svc.runs.settle();
      const runs = async () => (await (await svc.get("/v1/runs?limit=1")).json()).total;
      const before = await runs();
      const p = await assertProblem(
        await svc.post("/v1/forcing", { spectral_reconstruction: { run: id }, reference }),
        422,
      );
      assert.equal(p.errors[0].pointer, "/spectral_reconstruction/run");
      assert.match(p.errors[0].message, /has status cancelled; only succeeded runs can be used/);
      assert.equal(await runs(), before);
    });

    await t.step("an energy-balance run takes it, member by member", async () => {
      const eb = await createdRun(svc, "/v1/energy-balance", { forcing_run: f.id });
      assert.equal(eb.result.ensemble.realizations, M);
      assert.ok(
        (eb.result.inherited ?? []).some((x: { text: string }) => x.text === f.result.cautions[0]),
        "the not-TSI caution reaches the response",
      );
    });

    await t.step("replay gives the same bytes", async () => {
      const rep = await (await svc.post(`/v1/runs/${f.id}/replay`, {})).json();
      assert.equal(rep.identical, true, rep.note);
    });
  } finally {
    await svc.close();
  }
});
