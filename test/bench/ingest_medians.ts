/**
 * Medians (deno bench prints means) for ingestion of the 150,000-row daily CSV of
 * test/bench/ingest_bench.ts: the text ingester, the content id, the CSV export and a whole
 * `POST /v1/series` upload into an in-memory store. Compare with test/bench/ingest_numpy.py
 * (pandas read_csv + decimal years on the same table).
 *
 *   deno run -A test/bench/ingest_medians.ts
 */
import { median as d3Median } from "d3-array";
import { contentId, ingestText, seriesToCsv } from "../../api/ingest/mod.ts";
import { makeTestApp } from "../api/helpers.ts";
import { dailyCsv } from "./ingest_table.ts";

const median = (xs: number[]): number => d3Median(xs) ?? NaN;

const ROUNDS = 15;
const bytes = new TextEncoder().encode(dailyCsv());
const opts = {
  name: "Bench TSI",
  quantity: "tsi",
  units: "W m-2",
  value: "value",
  uncertainty: "sigma",
};

async function time(fn: (i: number) => unknown): Promise<number> {
  const out: number[] = [];
  for (let i = 0; i < ROUNDS + 2; i++) {
    const t0 = performance.now();
    await fn(i);
    if (i >= 2) out.push(performance.now() - t0); // two warm-up rounds
  }
  return median(out);
}

const r = ingestText(bytes, opts);
if (!r.ok) throw new Error(JSON.stringify(r.errors));
const svc = await makeTestApp();
const rows: [string, number][] = [
  ["ingestText (150,000 rows → series)", await time(() => ingestText(bytes, opts))],
  ["contentId (150,000 points + uncertainty)", await time(() => contentId(r.series))],
  ["seriesToCsv (150,000 points)", await time(() => seriesToCsv(r.series))],
  [
    "POST /v1/series text/csv, in-memory SQLite",
    await time(async (i) => {
      const res = await svc.app.request(
        `/v1/series?name=Bench+${i}&quantity=tsi&units=W+m-2&value=value&uncertainty=sigma`,
        { method: "POST", headers: { "content-type": "text/csv" }, body: bytes },
      );
      if (res.status !== 201) throw new Error(`status ${res.status}`);
      await res.body?.cancel();
    }),
  ],
];
await svc.close();
for (const [name, ms] of rows) console.log(`${name.padEnd(46)} median ${ms.toFixed(1)} ms`);
