import assert from "node:assert/strict";
import { anomaliesFromBasePeriod } from "../../../core/series/mod.ts";
import { parseIsoTime } from "../../../core/time/mod.ts";

function monthly(y0: number, y1: number, f: (y: number, m: number) => number) {
  const time: number[] = [], value: number[] = [];
  for (let y = y0; y <= y1; y++) {
    for (let m = 1; m <= 12; m++) {
      time.push(parseIsoTime(`${y}-${String(m).padStart(2, "0")}`).decimalYear);
      value.push(f(y, m));
    }
  }
  return { time, value };
}

Deno.test("anomaliesFromBasePeriod() subtracts the base-period mean", () => {
  // hand computation: base 1961..1990 of y = year − 1900 has mean (61 + 90) / 2 = 75.5
  const time = Array.from({ length: 60 }, (_, i) => 1951.5 + i);
  const a = anomaliesFromBasePeriod({ time, value: time.map((t) => Math.floor(t) - 1900) }, {
    start: 1961,
    end: 1991,
  });
  assert.equal(a.baseMeans[0], 75.5);
  assert.equal(a.baseCounts[0], 30);
  assert.equal(a.value[0], 51 - 75.5);
  assert.equal(a.climatology, "mean");
});

Deno.test("anomaliesFromBasePeriod() removes a seasonal cycle with the monthly climatology", () => {
  // seasonal cycle 10·m plus a trend of 0.1 per year; base 1981–2010
  const s = monthly(1971, 2020, (y, m) => 10 * m + 0.1 * (y - 1971));
  const a = anomaliesFromBasePeriod(s, { start: 1981, end: 2011 }, { climatology: "monthly" });
  // base mean of month m: 10 m + 0.1 · mean(10..39) = 10 m + 2.45
  for (let m = 0; m < 12; m++) assert.ok(Math.abs(a.baseMeans[m] - (10 * (m + 1) + 2.45)) < 1e-9);
  assert.deepEqual(Array.from(a.baseCounts), Array(12).fill(30));
  // every anomaly is the trend term minus 2.45, whatever the month
  for (let i = 0; i < s.time.length; i++) {
    assert.ok(Math.abs(a.value[i] - (0.1 * Math.floor(i / 12) - 2.45)) < 1e-9);
  }
});

Deno.test("anomaliesFromBasePeriod() refuses a base period without data", () => {
  const s = monthly(1990, 1995, () => 1);
  assert.throws(
    () => anomaliesFromBasePeriod(s, { start: 1961, end: 1991 - 2 }),
    { name: "InputError", field: "base", reason: "no_overlap" },
  );
  const partial = { time: s.time.slice(0, 14), value: s.value.slice(0, 14) };
  // base only covers Jan 1990..Feb 1991 → March..December present once, all months present
  assert.doesNotThrow(() =>
    anomaliesFromBasePeriod(partial, { start: 1990, end: 1992 }, { climatology: "monthly" })
  );
  const noMar = {
    time: s.time.filter((_, i) => i % 12 !== 2),
    value: s.value.filter((_, i) => i % 12 !== 2),
  };
  assert.throws(
    () => anomaliesFromBasePeriod(noMar, { start: 1990, end: 1996 }, { climatology: "monthly" }),
    { field: "base", reason: "empty", value: [3] }, // March
  );
  assert.throws(() => anomaliesFromBasePeriod(s, { start: 1995, end: 1990 }), {
    field: "base",
    reason: "invalid",
  });
});
