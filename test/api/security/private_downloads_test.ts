/**
 * A private item's representations stay out of shared caches: every 200 and 304 of a series
 * or run seen with an API key and not public says `Cache-Control: private` (RFC 9111 §5.2.2.7),
 * whatever its format (JSON, CSV, SVG, NetCDF) and whether it was made for this request or
 * served from the service's cache; a public one says `public`.
 */
import assert from "node:assert/strict";
import { meanKind } from "../test_kinds.ts";
import { RUN_KINDS } from "../../../api/analyses/registry.ts";
import { sharedInstance, smallSeries, upload } from "./shared_instance.ts";

Deno.test("private series and runs are never marked public, in any format", async () => {
  const svc = await sharedInstance({ kinds: [...RUN_KINDS, meanKind] });
  try {
    const owner = await svc.owner("analyst_b");
    const sid = await upload(owner, smallSeries("analyst_b-downloads"));
    const res = await owner.post("/v1/test-mean", { series: sid, replicates: 5 });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run));
    const paths = [
      `/v1/series/${sid}`,
      `/v1/series/${sid}?format=csv`,
      `/v1/series/${sid}?format=netcdf`,
      `/v1/series/${sid}?format=netcdf&calendar=noleap`,
      `/v1/series/${sid}/chart.svg`,
      `/v1/runs/${run.id}`,
      `/v1/runs/${run.id}/chart.svg`,
      `/v1/runs/${run.id}/outputs/doubled`,
      `/v1/runs/${run.id}/outputs/doubled?format=csv`,
      `/v1/runs/${run.id}/outputs/doubled?format=netcdf`,
      `/v1/runs/${run.id}/outputs/doubled?format=netcdf&calendar=360_day`,
    ];
    const sweep = async (want: "private" | "public") => {
      for (const path of paths) {
        // made for the first request, then from the cache (and the fast path), then a 304
        for (const round of ["first", "cached"]) {
          const r = await owner.get(path);
          assert.equal(r.status, 200, `${path} (${round})`);
          await r.body?.cancel();
          const cc = r.headers.get("cache-control") ?? "";
          assert.ok(cc.startsWith(`${want},`), `${path} (${round}): Cache-Control ${cc}`);
          const nm = await owner.get(path, { "If-None-Match": r.headers.get("etag")! });
          assert.equal(nm.status, 304, `${path} (${round}) with its ETag`);
          const cc304 = nm.headers.get("cache-control") ?? "";
          assert.ok(cc304.startsWith(`${want},`), `${path} 304 (${round}): Cache-Control ${cc304}`);
        }
      }
    };
    await sweep("private");
    for (const path of [`/v1/series/${sid}/sharing`, `/v1/runs/${run.id}/sharing`]) {
      const r = await owner.put(path, { visibility: "public" });
      assert.equal(r.status, 200, path);
      await r.body?.cancel();
    }
    await sweep("public");
  } finally {
    await svc.close();
  }
});
