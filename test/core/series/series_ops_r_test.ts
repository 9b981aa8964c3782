import assert from "node:assert/strict";
import { anomaliesFromBasePeriod, resampleMeans } from "../../../core/series/mod.ts";
import { ingestText } from "../../../api/ingest/mod.ts";

// Reference: R 4.2.2 on R's datasets sunspot.month and nhtemp (stats::aggregate, tapply over
// cycle(), window), computed by fixtures/reference/series_ops_r.R; the series are read from
// fixtures/datasets/ (exported from the same R, see PROVENANCE.md) through the text ingester.
const REF = new URL("../../../fixtures/reference/series_ops_r.json", import.meta.url);
const DATA = new URL("../../../fixtures/datasets/", import.meta.url);

async function load(file: string, quantity: string, units: string) {
  const r = ingestText(await Deno.readFile(new URL(file, DATA)), {
    name: file,
    quantity,
    units,
    time: "date",
    value: "value",
  });
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.series;
}

Deno.test("resampleMeans() monthly → annual equals R aggregate() on sunspot.month", async () => {
  const ref = JSON.parse(await Deno.readTextFile(REF));
  const s = await load("sunspot_month.csv", "sunspot_number", "1");
  assert.equal(s.resolution, "monthly");
  // R keeps complete years only; with 12 of 12 months required sunlag does the same
  const a = resampleMeans(s, "annual", { minMonthsPerYear: 12 });
  const want: number[] = ref.annual_sunspot.mean;
  assert.equal(a.time[0], ref.annual_sunspot.first_year + 0.5);
  for (let j = 0; j < want.length; j++) {
    assert.ok(Math.abs(a.value[j] - want[j]) < 1e-9, `${1749 + j}: ${a.value[j]} vs ${want[j]}`);
  }
  // the incomplete final year (2013: 9 months) is a gap, as in R
  assert.equal(a.time.length, want.length + 1);
  assert.equal(a.count[want.length], 9);
  assert.equal(a.covered[want.length], 0);
});

Deno.test("anomaliesFromBasePeriod() equals R on sunspot.month (climatology) and nhtemp (mean)", async () => {
  const ref = JSON.parse(await Deno.readTextFile(REF));
  const s = await load("sunspot_month.csv", "sunspot_number", "1");
  const a = anomaliesFromBasePeriod(s, { start: 1961, end: 1991 }, { climatology: "monthly" });
  for (let m = 0; m < 12; m++) {
    assert.ok(Math.abs(a.baseMeans[m] - ref.sunspot_climatology_1961_1990[m]) < 1e-9);
    assert.equal(a.baseCounts[m], 30);
  }
  const want: number[] = ref.sunspot_anomaly_first.value;
  assert.equal(want.length, s.value.length);
  for (let i = 0; i < want.length; i++) assert.ok(Math.abs(a.value[i] - want[i]) < 1e-9);

  const nh = await load("nhtemp.csv", "other", "degF");
  const b = anomaliesFromBasePeriod(nh, { start: 1931, end: 1961 });
  assert.ok(Math.abs(b.baseMeans[0] - ref.nhtemp_base_1931_1960) < 1e-12);
  (ref.nhtemp_anomaly as number[]).forEach((v, i) => assert.ok(Math.abs(b.value[i] - v) < 1e-12));
});
