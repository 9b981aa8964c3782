import assert from "node:assert/strict";
import { type IngestResult, ingestText, type TextIngestOptions } from "../../../api/ingest/mod.ts";
import { parseIsoTime } from "../../../core/time/mod.ts";

const META = { name: "Test record", quantity: "temperature_anomaly", units: "K" } as const;

function ok(r: IngestResult) {
  if (!r.ok) throw new Error(`expected a series, got errors ${JSON.stringify(r.errors)}`);
  return r;
}
function errs(r: IngestResult) {
  if (r.ok) throw new Error("expected errors, got a series");
  return r.errors;
}
const ingest = (text: string | Uint8Array, o: TextIngestOptions = {}) =>
  ingestText(text, { ...META, ...o });

Deno.test("ingestText() detects each delimiter", async (t) => {
  const rows = [["time", "value"], ["1996-01", "0.1"], ["1996-02", "0.2"], ["1996-03", "0.3"]];
  for (
    const [label, sep] of [["comma", ","], ["semicolon", ";"], ["tab", "\t"], ["whitespace", "   "]]
  ) {
    await t.step(label, () => {
      const r = ok(ingest(rows.map((r) => r.join(sep)).join("\n")));
      assert.equal(r.report.delimiter, label);
      assert.deepEqual(Array.from(r.series.value), [0.1, 0.2, 0.3]);
      assert.equal(r.series.resolution, "monthly");
    });
  }
  await t.step("stated delimiter wins", () => {
    const r = ok(ingest("time;value\n2000;1\n2001;2\n", { delimiter: "semicolon" }));
    assert.equal(r.series.resolution, "annual");
    assert.deepEqual(
      errs(ingest("time;value\n2000;1\n2001;2\n", { delimiter: "comma" }))[0].pointer,
      "/value",
    );
  });
});

Deno.test("ingestText() skips comments and blank lines and counts rows by file line", () => {
  const text =
    "# a comment\n\n  # indented comment\ntime,value\r\n1996,1\r\n\r\n1997,x\r\n1998,3\r\n";
  const e = errs(ingest(text));
  assert.equal(e.length, 1);
  assert.deepEqual({ row: e[0].row, column: e[0].column, in: e[0].in }, {
    row: 7,
    column: "value",
    in: "body",
  });
  assert.match(e[0].message, /non-numeric value "x"/);
});

Deno.test("ingestText() reads every time format", async (t) => {
  await t.step("ISO years, months, days, date-times", () => {
    assert.deepEqual(Array.from(ok(ingest("t,v\n1996,1\n1997,2")).series.time), [1996.5, 1997.5]);
    assert.equal(
      ok(ingest("t,v\n1996-08,1\n1996-09,2")).series.time[0],
      parseIsoTime("1996-08").decimalYear,
    );
    // 2024-03-01 noon = 2024 + 60.5 / 366 (see test/core/time)
    assert.equal(ok(ingest("t,v\n2024-03-01,1\n2024-03-02,2")).series.time[0], 2024 + 60.5 / 366);
    const dt = ok(
      ingest("t,v\n2024-01-01T00:00Z,1\n2024-01-01T06:00+06:00,2\n2024-01-01T12:00:00Z,3", {
        duplicates: "mean",
      }),
    );
    assert.deepEqual(Array.from(dt.series.time), [2024, 2024 + 0.5 / 366]);
    assert.equal(dt.report.aggregated, 1);
    assert.equal(dt.series.value[0], 1.5);
  });
  await t.step("decimal years (auto and stated)", () => {
    const r = ok(ingest("t,v\n1996.042,1\n1996.3,2"));
    assert.equal(r.report.time_format, "decimal_year");
    assert.deepEqual(Array.from(r.series.time), [1996.042, 1996.3]);
    assert.equal(r.report.time_grid, null);
    // integers are ISO years by default (mid-year), decimal years when stated: then they are
    // the start of each year, stored at its middle
    const stated = ok(ingest("t,v\n1996,1\n1997,2", { time_format: "decimal_year" }));
    assert.deepEqual(Array.from(stated.series.time), [1996.5, 1997.5]);
    assert.equal(stated.report.time_grid?.position, "start");
    const named = ok(ingest("decimal_year,v\n1996,1\n1997,2"));
    assert.deepEqual(Array.from(named.series.time), [1996.5, 1997.5]);
    assert.equal(named.report.time_grid?.position, "start");
  });
  await t.step("year/month/day columns", () => {
    const r = ok(
      ingest("y,m,d,v\n2024,2,29,1\n2024,3,1,2", { year: "y", month: "m", day: "d", value: "v" }),
    );
    assert.equal(r.report.time_format, "year_month_day");
    assert.equal(r.series.time[1], 2024 + 60.5 / 366);
    const m = ok(ingest("y,m,v\n1996,8,1\n1996,9,2", { year: "0", month: "1" }));
    assert.equal(m.series.time[0], parseIsoTime("1996-08").decimalYear);
    const y = ok(ingest("y v\n1700 5\n1701 11", { year: "y" }));
    assert.deepEqual(Array.from(y.series.time), [1700.5, 1701.5]);
    const bad = errs(
      ingest("y,m,d,v\n2023,2,29,1\n2023,3,1,2", { year: "y", month: "m", day: "d" }),
    );
    assert.equal(bad[0].row, 2);
    assert.match(bad[0].message, /day must be an integer in 1\.\.28/);
    assert.match(
      errs(ingest("y,m,v\n2023,13,1\n2023,3,2", { year: "y", month: "m" }))[0].message,
      /month must be an integer in 1\.\.12/,
    );
  });
  await t.step("unparseable time names row and column", () => {
    const e = errs(ingest("date,value\n1996-01,1\n1996-1-5,2\n1996-03,3"));
    assert.deepEqual([e[0].row, e[0].column], [3, "date"]);
    assert.match(e[0].message, /unparseable time/);
  });
});

