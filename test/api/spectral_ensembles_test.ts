/**
 * Spectral reconstruction ensembles over HTTP, on the SYNTHETIC demo record (fixtures/demo):
 * members of every band drawn jointly, integrals as weighted sums of each member's bands, the
 * ensemble's band in the spectrum, the outputs, the CSV and the NetCDF-CF file (members on a
 * `realization` dimension, read back by Debian's python3-xarray), and the size limit.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp } from "./helpers.ts";
import { createdRun, DEMO, demoSpectralModel } from "./demo_inputs.ts";
import { memberValues } from "../../api/analyses/spectral_irradiance_reconstructions/ensemble.ts";

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

/** Reads the members of a spectrum file with xarray and prints what the test compares. */
const XARRAY_READER = `
import json, sys
import numpy as np, xarray as xr
with xr.open_dataset(sys.argv[1], use_cftime=True) as ds:
    e = ds.ssi_realizations
    nan = lambda a: [[None if np.isnan(v) else float(v) for v in row] for row in np.asarray(a)]
    print(json.dumps({
        "dims": {k: int(v) for k, v in ds.sizes.items()},
        "ens_dims": list(e.dims),
        "realization": ds.realization.values.tolist(),
        "first": nan(e.isel(realization=0).values),
        "last": nan(e.isel(realization=-1).values),
        "lower": nan(ds.ssi_lower.values),
        "mean_sd_ratio": float((e.std("realization", ddof=1) / ds.ssi_uncertainty).mean()),
    }))
`;

