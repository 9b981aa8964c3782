/**
 * Ensembles as NetCDF-CF, read back with Debian's python3-xarray (`open_dataset(...,
 * use_cftime=True)`) and `ncdump -h` (netcdf-bin): a reconstruction's members on a
 * `realization` dimension beside the central TSI, its uncertainty and bounds as ancillary
 * variables, the band's sources in and not in as global attributes; and a forcing run's
 * members. On the demo (SYNTHETIC, fixtures/demo).
 *
 * Skipped with a warning on a machine without xarray or ncdump; failing when CI is set.
 */
import assert from "node:assert/strict";
import { loadDemo } from "../../api/demo.ts";
import { makeTestApp } from "./helpers.ts";
import { DEMO, demoIrradianceModel } from "./demo_inputs.ts";

const PYTHON = "/usr/bin/python3", NCDUMP = "/usr/bin/ncdump";
function works(cmd: string, args: string[]): boolean {
  try {
    return new Deno.Command(cmd, { args, stdout: "null", stderr: "null" }).outputSync().success;
  } catch {
    return false;
  }
}
const READY = works(PYTHON, ["-c", "import xarray, netCDF4, cftime"]) &&
  works("/bin/sh", ["-c", `test -x ${NCDUMP}`]);
const IGNORE = !READY && !Deno.env.get("CI");
if (IGNORE) {
  console.warn("ensembles_netcdf_test: xarray or ncdump absent; read-back checks skipped");
}

const READER = `
import json, sys, warnings
import numpy as np, xarray as xr
warnings.simplefilter("error", xr.SerializationWarning)
with xr.open_dataset(sys.argv[1], use_cftime=True) as ds:
    name = sys.argv[2]
    ens = ds[name + "_realizations"]
    print(json.dumps({
        "dims": {k: int(v) for k, v in ds.sizes.items()},
        "ens_dims": list(ens.dims),
        "realization": ds["realization"].values.tolist(),
        "member0": [None if np.isnan(x) else float(x) for x in ens.values[0]],
        "member_last": [None if np.isnan(x) else float(x) for x in ens.values[-1]],
        "central": [None if np.isnan(x) else float(x) for x in ds[name].values],
        "ancillary": ds[name].attrs.get("ancillary_variables", ""),
        "calendar": ds.time.encoding.get("calendar"),
        "first_time": [ds.time.values[0].year, ds.time.values[0].month],
        "attrs": {k: str(v) for k, v in ds.attrs.items()},
        "std_name": ens.attrs.get("standard_name"),
    }))
`;

async function readBack(bytes: Uint8Array, variable: string) {
  const path = await Deno.makeTempFile({ suffix: ".nc" });
  try {
    await Deno.writeFile(path, bytes);
    const out = new Deno.Command(PYTHON, { args: ["-c", READER, path, variable] }).outputSync();
    assert.ok(out.success, new TextDecoder().decode(out.stderr));
    const dump = new Deno.Command(NCDUMP, { args: ["-h", path] }).outputSync();
    assert.ok(dump.success, new TextDecoder().decode(dump.stderr));
    return {
      json: JSON.parse(new TextDecoder().decode(out.stdout)),
      header: new TextDecoder().decode(dump.stdout),
    };
  } finally {
    await Deno.remove(path);
  }
}

Deno.test({
  name: "a reconstruction's and a forcing run's members open in xarray on a realization axis",
  ignore: IGNORE,
  fn: async (t) => {
    const svc = await makeTestApp();
    try {
      await loadDemo(svc.store);
      const { model, psi } = await demoIrradianceModel(svc);
      const res = await svc.post("/v1/irradiance/reconstructions", {
        model: model.id,
        proxies: [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: psi }],
        sunspot_number: DEMO.SSN,
        period: { start: "1750", end: "2024" },
        resolution: "monthly",
        realizations: 20,
        seed: 5,
      });
      const rec = await res.json();
      assert.equal(res.status, 201, JSON.stringify(rec).slice(0, 400));
      const members = rec.result.ensemble.members;
      await t.step(
        "reconstruction: members, central values, ancillary variables, band",
        async () => {
          const nc = await svc.get(`/v1/runs/${rec.id}/outputs/tsi?format=netcdf&calendar=noleap`);
          assert.equal(nc.status, 200);
          const { json, header } = await readBack(new Uint8Array(await nc.arrayBuffer()), "tsi");
          const n = rec.result.outputs.tsi.time.length;
          assert.deepEqual(json.dims, { time: n, bnds: 2, realization: 20 });
          assert.deepEqual(json.ens_dims, ["realization", "time"]);
          assert.deepEqual(json.realization, Array.from({ length: 20 }, (_, k) => k + 1));
          assert.equal(json.calendar, "noleap");
          assert.deepEqual(json.first_time, [1750, 1]);
          // members are float32 in the file: equal to 1e-4 W m-2 near 1361 (float32 spacing 1.2e-4)
          for (const [got, want] of [[json.member0, members[0]], [json.member_last, members[19]]]) {
            got.forEach((v: number | null, i: number) => {
              if (want[i] === null) assert.equal(v, null);
              else assert.ok(Math.abs(v! - want[i]) <= 1.3e-4, `member value ${i}`);
            });
          }
          assert.deepEqual(json.central, rec.result.outputs.tsi.value);
          assert.match(json.ancillary, /tsi_uncertainty/);
          assert.match(json.ancillary, /tsi_lower/);
          assert.equal(json.std_name, "solar_irradiance");
          assert.equal(json.attrs.uncertainty_band_method, "ensemble_sd");
          assert.match(json.attrs.uncertainty_sources_included, /^calibration: /);
          assert.match(json.attrs.uncertainty_sources_included, /input: the sunspot number/);
          assert.match(json.attrs.uncertainty_sources_not_included, /secular trend/);
          assert.equal(json.attrs.run_id, rec.id);
          assert.match(header, /float tsi_realizations\(realization, time\)/);
        },
      );
      await t.step(
        "forcing: each member against its own reference, on the realization axis",
        async () => {
          const f = await (await svc.post("/v1/forcing", {
            reconstruction: rec.id,
            reference: { kind: "period", period: { start: "1986", end: "1996" } },
          })).json();
          assert.equal(f.status, "succeeded");
          const nc = await svc.get(`/v1/runs/${f.id}/outputs/forcing?format=netcdf`);
          assert.equal(nc.status, 200);
          const { json } = await readBack(
            new Uint8Array(await nc.arrayBuffer()),
            "radiative_forcing",
          );
          assert.equal(json.dims.realization, 20);
          json.member0.forEach((v: number | null, i: number) => {
            const want = f.result.ensemble.members[0][i];
            if (want === null) assert.equal(v, null);
            else assert.ok(Math.abs(v! - want) < 1e-6, `forcing member value ${i}`);
          });
          assert.match(json.attrs.uncertainty_sources_not_included, /reconstruction methods/);
        },
      );
    } finally {
      await svc.close();
    }
  },
});