Deno.test("ingestText() picks columns by name, index or default", async (t) => {
  const text = "station,date,temp,sigma\nA,1996-01,0.1,0.05\nA,1996-02,0.2,0.05\n";
  await t.step("by name, case-insensitive fallback", () => {
    const r = ok(ingest(text, { time: "Date", value: "temp", uncertainty: "SIGMA" }));
    assert.deepEqual(Array.from(r.series.uncertainty!), [0.05, 0.05]);
  });
  await t.step("by index without a header", () => {
    const r = ok(ingest("1996-01;0.1;9\n1996-02;0.2;9\n", { time: "0", value: "1" }));
    assert.equal(r.report.header, false);
    assert.equal(r.report.read, 2);
  });
  await t.step("ambiguous value column and unknown names are query errors", () => {
    const e = errs(ingest(text, { time: "date" }));
    assert.deepEqual([e[0].in, e[0].pointer], ["query", "/value"]);
    assert.match(e[0].message, /3 candidate columns/);
    const e2 = errs(ingest(text, { time: "when", value: "temp" }));
    assert.match(e2[0].message, /no column "when"/);
    assert.match(
      errs(ingest(text, { time: "1", value: "9" }))[0].message,
      /index 9 is out of range/,
    );
  });
});

Deno.test("ingestText() treats sentinels as gaps and reports counts", () => {
  const text = "time,value\n2000,1\n2001,\n2002,NaN\n2003,na\n2004,-999.0\n2005,-1\n2006,7\n";
  const r = ok(ingest(text, { missing: ["-999", "-1"] }));
  assert.deepEqual(r.report, {
    read: 7,
    kept: 2,
    missing: 5,
    aggregated: 0,
    delimiter: "comma",
    header: true,
    time_format: "iso",
    time_grid: {
      resolution: "annual",
      position: "middle",
      months: null,
      moved_to_middle: false,
      note: "Times read as the middle of each year (year + 0.5, as an ISO 8601 year is read); " +
        "stored as given (the middle of each year, sunlag's time convention).",
    },
    units_conversion: null,
  });
  assert.deepEqual(Array.from(r.series.time), [2000.5, 2006.5]);
  // without the extra sentinels, -999.0 and -1 are values
  assert.deepEqual(Array.from(ok(ingest(text)).series.value), [1, -999, -1, 7]);
});

Deno.test("ingestText() rejects bad cells, naming row and column", async (t) => {
  const one = (cell: string, o: TextIngestOptions = {}) =>
    errs(ingest(`time,value,uncertainty\n2000,1,0.1\n2001,${cell}\n2002,3,0.1\n`, o))[0];
  await t.step("non-numeric", () => {
    const e = one("abc,0.1");
    assert.deepEqual([e.row, e.column], [3, "value"]);
    assert.match(one("1,5,0.1").message, /row has 4 cells, expected 3/);
    assert.match(one("1;5,0.1").message, /non-numeric value "1;5"/);
    assert.match(one("0x10,0.1").message, /non-numeric/);
  });
  await t.step("decimal comma hint", () => {
    const e = errs(ingest("time;value\n2000;1,5\n2001;2\n"))[0];
    assert.match(e.message, /decimal comma/);
  });
  await t.step("Infinity", () => {
    assert.match(one("Infinity,0.1").message, /infinite/);
    assert.match(one("-inf,0.1").message, /infinite/);
    assert.match(one("1e999,0.1").message, /overflows to infinity/);
  });
  await t.step("uncertainty problems", () => {
    assert.match(one("2,-0.1").message, /non-negative/);
    assert.match(one("2,").message, /uncertainty is missing while the value is present/);
    assert.equal(one("2,").column, "uncertainty");
  });
});

