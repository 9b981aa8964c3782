import { makeTestApp } from "./test/api/helpers.ts";
import { loadDemo } from "./api/demo.ts";
const svc = await makeTestApp();
await loadDemo(svc.store);
const TSIM = "sha256:dcd8d0bcd0c66f73a1a079649dbcd55d3d0e247c1329eb803a87767023e8576d";
const TEMP = "sha256:dc57cafa9ebf93093645c18f5c57f2c59cb3dfc8505841586e88f241a195e480";
for (const n of [2000, 20000]) {
  const t0 = performance.now();
  const r = await svc.post("/v1/lag-correlations", {
    solar: TSIM,
    climate: TEMP,
    surrogates: n,
    seed: 3,
  });
  let run = await r.json();
  await svc.runs.settle();
  run = await (await svc.get(`/v1/runs/${run.id}`)).json();
  console.log(n, r.status, run.status, Math.round(performance.now() - t0), "ms", run.result_digest);
}
await svc.close();
