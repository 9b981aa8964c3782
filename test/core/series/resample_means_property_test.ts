import assert from "node:assert/strict";
import fc from "fast-check";
import { resampleMeans } from "../../../core/series/mod.ts";
import {
  decimalYear,
  formatIsoTime,
  inferResolution,
  parseIsoTime,
} from "../../../core/time/mod.ts";

/** A naive reference: group daily ISO dates by "YYYY-MM" string, then by "YYYY". */
function naive(days: string[], values: number[], minDays: number, minMonths: number) {
  const months = new Map<string, number[]>();
  days.forEach((d, i) => {
    const k = d.slice(0, 7);
    months.set(k, [...(months.get(k) ?? []), values[i]]);
  });
  const monthly = new Map<string, number | null>();
  for (const [k, v] of months) {
    monthly.set(k, v.length >= minDays ? v.reduce((a, b) => a + b, 0) / v.length : null);
  }
  const years = new Map<string, number[]>();
  for (const [k, v] of monthly) {
    if (v !== null) years.set(k.slice(0, 4), [...(years.get(k.slice(0, 4)) ?? []), v]);
  }
  const annual = new Map<string, number | null>();
  for (const [k, v] of years) {
    annual.set(k, v.length >= minMonths ? v.reduce((a, b) => a + b, 0) / v.length : null);
  }
  return { monthly, annual };
}

Deno.test("resampleMeans() property: equals a naive string-grouping reference on random gappy daily data", () => {
  fc.assert(
    fc.property(
      fc.integer({ min: 1890, max: 2030 }),
      fc.integer({ min: 40, max: 1200 }),
      fc.double({ min: 0, max: 0.9, noNaN: true }),
      fc.integer({ min: 1, max: 2 ** 31 - 1 }),
      fc.integer({ min: 1, max: 31 }),
      fc.integer({ min: 1, max: 12 }),
      (y0, nDays, dropRate, seed, minDays, minMonths) => {
        let x = seed;
        const rnd = () => ((x = (Math.imul(x, 48271) >>> 0) % 2147483647) / 2147483647);
        const days: string[] = [], values: number[] = [];
        for (let i = 0; i < nDays; i++) {
          if (rnd() < dropRate) continue;
          days.push(new Date(Date.UTC(y0, 0, 1 + i)).toISOString().slice(0, 10));
          values.push(Math.round(rnd() * 2000) / 10);
        }
        if (days.length < 2) return;
        const time = days.map((d) => parseIsoTime(d).decimalYear);
        const ref = naive(days, values, minDays, minMonths);
        const m = resampleMeans({ time, value: values }, "monthly", {
          from: "daily",
          minDaysPerMonth: minDays,
        });
        for (let j = 0; j < m.time.length; j++) {
          const want = ref.monthly.get(formatIsoTime(m.time[j], "monthly"));
          if (want === undefined) assert.equal(m.count[j], 0);
          else if (want === null) assert.equal(m.covered[j], 0);
          else assert.ok(Math.abs(m.value[j] - want) < 1e-9);
        }
        assert.equal(m.time.length >= ref.monthly.size, true);
        const a = resampleMeans({ time, value: values }, "annual", {
          from: "daily",
          minDaysPerMonth: minDays,
          minMonthsPerYear: minMonths,
        });
        for (let j = 0; j < a.time.length; j++) {
          const want = ref.annual.get(formatIsoTime(a.time[j], "annual"));
          if (want === undefined || want === null) assert.equal(a.covered[j], 0);
          else assert.ok(Math.abs(a.value[j] - want) < 1e-9);
        }
      },
    ),
    { numRuns: 150, seed: 2001 },
  );
});

Deno.test("inferResolution() property: regular axes with random gaps keep their resolution", () => {
  fc.assert(
    fc.property(
      fc.constantFrom("daily", "monthly", "annual"),
      fc.constantFrom("middle", "start"),
      fc.integer({ min: 1600, max: 2100 }),
      fc.array(fc.boolean(), { minLength: 30, maxLength: 400 }),
      (res, stamp, y0, keep) => {
        const time: number[] = [];
        keep.forEach((k, i) => {
          if (!k && i > 1) return;
          if (res === "annual") time.push(stamp === "middle" ? y0 + i + 0.5 : y0 + i);
          else if (res === "monthly") {
            const y = y0 + Math.floor(i / 12), m = (i % 12) + 1;
            time.push(
              stamp === "middle"
                ? parseIsoTime(`${y}-${String(m).padStart(2, "0")}`).decimalYear
                : decimalYear(y, m, 1),
            );
          } else {
            const d = new Date(Date.UTC(y0, 0, 1 + i)).toISOString().slice(0, 10);
            const p = parseIsoTime(d);
            time.push(stamp === "middle" ? p.decimalYear : p.start);
          }
        });
        // spacing rules need the median gap to be one period: keep at least every other one
        const kept = keep.filter(Boolean).length;
        if (stamp === "start" && kept < keep.length * 0.6) return;
        assert.equal(inferResolution(time), res, `${res} ${stamp}`);
      },
    ),
    { numRuns: 300, seed: 17 },
  );
});
