import assert from "node:assert/strict";
import fc from "fast-check";
import { decimalYear, periodBounds, readPeriodConvention } from "../../../core/time/mod.ts";
import { loadDataset } from "../cycles/load_dataset.ts";

/** R's write.csv export of time(x) (fixtures/datasets/export_r_time.R). */
function rTimeExport(name: "sunspot_month_r_time" | "sunspot_year_r_time"): number[] {
  const url = new URL(`../../../fixtures/datasets/${name}.csv`, import.meta.url);
  const lines = Deno.readTextFileSync(url).trim().split("\n").slice(1);
  return lines.map((l) => Number(l.split(",")[0]));
}

Deno.test("readPeriodConvention() reads R's time() of sunspot.month as month starts", () => {
  // R 4.2.2 datasets::sunspot.month, time(x) = 1749 + (month - 1)/12 written by write.csv
  const t = rTimeExport("sunspot_month_r_time");
  const c = readPeriodConvention(t)!;
  assert.deepEqual([c.resolution, c.position, c.months], ["monthly", "start", "twelfths"]);
  // the middles agree with the mid-month decimal years R itself computed from as.Date
  // (fixtures/datasets/sunspot_month.csv, column decimal_year, written with 10 decimals)
  const ref = loadDataset("sunspot_month");
  assert.equal(c.middle.length, ref.time.length);
  for (let i = 0; i < ref.time.length; i++) {
    assert.ok(Math.abs(c.middle[i] - ref.time[i]) < 1e-9, `month ${ref.date[i]}`);
  }
  assert.ok(c.maxDeviationYears < 1e-10);
});

Deno.test("readPeriodConvention() reads R's time() of sunspot.year as year starts", () => {
  const t = rTimeExport("sunspot_year_r_time");
  const c = readPeriodConvention(t)!;
  assert.deepEqual([c.resolution, c.position, c.months], ["annual", "start", null]);
  assert.deepEqual(Array.from(c.middle), loadDataset("sunspot_year").time);
});

Deno.test("readPeriodConvention() tells the conventions apart", async (t) => {
  const months = Array.from(
    { length: 36 },
    (_, i) => ({ y: 1990 + Math.floor(i / 12), m: i % 12 + 1 }),
  );
  const mid = months.map(({ y, m }) => periodBounds(decimalYear(y, m, 1), "monthly").middle);
  const read = (time: number[]) => {
    const c = readPeriodConvention(time);
    return c && [c.resolution, c.position, c.months];
  };
  await t.step("exact calendar middles: sunlag's own, nothing moves", () => {
    const c = readPeriodConvention(mid)!;
    assert.deepEqual([c.position, c.months, c.maxDeviationYears], ["middle", "calendar", 0]);
    assert.deepEqual(Array.from(c.middle), mid);
  });
  await t.step("middles rounded to 3 decimals (as many published monthly files write them)", () => {
    const c = readPeriodConvention(mid.map((x) => Math.round(x * 1000) / 1000))!;
    assert.deepEqual([c.position, c.months], ["middle", "calendar"]);
    assert.deepEqual(Array.from(c.middle), mid);
  });
  await t.step("calendar month starts (midnight of the 1st)", () => {
    assert.deepEqual(read(months.map(({ y, m }) => decimalYear(y, m, 1))), [
      "monthly",
      "start",
      "calendar",
    ]);
  });
  await t.step("dates on the 1st (read at noon) label their month", () => {
    const firsts = months.map(({ y, m }) => decimalYear(y, m, 1, 0.5));
    const c = readPeriodConvention(firsts)!;
    assert.deepEqual([c.position, c.months], ["start", "calendar"]);
    assert.deepEqual(Array.from(c.middle), mid);
  });
  await t.step("month-end dates are not taken for the next month's start", () => {
    const ends = months.map(({ y, m }) => decimalYear(y, m, m === 2 ? 28 : 30, 0.5));
    assert.equal(readPeriodConvention(ends), null);
  });
  await t.step("middles in twelfths of a year: year + (month - 0.5)/12", () => {
    const c = readPeriodConvention(months.map(({ y, m }) => y + (m - 0.5) / 12))!;
    assert.deepEqual([c.position, c.months], ["middle", "twelfths"]);
    assert.deepEqual(Array.from(c.middle), mid);
  });
  await t.step("gaps keep a grid a grid", () => {
    const gappy = mid.filter((_, i) => i % 5 !== 2);
    assert.deepEqual(read(gappy), ["monthly", "middle", "calendar"]);
    assert.deepEqual(read([1700, 1701, 1702, 1705, 1706]), ["annual", "start", null]);
  });
  await t.step("integer years are years, not January starts", () => {
    assert.deepEqual(read([2000, 2001, 2002]), ["annual", "start", null]);
  });
  await t.step("quarters, days and scattered times are no monthly or annual grid", () => {
    assert.equal(read(Array.from({ length: 12 }, (_, i) => 2000 + i / 4)), null);
    assert.equal(read(Array.from({ length: 60 }, (_, i) => 2000 + (i + 0.5) / 366)), null);
    assert.equal(read([2000.1, 2000.13, 2000.5]), null);
    // two values in one month
    assert.equal(read([2000, 2000 + 1 / 12, 2000 + 1 / 12 + 1e-3]), null);
  });
  await t.step("errors", () => {
    assert.throws(() => readPeriodConvention([2000]), RangeError);
    assert.throws(() => readPeriodConvention([2000, NaN]), RangeError);
    assert.throws(() => readPeriodConvention([2001, 2000]), RangeError);
  });
});

Deno.test("readPeriodConvention() middles agree with periodBounds for random monthly grids", () => {
  // reference: the middle of the month named by integer year and month (periodBounds)
  fc.assert(
    fc.property(
      fc.integer({ min: -2000, max: 3000 }),
      fc.integer({ min: 0, max: 11 }),
      fc.array(fc.boolean(), { minLength: 24, maxLength: 60 }),
      fc.constantFrom("start-calendar", "start-twelfths", "middle-twelfths", "middle-calendar"),
      (y0, m0, keep, convention) => {
        const idx = keep.map((k, i) => (k || i < 2 ? i : -1)).filter((i) => i >= 0);
        if (idx.length < 2) return;
        const ym = idx.map((i) => ({ y: y0 + Math.floor((m0 + i) / 12), m: (m0 + i) % 12 + 1 }));
        const time = ym.map(({ y, m }) => {
          if (convention === "start-twelfths") return y + (m - 1) / 12;
          if (convention === "middle-twelfths") return y + (m - 0.5) / 12;
          const start = decimalYear(y, m, 1);
          return convention === "start-calendar" ? start : periodBounds(start, "monthly").middle;
        });
        const c = readPeriodConvention(time);
        // sparse draws may have a median spacing over 31.5 days: then no grid is claimed
        const d = time.slice(1).map((x, i) => (x - time[i]) * 365.2425).sort((a, b) => a - b);
        const med = d.length % 2
          ? d[(d.length - 1) / 2]
          : (d[d.length / 2 - 1] + d[d.length / 2]) / 2;
        if (convention !== "middle-calendar" && med > 31.5) {
          assert.ok(c === null || c.resolution === "monthly");
          if (c === null) return;
        }
        assert.ok(c, `${convention} not recognised`);
        ym.forEach(({ y, m }, i) => {
          assert.equal(c.middle[i], periodBounds(decimalYear(y, m, 1), "monthly").middle);
        });
      },
    ),
    { seed: 20240611, numRuns: 300 },
  );
});
