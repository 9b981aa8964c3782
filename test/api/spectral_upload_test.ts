/**
 * Spectral records uploaded as NetCDF (POST /v1/series/spectral) against what xarray decodes
 * from the same files (fixtures/netcdf/make_spectral_record.py: Debian python3-netcdf4 wrote
 * them, python3-xarray/cftime decoded them; versions in spectral_record.json): one series per
 * band with the same values and band bounds, whatever the file's calendar, band order,
 * wavelength units, dimension order or packing; bad files refused with nothing stored.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, type TestService } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO, demoIrradianceModel } from "./demo_inputs.ts";

const dir = new URL("../../fixtures/netcdf/", import.meta.url);
const REF = JSON.parse(await Deno.readTextFile(new URL("spectral_record.json", dir)));

async function upload(svc: TestService, body: Uint8Array<ArrayBuffer>, query = "") {
  return await svc.app.request(`/v1/series/spectral${query}`, {
    method: "POST",
    headers: { "content-type": "application/x-netcdf" },
    body,
  });
}

Deno.test("POST /v1/series/spectral stores one series per band as xarray decodes the file", async (t) => {
  const svc = await makeTestApp();
  for (
    const [file, want] of Object.entries(REF.files) as [
      string,
      { bands: number[][]; values: (number | null)[][] },
    ][]
  ) {
    await t.step(file, async () => {
      const res = await upload(svc, await Deno.readFile(new URL(file, dir)));
      const body = await res.json();
      assert.equal(res.status, 201, JSON.stringify(body));
      assert.deepEqual(
        body.bands.map((b: { lower: number; upper: number }) => [b.lower, b.upper]),
        want.bands,
      );
      assert.equal(body.report.bounds_variable, "wavelength_bnds");
      for (const [k, b] of body.bands.entries()) {
        const s = await (await svc.get(`/v1/series/${b.series}`)).json();
        assert.equal(s.quantity, "spectral_irradiance");
        assert.equal(s.units, "W m-2 nm-1");
        assert.equal(s.resolution, "monthly");
        // missing months are gaps: compare the values present
        const present = want.values[k].filter((v) => v !== null);
        assert.deepEqual(s.value, present, `${file} band ${k}`);
        assert.equal(s.time[0], 2005 + 15.5 / 365); // mid-January 2005 on sunlag's axis
      }
    });
  }
  await svc.close();
});

Deno.test("an uploaded NetCDF record goes straight into a spectral model", async () => {
  const svc = await makeTestApp();
  await loadDemo(svc.store);
  const { psi, model } = await demoIrradianceModel(svc);
  const up = await (await upload(svc, await Deno.readFile(new URL("spectral_record_nc3.nc", dir))))
    .json();
  const res = await svc.post("/v1/irradiance/spectral-models", {
    tsi_model: model.id,
    proxies: [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: psi }],
    bands: up.bands,
    method: "ols",
  });
  const run = await res.json();
  assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
  assert.equal(run.result.bands.length, 6);
  assert.equal(run.result.bands[2].n, 71); // one month missing in that band
  await svc.close();
});

Deno.test("bad spectral NetCDF uploads are refused and store nothing", async (t) => {
  const svc = await makeTestApp();
  const count = async () => (await (await svc.get("/v1/series?limit=1")).json()).total;
  const before = await count();
  const nc3 = await Deno.readFile(new URL("spectral_record_nc3.nc", dir));
  await t.step("not NetCDF", async () => {
    await assertProblem(await upload(svc, new TextEncoder().encode("date,value\n")), 415);
  });
  await t.step("a variable that is not (time, wavelength)", async () => {
    const p = await assertProblem(await upload(svc, nc3, "?variable=time_bnds"), 422);
    assert.match(p.detail, /wavelength dimension|time/);
  });
  await t.step("an unknown variable", async () => {
    const p = await assertProblem(await upload(svc, nc3, "?variable=nope"), 422);
    assert.equal(p.errors[0].pointer, "/variable");
  });
  await t.step("a record without wavelength bounds", async () => {
    const file = await Deno.readFile(new URL("spectral_record_no_bounds.nc", dir));
    const p = await assertProblem(await upload(svc, file), 422);
    assert.match(p.detail, /no bounds variable/);
  });
  await t.step("a record whose units are not spectral irradiance", async () => {
    const file = await Deno.readFile(new URL("spectral_record_kelvin.nc", dir));
    const p = await assertProblem(await upload(svc, file), 422);
    assert.match(p.detail, /not spectral irradiance/);
    assert.equal(p.errors[0].pointer, "/variable");
  });
  assert.equal(await count(), before);
  await svc.close();
});
