import assert from "node:assert/strict";
import { alignSeries } from "../../../core/series/mod.ts";
import { decimalYear, parseIsoTime } from "../../../core/time/mod.ts";

Deno.test("alignSeries() puts daily and monthly series on a monthly axis by intersection", () => {
  // daily: all of Jan..Apr 2001 except March 10..31 (March fails the 20-day rule)
  const daily: number[] = [];
  for (let m = 1; m <= 4; m++) {
    for (let d = 1; d <= [31, 28, 31, 30][m - 1]; d++) {
      if (!(m === 3 && d >= 10)) daily.push(decimalYear(2001, m, d, 0.5));
    }
  }
  const monthly = ["2000-12", "2001-01", "2001-02", "2001-03", "2001-04", "2001-05"].map((x) =>
    parseIsoTime(x).decimalYear
  );
  const r = alignSeries(
    [
      { time: daily, value: daily.map(() => 1) },
      { time: monthly, value: [0, 1, 2, 3, 4, 5] },
    ],
    "monthly",
  );
  assert.deepEqual(
    Array.from(r.time),
    ["2001-01", "2001-02", "2001-04"].map((x) => parseIsoTime(x).decimalYear),
  );
  assert.deepEqual(Array.from(r.values[1]), [1, 2, 4]);
  assert.deepEqual(Array.from(r.counts[0]), [31, 28, 30]);
  assert.deepEqual(r.report[0], {
    points: daily.length,
    covered: 3,
    uncovered: 1,
    droppedOutsideSpan: 0,
    droppedByIntersection: 0,
  });
  assert.deepEqual(r.report[1], {
    points: 6,
    covered: 6,
    uncovered: 0,
    droppedOutsideSpan: 2,
    droppedByIntersection: 1,
  });
});

Deno.test("alignSeries() with common_span keeps gaps inside the overlap", () => {
  const a = { time: [2000.5, 2001.5, 2003.5, 2004.5], value: [1, 2, 4, 5] };
  const b = { time: [2001.5, 2002.5, 2003.5], value: [7, 8, 9] };
  const r = alignSeries([a, b], "annual", { rule: "common_span" });
  assert.deepEqual(Array.from(r.time), [2001.5, 2002.5, 2003.5]);
  assert.ok(Number.isNaN(r.values[0][1]));
  assert.deepEqual(Array.from(r.values[1]), [7, 8, 9]);
  assert.equal(r.report[0].uncovered, 1);
});

Deno.test("alignSeries() refuses series that do not overlap or cannot be resampled", () => {
  const a = { time: [2000.5, 2001.5], value: [1, 2] };
  assert.throws(() => alignSeries([a], "annual"), {
    name: "InputError",
    field: "series",
    value: 1,
  });
  assert.throws(
    () => alignSeries([a, { time: [2005.5, 2006.5], value: [1, 2] }], "annual"),
    { field: "series", reason: "no_overlap" },
  );
  assert.throws(
    () => alignSeries([a, a], "monthly"),
    { field: "to", reason: "unsupported", index: 0 },
  );
  assert.throws(
    () => alignSeries([a, { time: [2000.5, 2001.5], value: [1, NaN] }], "annual"),
    { field: "series", reason: "not_finite", index: 1 },
  );
});
