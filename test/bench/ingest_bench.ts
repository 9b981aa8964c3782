/**
 * Ingestion speed: a 150,000-row daily CSV (about 411 years of days) through the text
 * ingester, the content id, the CSV export, and a whole `POST /v1/series` upload into an
 * in-memory store. Side-by-side: test/bench/ingest_numpy.py (pandas read_csv on the same
 * table). Run: deno bench -A test/bench/ingest_bench.ts
 */
import { contentId, ingestText, seriesToCsv } from "../../api/ingest/mod.ts";
import { makeTestApp } from "../api/helpers.ts";

import { dailyCsv } from "./ingest_table.ts";

const csv = dailyCsv();
const bytes = new TextEncoder().encode(csv);
const opts = {
  name: "Bench TSI",
  quantity: "tsi",
  units: "W m-2",
  value: "value",
  uncertainty: "sigma",
};
const first = ingestText(bytes, opts);
if (!first.ok) throw new Error(JSON.stringify(first.errors));
const series = first.series;

Deno.bench("ingestText: 150,000-row daily CSV (bytes → normalised series)", {
  group: "ingest",
  baseline: true,
}, () => {
  const r = ingestText(bytes, opts);
  if (!r.ok) throw new Error("failed");
});

Deno.bench("contentId: 150,000 points with uncertainty", { group: "ingest" }, () => {
  contentId(series);
});

Deno.bench("seriesToCsv: 150,000 points", { group: "ingest" }, () => {
  seriesToCsv(series);
});

const svc = await makeTestApp();
let k = 0;
Deno.bench(
  "POST /v1/series: 150,000-row CSV upload, in-memory SQLite",
  { group: "upload" },
  async () => {
    // a different name each time so every upload is a new series (no 200 short cut)
    const res = await svc.app.request(
      `/v1/series?name=Bench+${k++}&quantity=tsi&units=W+m-2&value=value&uncertainty=sigma`,
      { method: "POST", headers: { "content-type": "text/csv" }, body: bytes },
    );
    if (res.status !== 201) throw new Error(`status ${res.status}: ${await res.text()}`);
    await res.body?.cancel();
  },
);