Deno.test("ingestText() rejects duplicate and non-monotonic timestamps unless asked to average", () => {
  const dup = "time,value\n2000,1\n2000,3\n2001,5\n";
  const e = errs(ingest(dup));
  assert.equal(e[0].row, 3);
  assert.match(e[0].message, /duplicate timestamp/);
  const back = errs(ingest("time,value\n2001,1\n2000,3\n2002,5\n"));
  assert.match(back[0].message, /non-monotonic/);
  const m = ok(
    ingest("time,value,uncertainty\n2001,1,0.3\n2000,3,0.3\n2000,5,0.4\n", { duplicates: "mean" }),
  );
  assert.deepEqual(Array.from(m.series.time), [2000.5, 2001.5]);
  assert.deepEqual(Array.from(m.series.value), [4, 1]);
  // independent errors: sqrt(0.3^2 + 0.4^2) / 2 = 0.25
  assert.ok(Math.abs(m.series.uncertainty![0] - 0.25) < 1e-15);
  assert.equal(m.report.aggregated, 1);
});

Deno.test("ingestText() enforces size and text rules", async (t) => {
  await t.step("fewer than 2 points", () => {
    assert.match(
      errs(ingest("time,value\n2000,1\n2001,NA\n"))[0].message,
      /fewer than 2 points: 1 kept of 2 read/,
    );
    assert.match(errs(ingest("# only a comment\n"))[0].message, /no data rows/);
    assert.match(errs(ingest("time,value\n"))[0].message, /header but no data rows/);
  });
  await t.step("NUL bytes and invalid UTF-8", () => {
    const nul = new TextEncoder().encode("time,value\n2000,1\n2001\u00002\n");
    const e = errs(ingest(nul))[0];
    assert.match(e.message, /not UTF-8 text \(NUL byte at offset 22\)/);
    assert.equal(e.row, 3);
    assert.match(
      errs(ingest(new Uint8Array([0x74, 0x2c, 0xff, 0xfe, 0x0a])))[0].message,
      /invalid UTF-8/,
    );
    assert.match(errs(ingest("a\0b"))[0].message, /NUL character/);
  });
  await t.step("UTF-8 with BOM and non-ASCII header names", () => {
    const bytes = new TextEncoder().encode("\ufeffzeit,température\n2000,1\n2001,2\n");
    assert.equal(ok(ingest(bytes, { value: "température" })).series.value[1], 2);
  });
  await t.step("more than 5,000,000 points", () => {
    // 5,000,001 rows of "1,1\n" is 20 MB of text: build it once, cheaply.
    const text = "t,v\n" + "1,1\n".repeat(5_000_001);
    assert.match(errs(ingest(text, { time_format: "decimal_year" }))[0].message, /too many rows/);
  });
});

Deno.test("ingestText() checks metadata against the vocabulary", () => {
  const text = "time,value\n2000,1\n2001,2\n";
  const e = errs(ingestText(text, { name: "x", quantity: "tsi", units: "K" }));
  assert.deepEqual([e[0].in, e[0].pointer], ["query", "/units"]);
  assert.match(e[0].message, /contradict quantity tsi/);
  assert.match(
    errs(ingestText(text, { name: "x", quantity: "solar_wind", units: "1" }))[0].message,
    /unknown quantity/,
  );
  assert.match(
    errs(ingestText(text, { quantity: "tsi", units: "W m-2" }))[0].message,
    /name is required/,
  );
  const r = ok(ingestText(text, { name: "x", quantity: "tsi", units: "W/m2", description: "  " }));
  assert.equal(r.series.units, "W m-2");
  assert.equal(r.series.description, null);
});

Deno.test("ingestText() reads quoted CSV fields", () => {
  const r = ok(ingest('"time","value"\n"2000","1.5"\n"2001", "2"\n'));
  assert.deepEqual(Array.from(r.series.value), [1.5, 2]);
  assert.match(
    errs(ingest('time,value\n2000,"1\n2001,2\n'))[0].message,
    /unterminated quoted field/,
  );
});

Deno.test("ingestText() skips rows of empty cells as spreadsheets write them", () => {
  const r = ingestText("time,value\n2000,1\n,\n2001,2\n,,\n", META);
  assert.ok(r.ok);
  assert.equal(r.report.read, 2);
  assert.equal(r.series.resolution, "annual");
  // but a row with an empty time and a value is an error
  const e = ingestText("time,value\n2000,1\n,5\n2001,2\n", META);
  assert.ok(!e.ok);
  assert.equal(e.errors[0].row, 3);
  assert.match(e.errors[0].message, /unparseable time/);
});

Deno.test("ingestText() reads year and month header columns without being told", () => {
  const r = ingestText("Year,Month,value\n2000,1,5\n2000,2,6\n2000,3,7\n", META);
  assert.ok(r.ok, JSON.stringify(!r.ok && r.errors));
  assert.equal(r.report.time_format, "year_month_day");
  assert.equal(r.series.resolution, "monthly");
  assert.equal(r.series.time[1], parseIsoTime("2000-02").decimalYear);
  // a single time column still wins when present
  const t = ingestText("date,year,month,value\n2000-01,2000,1,5\n2000-02,2000,2,6\n", {
    ...META,
    value: "value",
  });
  assert.ok(t.ok);
  assert.equal(t.report.time_format, "iso");
});
