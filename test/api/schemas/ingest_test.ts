import assert from "node:assert/strict";
import { SeriesUpload, TextUploadQuery } from "../../../api/schemas/ingest.ts";
import { ingestJson, ingestText } from "../../../api/ingest/mod.ts";

Deno.test("TextUploadQuery fills defaults and splits missing sentinels", () => {
  const q = TextUploadQuery.parse({
    name: "x",
    quantity: "tsi",
    units: "W m-2",
    missing: "-1, -999",
  });
  assert.deepEqual(q.missing, ["-1", "-999"]);
  assert.equal(q.delimiter, "auto");
  assert.equal(q.duplicates, "reject");
  assert.equal(q.time_format, "auto");
  assert.equal(TextUploadQuery.safeParse({ delimiter: "pipe" }).success, false);
  assert.equal(TextUploadQuery.safeParse({ quantity: "solar_wind" }).success, false);
  // the parsed query is what ingestText takes
  const r = ingestText("time,value\n2000,1\n2001,-999\n2002,3\n", q);
  assert.ok(r.ok);
  assert.equal(r.report.missing, 1);
});

Deno.test("SeriesUpload accepts the documented example and feeds ingestJson", () => {
  const body = SeriesUpload.parse(SeriesUpload.parse({
    name: "s",
    quantity: "sunspot_number",
    units: "1",
    time: ["2001-01", "2001-02", "2001-03"],
    value: [80.2, -1, 91.4],
    missing: [-1],
  }));
  assert.equal(body.duplicates, "reject");
  const r = ingestJson(body);
  assert.ok(r.ok);
  assert.equal(r.report.kept, 2);
  assert.equal(SeriesUpload.safeParse({ ...body, time: ["2001"] }).success, false);
});
