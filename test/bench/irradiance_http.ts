/**
 * HTTP round trip of a full daily reconstruction (1610–2029, 153,000 days) through the
 * in-process app: POST /v1/irradiance/reconstructions with a stored model, facular and PSI
 * series (demo) and a synthetic daily sunspot series, response body read to the end. Prints
 * the median of 7 round trips and the size of the response.
 *
 *   deno run -A test/bench/irradiance_http.ts
 */
import { makeTestApp, uploadSeries } from "../api/helpers.ts";
import { demoFileEntries, loadDemo } from "../../api/demo.ts";
import { periodKeyRange, periodSequence } from "../../core/series/mod.ts";

const svc = await makeTestApp();
const entries = await demoFileEntries();
const stored = await loadDemo(svc.store);
const ids = Object.fromEntries(entries.map((e, i) => [e.file, stored[i]]));
const days = periodKeyRange(1610, 2030, "daily");
const axis = periodSequence(days.first, days.last, "daily");
const time = Array.from(axis.middle);
// synthetic (invented) daily sunspot numbers with an 11-year cycle
const value = time.map((t) => Math.max(0, 100 * (1 + Math.sin((2 * Math.PI * t) / 11))));
const rid = await uploadSeries(svc, {
  name: "synthetic daily sunspot number",
  quantity: "sunspot_number",
  units: "1",
  version: "2",
  time,
  value,
});
const dark = await (await svc.post("/v1/irradiance/darkening", {
  total_area: ids["sunspot_area_daily.csv"],
})).json();
const psiId = dark.saved_series.find((s: { output: string }) => s.output === "psi").id;
const model = await (await svc.post("/v1/irradiance/models", {
  tsi: ids["tsi_daily.csv"],
  terms: [
    { name: "mg", role: "facular", series: ids["facular_index_daily.csv"], quiet_level: 0.15 },
    { name: "psi", role: "sunspot_darkening", series: psiId },
  ],
  sunspot_number: rid,
})).json();
const ms: number[] = [];
let bytes = 0;
for (let k = 0; k < 7; k++) {
  const t0 = performance.now();
  const res = await svc.post("/v1/irradiance/reconstructions", {
    model: model.id,
    proxies: [
      { term: "mg", series: ids["facular_index_daily.csv"] },
      { term: "psi", series: psiId },
    ],
    sunspot_number: rid,
    period: { start: "1610", end: "2029" },
    resolution: "daily",
  });
  bytes = (await res.text()).length;
  ms.push(performance.now() - t0);
  if (res.status !== 201) throw new Error(`status ${res.status}`);
}
ms.sort((a, b) => a - b);
console.log(
  `daily reconstruction round trip (${axis.middle.length} days): median ${
    ms[3].toFixed(0)
  } ms, min ${ms[0].toFixed(0)} ms, response ${(bytes / 1e6).toFixed(1)} MB`,
);
await svc.close();