Deno.test("spectral ensembles: bands and integrals from jointly drawn members, in JSON, CSV and NetCDF", async (t) => {
  const svc = await makeTestApp();
  try {
    const { proxies, spectral } = await demoSpectralModel(svc);
    const request = {
      model: spectral.id,
      sunspot_number: DEMO.SSN,
      proxies,
      period: { start: "1700", end: "2025" },
      resolution: "annual",
      ranges: [{ lower: 200, upper: 400 }],
    };
    const analytic = (await createdRun(svc, "/v1/irradiance/spectral-reconstructions", request))
      .result;
    const M = 100;
    const rec = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", {
      ...request,
      realizations: M,
      seed: 7,
    });
    const r = rec.result, s = r.spectrum, e = r.ensemble;
    const n = s.time.length, B = s.bands.length;

    await t.step(
      "without realizations: no members, an analytic band, the same central values",
      () => {
        assert.equal(analytic.ensemble, null);
        assert.equal(analytic.band.method, "analytic");
        assert.equal(analytic.spectrum.lower, undefined);
        assert.deepEqual(analytic.spectrum.value, s.value);
        assert.ok(!analytic.cautions.some((c: string) => /no ensemble yet/.test(c)));
        assert.ok(
          analytic.cautions.some((c: string) => /^The uncertainty band \(analytic\)/.test(c)),
        );
      },
    );

    await t.step("the band is the members' and says which sources it holds", () => {
      assert.equal(e.realizations, M);
      assert.equal(e.seed, 7);
      assert.equal(e.bands.length, B);
      assert.equal(r.band.method, "ensemble_quantiles");
      assert.deepEqual(
        r.band.included.map((x: { source: string }) => x.source),
        ["calibration", "residual", "mapping", "input"],
      );
      assert.match(s.interval, /95 % interval of 100 ensemble members/);
      assert.equal(s.lower.length, B);
      // members' SD against the analytic SD: the same to sampling error of 100 members
      // (relative SE of an SD ≈ 1/√(2·99) = 7 %); averaged over bands and years
      let ratio = 0, count = 0;
      for (let b = 0; b < B; b++) {
        for (let i = 0; i < n; i += 5) {
          ratio += s.uncertainty[b][i] / analytic.spectrum.uncertainty[b][i];
          count++;
        }
      }
      ratio /= count;
      assert.ok(Math.abs(ratio - 1) < 0.05, `mean ensemble/analytic SD ${ratio}`);
      // and the band grows back in time (the sunspot number's own error) in the ultraviolet
      assert.ok(s.uncertainty[0][0] > 1.5 * s.uncertainty[0][310]);
    });

    await t.step("a member of an integral is the weighted sum of that member's bands", () => {
      const integral = r.outputs.integral;
      assert.match(integral.interval, /100 ensemble members/);
      for (const k of [0, 57, M - 1]) {
        const bands = e.bands.map((m: never, b: number) => memberValues(s.value[b], m, k));
        const sum = memberValues(integral.value, e.outputs.integral, k);
        for (const i of [0, 150, 325]) {
          const want = s.bands.reduce(
            (acc: number, bb: { lower: number; upper: number }, b: number) =>
              acc + (bb.upper - bb.lower) * bands[b][i],
            0,
          );
          // both stored to 1/1000 of their SD; the band values to 9 digits
          assert.ok(
            Math.abs(sum[i] - want) < 2e-3 * integral.uncertainty[i] + 1e-5,
            `member ${k} year ${s.time[i]}: ${sum[i]} vs ${want}`,
          );
        }
      }
      assert.ok(e.outputs.range_200_400);
      assert.deepEqual(e.adjusted, []);
    });

    await t.step("the same seed gives the same members", async () => {
      const again = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", {
        ...request,
        realizations: M,
        seed: 7,
      });
      assert.notEqual(again.id, rec.id, "a second run, not the stored one");
      assert.equal(again.result_digest, rec.result_digest);
      const other = await createdRun(svc, "/v1/irradiance/spectral-reconstructions", {
        ...request,
        realizations: 2,
        seed: 8,
      });
      assert.notDeepEqual(other.result.ensemble.bands[0].offsets[0], e.bands[0].offsets[0]);
      assert.equal(other.result.band.method, "ensemble_sd");
      assert.ok(other.result.warnings.some((w: string) => /rest on 2 members/.test(w)));
    });

    await t.step("the CSV carries the ensemble's bounds", async () => {
      const text = await (await svc.get(`/v1/runs/${rec.id}/spectrum?format=csv`)).text();
      assert.match(text, /not symmetric about the value/);
      const row = text.split("\n").filter((l) => l && !l.startsWith("#"))[1].split(",");
      assert.equal(Number(row[6]), s.lower[0][0]);
      assert.equal(Number(row[7]), s.upper[0][0]);
    });

    await t.step("NetCDF: members on a realization dimension, read back by xarray", async () => {
      const res = await svc.get(`/v1/runs/${rec.id}/spectrum?format=netcdf&calendar=360_day`);
      assert.equal(res.status, 200, await res.clone().text());
      const bytes = new Uint8Array(await res.arrayBuffer());
      if (!HAS_XARRAY) {
        if (Deno.env.get("CI")) assert.fail("python3-xarray is missing on CI");
        console.warn("spectral ensemble NetCDF read-back skipped: /usr/bin/python3 lacks xarray");
        return;
      }
      const dir = await Deno.makeTempDir({ prefix: "sunlag-ssi-ens-" });
      try {
        await Deno.writeFile(`${dir}/ssi.nc`, bytes);
        const out = await new Deno.Command("/usr/bin/python3", {
          args: ["-c", XARRAY_READER, `${dir}/ssi.nc`],
        }).output();
        assert.ok(out.success, new TextDecoder().decode(out.stderr));
        const x = JSON.parse(new TextDecoder().decode(out.stdout));
        assert.deepEqual(x.dims, { time: n, wavelength: B, bnds: 2, realization: M });
        assert.deepEqual(x.ens_dims, ["realization", "time", "wavelength"]);
        assert.deepEqual(x.realization, Array.from({ length: M }, (_, k) => k + 1));
        for (const [got, k] of [[x.first, 0], [x.last, M - 1]]) {
          for (let b = 0; b < B; b += 7) {
            const want = memberValues(s.value[b], e.bands[b], k);
            for (const i of [0, 100, 325]) {
              // float32 in the file: 2^-24 relative
              assert.ok(Math.abs(got[i][b] - want[i]) <= 1e-7 * Math.abs(want[i]));
            }
          }
        }
        assert.equal(x.lower[10][3], s.lower[3][10]);
        // the members' SD is the stored uncertainty (1/1000 of the SD in rounding)
        assert.ok(Math.abs(x.mean_sd_ratio - 1) < 1e-3, `sd ratio ${x.mean_sd_ratio}`);
      } finally {
        await Deno.remove(dir, { recursive: true });
      }
    });

    await t.step("an integral's NetCDF output carries its members", async () => {
      const res = await svc.get(`/v1/runs/${rec.id}/outputs/range_200_400?format=netcdf`);
      assert.equal(res.status, 200, await res.clone().text());
      const bytes = new Uint8Array(await res.arrayBuffer());
      if (!HAS_XARRAY) return;
      const dir = await Deno.makeTempDir({ prefix: "sunlag-ssi-int-" });
      try {
        await Deno.writeFile(`${dir}/range.nc`, bytes);
        const out = await new Deno.Command("/usr/bin/python3", {
          args: [
            "-c",
            "import sys, json, xarray as xr\nwith xr.open_dataset(sys.argv[1]) as ds:\n" +
            "    v = [k for k in ds.data_vars if k.endswith('_realizations')][0]\n" +
            "    print(json.dumps({'dims': list(ds[v].dims), 'm5': float(ds[v].values[5, 40])}))",
            `${dir}/range.nc`,
          ],
        }).output();
        assert.ok(out.success, new TextDecoder().decode(out.stderr));
        const x = JSON.parse(new TextDecoder().decode(out.stdout));
        assert.deepEqual(x.dims, ["realization", "time"]);
        const want = memberValues(r.outputs.range_200_400.value, e.outputs.range_200_400, 5)[40];
        assert.ok(Math.abs(x.m5 - want) <= 1e-7 * Math.abs(want), `${x.m5} vs ${want}`);
      } finally {
        await Deno.remove(dir, { recursive: true });
      }
    });

    await t.step(
      "too many member values: a problem naming the fields, nothing stored",
      async () => {
        const runs = async () => (await (await svc.get("/v1/runs?limit=1")).json()).total;
        const before = await runs();
        // 1,000 × 326 annual cells fits per series, but not for 32 bands and 2 integrals
        const p = await assertProblem(
          await svc.post("/v1/irradiance/spectral-reconstructions", {
            ...request,
            realizations: 1000,
          }),
          422,
        );
        assert.equal(p.errors[0].pointer, "/realizations");
        assert.match(p.errors[0].message, /\/realizations, \/period, \/resolution/);
        // refused from the request alone: daily cells
        const d = await assertProblem(
          await svc.post("/v1/irradiance/spectral-reconstructions", {
            ...request,
            resolution: "daily",
            realizations: 100,
          }),
          422,
        );
        assert.equal(d.errors[0].pointer, "/realizations");
        assert.match(d.errors[0].message, /daily cells/);
        assert.equal(await runs(), before);
      },
    );
  } finally {
    await svc.close();
  }
});
