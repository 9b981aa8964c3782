import assert from "node:assert/strict";
import { contentId, ingestJson, ingestText, seriesToCsv } from "../../../api/ingest/mod.ts";
import { samples } from "../../../fixtures/reference/csv_export_sample.ts";

const REF = new URL("../../../fixtures/reference/", import.meta.url);

Deno.test("seriesToCsv() re-ingests to the same content id (CSV round trip)", async (t) => {
  for (const s of samples()) {
    await t.step(s.resolution, () => {
      const csv = seriesToCsv(s);
      const back = ingestText(csv);
      if (!back.ok) throw new Error(JSON.stringify(back.errors));
      assert.equal(contentId(back.series), s.id);
      assert.deepEqual(back.report.metadata_from_file, [
        "name",
        "quantity",
        "units",
        "description",
        "source",
        "version",
      ]);
      assert.equal(back.series.description, s.description);
      assert.deepEqual(back.series.uncertainty, s.uncertainty);
    });
  }
  await t.step("monthly and annual series, options override file metadata", () => {
    const m = ingestJson({
      name: "m",
      quantity: "temperature_anomaly",
      units: "degC",
      time: ["1880-01", "1880-02", "1881-12"],
      value: [-0.1, 0, 0.25],
    });
    assert.ok(m.ok);
    const csv = seriesToCsv(m.series);
    // 1880 is a leap year: the middle of January is 15.5 days in, 1880 + 15.5 / 366
    assert.ok(csv.includes(`\n1880-01,${1880 + 15.5 / 366},-0.1\n`));
    const back = ingestText(csv);
    assert.ok(back.ok);
    assert.equal(contentId(back.series), contentId(m.series));
    const renamed = ingestText(csv, { name: "other name" });
    assert.ok(renamed.ok);
    assert.equal(renamed.series.name, "other name");
    assert.notEqual(contentId(renamed.series), contentId(m.series));
  });
});

Deno.test("seriesToCsv() output is what pandas and R read (fixtures/reference/csv_export_readers.py)", async () => {
  // Reference readings: pandas 1.5.3 read_csv(comment="#") and R 4.x read.csv(comment.char="#"),
  // recorded by fixtures/reference/csv_export_readers.py from the committed sample files.
  const ref = JSON.parse(await Deno.readTextFile(new URL("csv_export_readers.json", REF)));
  const files = ["csv_export_daily.csv", "csv_export_irregular.csv"];
  for (const [i, s] of samples().entries()) {
    const csv = seriesToCsv(s);
    // the committed sample must still be what seriesToCsv writes, or the readings are stale
    assert.equal(csv, await Deno.readTextFile(new URL(files[i], REF)), files[i]);
    const r = ref.files[files[i]];
    const cols = s.uncertainty
      ? ["time", "decimal_year", "value", "uncertainty"]
      : ["time", "decimal_year", "value"];
    assert.deepEqual(r.pandas.columns, cols);
    assert.deepEqual(r.r.columns, cols);
    assert.equal(r.pandas.dtypes.decimal_year, "float64");
    assert.equal(r.r.values.value.class, "numeric");
    // exact with pandas' round-trip parser and with R; pandas' default parser within 1 ulp
    assert.deepEqual(r.pandas_round_trip.decimal_year, Array.from(s.time));
    assert.deepEqual(r.pandas_round_trip.value, Array.from(s.value));
    assert.deepEqual(r.r.values.decimal_year.values, Array.from(s.time));
    assert.deepEqual(r.r.values.value.values, Array.from(s.value));
    for (const [k, t] of s.time.entries()) {
      assert.ok(Math.abs(r.pandas.values.decimal_year[k] - t) <= 4e-13);
    }
    if (s.uncertainty) assert.deepEqual(r.r.values.uncertainty.values, Array.from(s.uncertainty));
    assert.equal(r.pandas.values.time.length, s.time.length);
  }
});
