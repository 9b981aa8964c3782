import assert from "node:assert/strict";
import {
  contentId,
  ingestJson,
  type IngestResult,
  ingestText,
  type JsonSeriesInput,
} from "../../../api/ingest/mod.ts";

const BASE: JsonSeriesInput = {
  name: "Spot count",
  quantity: "sunspot_number",
  units: "1",
  version: "2",
  time: ["1996", "1997", "1998", "1999"],
  value: [8.6, 21.5, 64.3, 93.3],
};
function errs(r: IngestResult) {
  if (r.ok) throw new Error("expected errors");
  return r.errors;
}

Deno.test("ingestJson() normalises times, gaps and sentinels", () => {
  const r = ingestJson({
    ...BASE,
    time: ["1996", 1997.5, "1998-07", "1999-07-02"],
    value: [8.6, null, -1, 93.3],
    missing: [-1],
  });
  assert.ok(r.ok);
  assert.deepEqual(Array.from(r.series.time), [1996.5, 1999 + 182.5 / 365]);
  const { time_grid, units_conversion, ...counts } = r.report;
  assert.deepEqual(counts, { read: 4, kept: 2, missing: 2, aggregated: 0 });
  assert.equal(units_conversion, null);
  assert.deepEqual([time_grid?.resolution, time_grid?.position], ["annual", "middle"]);
  // 1999-07-02 noon is 182.5 days into a 365-day year: exactly mid-year, so the axis is annual
  assert.equal(r.series.resolution, "annual");
});

Deno.test("ingestJson() errors carry JSON Pointers", async (t) => {
  await t.step("bad time, value and uncertainty entries", () => {
    const e = errs(
      ingestJson({
        ...BASE,
        time: ["1996", "1997-13", "1998", "1999"],
        value: [1, 2, Infinity, 4],
      }),
    );
    assert.deepEqual(e.map((x) => x.pointer), ["/time/1", "/value/2"]);
    assert.match(e[0].message, /unparseable time: "1997-13": month must be 01\.\.12/);
    const u = errs(ingestJson({ ...BASE, uncertainty: [0.1, null, -2, 0.1] }));
    assert.deepEqual(u.map((x) => x.pointer), ["/uncertainty/1", "/uncertainty/2"]);
    const v = errs(ingestJson({ ...BASE, value: [1, "2" as unknown as number, 3, 4] }));
    assert.match(v[0].message, /non-numeric value "2"/);
  });
  await t.step("array lengths, duplicates, order, size", () => {
    assert.equal(errs(ingestJson({ ...BASE, value: [1, 2] }))[0].pointer, "/value");
    assert.match(
      errs(ingestJson({ ...BASE, time: ["1996", "1996", "1998", "1999"] }))[0].message,
      /duplicate timestamp/,
    );
    assert.equal(
      errs(ingestJson({ ...BASE, time: ["1996", "1999", "1998", "1997"] }))[0].pointer,
      "/time/2",
    );
    assert.match(
      errs(ingestJson({ ...BASE, value: [null, null, null, 5] }))[0].message,
      /fewer than 2 points/,
    );
    // a length over the limit is refused before any element is read
    const huge = Object.assign([], { length: 5_000_001 }) as number[];
    assert.match(
      errs(ingestJson({ ...BASE, time: huge, value: [] }))[0].message,
      /too many points/,
    );
  });
  await t.step("units and quantity, with a pointer prefix", () => {
    const e = errs(ingestJson({ ...BASE, quantity: "tsi", units: "K" }, { pointer: "/series" }));
    assert.deepEqual([e[0].pointer, e[0].in], ["/series/units", "body"]);
    assert.match(e[0].message, /contradict quantity tsi/);
  });
});

Deno.test("ingestJson() with duplicates=mean sorts and averages", () => {
  const r = ingestJson({
    ...BASE,
    time: [1999.5, 1996.5, 1996.5, 1997.5],
    value: [4, 1, 3, 2],
    duplicates: "mean",
  });
  assert.ok(r.ok);
  assert.deepEqual(Array.from(r.series.value), [2, 2, 4]);
  assert.equal(r.report.aggregated, 1);
});

Deno.test("contentId() depends on content only", () => {
  const a = ingestJson(BASE), b = ingestJson({ ...BASE, time: [1996.5, 1997.5, 1998.5, 1999.5] });
  assert.ok(a.ok && b.ok);
  // "1996" means 1996.5, so both uploads are the same content
  assert.equal(contentId(a.series), contentId(b.series));
  const c = ingestJson({ ...BASE, version: "1" }), d = ingestJson({ ...BASE, description: "x" });
  assert.ok(c.ok && d.ok);
  const ids = new Set([a, c, d].map((r) => r.ok ? contentId(r.series) : ""));
  assert.equal(ids.size, 3);
  // negative zero is stored as zero: same id
  const z1 = ingestJson({ ...BASE, value: [0, 1, 2, 3] }),
    z2 = ingestJson({ ...BASE, value: [-0, 1, 2, 3] });
  assert.ok(z1.ok && z2.ok);
  assert.equal(contentId(z1.series), contentId(z2.series));
});

Deno.test("ingestJson() and ingestText() refuse decimal years that look like Unix timestamps", () => {
  const e = errs(ingestJson({ ...BASE, time: [1996.5, 1997.5, 1.7e9, 1999.5] }));
  assert.equal(e[0].pointer, "/time/2");
  assert.match(e[0].message, /outside -100000\.\.100000 \(a Unix timestamp\?/);
  const t = ingestText("decimal_year,value\n1996.5,1\n1700000000000,2\n", {
    name: "x",
    quantity: "other",
    units: "1",
  });
  assert.ok(!t.ok);
  assert.equal(t.errors[0].row, 3);
  assert.match(t.errors[0].message, /Unix timestamp/);
});
