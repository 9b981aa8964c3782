import assert from "node:assert/strict";
import fc from "fast-check";
import {
  dailyBounds,
  meanPeriodDays,
  periodDays,
  periodKey,
  periodKeyer,
  periodKeyOfDay,
  periodKeyRange,
  periodOfKey,
  periodSequence,
} from "../../../core/series/mod.ts";
import {
  calendarInstant,
  daysFromCivil,
  decimalYearFromEpochDays,
  epochDayOf,
  parseIsoTime,
} from "../../../core/time/mod.ts";
import { InputError } from "../../../core/errors.ts";

// ---------------------------------------------------------------------------------------------
// A reference on plain year/month/day integers, written independently of core/time: the
// Gregorian leap rule (common practice), month lengths, day numbers counted year by year from
// 1970-01-01, and the decimal-year definition year + (day_of_year − 1 + fraction)/days_in_year.

const leap = (y: number) => (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
const yearLen = (y: number) => (leap(y) ? 366 : 365);
const monthLen = (y: number, m: number) =>
  [31, leap(y) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1];
const daysBefore = (y: number, m: number) => {
  let n = 0;
  for (let k = 1; k < m; k++) n += monthLen(y, k);
  return n;
};
/** Days since 1970-01-01, counted year by year. */
function refDay(y: number, m: number, d: number): number {
  let n = 0;
  if (y >= 1970) { for (let k = 1970; k < y; k++) n += yearLen(k); }
  else for (let k = y; k < 1970; k++) n -= yearLen(k);
  return n + daysBefore(y, m) + d - 1;
}
/** The decimal year of a date and a fraction of its day. */
const refDecimal = (y: number, m: number, d: number, frac = 0) =>
  y + (daysBefore(y, m) + d - 1 + frac) / yearLen(y);
/** The next day's date. */
function nextDay(y: number, m: number, d: number): [number, number, number] {
  if (d < monthLen(y, m)) return [y, m, d + 1];
  return m < 12 ? [y, m + 1, 1] : [y + 1, 1, 1];
}
/** The previous day's date. */
function previousDay(y: number, m: number, d: number): [number, number, number] {
  if (d > 1) return [y, m, d - 1];
  return m > 1 ? [y, m - 1, monthLen(y, m - 1)] : [y - 1, 12, 31];
}

/** A random date 1600-01-01..2399-12-31 and a time of day in whole seconds. */
const instant = fc.record({
  y: fc.integer({ min: 1600, max: 2399 }),
  m: fc.integer({ min: 1, max: 12 }),
  dayIndex: fc.integer({ min: 0, max: 30 }),
  seconds: fc.integer({ min: 0, max: 86_399 }),
}).map(({ y, m, dayIndex, seconds }) => ({
  y,
  m,
  d: 1 + (dayIndex % monthLen(y, m)),
  frac: seconds / 86_400,
}));

Deno.test("periodKey()/periodOfKey() property: keys and bounds agree with a reference on plain integers", () => {
  fc.assert(
    fc.property(instant, ({ y, m, d, frac }) => {
      const t = refDecimal(y, m, d, frac);
      const day = periodKey(t, "daily"), month = periodKey(t, "monthly");
      assert.equal(day, refDay(y, m, d));
      assert.equal(month, y * 12 + m - 1);
      assert.equal(periodKey(t, "annual"), y);
      // bounds: exactly the reference's period starts, the instant inside
      const [ny, nm, nd] = nextDay(y, m, d);
      const b = periodOfKey(day, "daily");
      assert.equal(b.start, refDecimal(y, m, d));
      assert.equal(b.end, refDecimal(ny, nm, nd));
      assert.equal(b.middle, refDecimal(y, m, d, 0.5));
      assert.ok(b.start <= t && t < b.end);
      const mb = periodOfKey(month, "monthly");
      assert.equal(mb.start, refDecimal(y, m, 1));
      assert.equal(mb.end, m === 12 ? y + 1 : refDecimal(y, m + 1, 1));
      assert.ok(mb.start <= t && t < mb.end);
      assert.equal(periodDays(month, "monthly"), monthLen(y, m));
      assert.equal(periodDays(y, "annual"), yearLen(y));
      // the resolutions agree with each other (the annual-boundary disagreement of old)
      assert.equal(periodKeyOfDay(day, "monthly"), month);
      assert.equal(periodKeyOfDay(day, "annual"), y);
    }),
    { numRuns: 600, seed: 20260110 },
  );
});

Deno.test("periodKey() reads an instant a few ulps before a period start as that start, at every resolution", () => {
  // the start of a year or month computed another way may land just below it; all three
  // resolutions must then agree on the new period
  for (const y of [1700, 1900, 2000, 2001, 2024]) {
    for (const t of [y, y - 1e-12, y + 1e-12]) {
      assert.equal(periodKey(t, "annual"), y, `${t}`);
      assert.equal(periodKey(t, "monthly"), y * 12, `${t}`);
      assert.equal(periodKey(t, "daily"), refDay(y, 1, 1), `${t}`);
    }
  }
});

Deno.test("epochDayOf() property: the day calendarInstant() reads, near day starts too", () => {
  fc.assert(
    fc.property(
      fc.integer({ min: 1600, max: 2400 }),
      fc.double({ min: 0, max: 1, noNaN: true }),
      fc.constantFrom(0, 1e-13, -1e-13, 1e-9, -1e-9),
      (y, f, nudge) => {
        const t = y + f + nudge;
        const c = calendarInstant(t);
        assert.equal(epochDayOf(t), daysFromCivil(c.year, c.month, c.day), `${t}`);
      },
    ),
    { numRuns: 500, seed: 20260113 },
  );
});

Deno.test("periodKeyRange() property: an exclusive end touches the periods a reference counts", () => {
  const span = fc.tuple(instant, fc.integer({ min: 0, max: 2000 }), fc.boolean());
  fc.assert(
    fc.property(span, ([a, lengthDays, endAtMidnight]) => {
      // start at midnight of a's date; end lengthDays later (plus a's time of day unless
      // endAtMidnight), never before the start
      let [y2, m2, d2] = [a.y, a.m, a.d];
      for (let k = 0; k < lengthDays; k++) [y2, m2, d2] = nextDay(y2, m2, d2);
      const frac = endAtMidnight ? 0 : a.frac;
      if (lengthDays === 0 && frac === 0) return;
      const start = refDecimal(a.y, a.m, a.d), end = refDecimal(y2, m2, d2, frac);
      // the last day touched: the end's day, or the day before when the end is at midnight
      const [ly, lm, ld] = frac === 0 ? previousDay(y2, m2, d2) : [y2, m2, d2];
      const want = {
        daily: [refDay(a.y, a.m, a.d), refDay(ly, lm, ld)],
        monthly: [a.y * 12 + a.m - 1, ly * 12 + lm - 1],
        annual: [a.y, ly],
      } as const;
      for (const res of ["daily", "monthly", "annual"] as const) {
        const r = periodKeyRange(start, end, res);
        assert.deepEqual([r.first, r.last], want[res], `${res} ${start} ${end}`);
        assert.equal(r.count, want[res][1] - want[res][0] + 1);
      }
    }),
    { numRuns: 400, seed: 20260111 },
  );
});

Deno.test("periodKeyRange(): whole ISO periods give whole cell counts (12 months, 31 days)", async (t) => {
  const range = (a: string, b: string, res: "daily" | "monthly" | "annual") =>
    periodKeyRange(parseIsoTime(a).start, parseIsoTime(b).end, res).count;
  await t.step("2001-01 to 2001-12 is 12 months, not 13", () => {
    assert.equal(range("2001-01", "2001-12", "monthly"), 12);
  });
  await t.step("2001-01-01 to 2001-01-31 is 31 days, not 32", () => {
    assert.equal(range("2001-01-01", "2001-01-31", "daily"), 31);
  });
  await t.step("whole years in every resolution, across a leap year", () => {
    assert.equal(range("2001", "2001", "annual"), 1);
    assert.equal(range("2000", "2003", "monthly"), 48);
    assert.equal(range("2000", "2003", "daily"), 366 + 3 * 365);
    assert.equal(range("1700", "2025", "annual"), 326);
  });
  await t.step("an end inside a period keeps that period", () => {
    assert.equal(periodKeyRange(2001, 2001.5, "annual").count, 1);
    assert.equal(periodKeyRange(2001, 2001.0001, "monthly").count, 1);
  });
  await t.step("an empty span is refused on its end", () => {
    for (const [a, b] of [[2001, 2001], [2001, 2000], [2001, 2001 + 1e-12]]) {
      assert.throws(
        () => periodKeyRange(a, b, "daily"),
        (e) => e instanceof InputError && e.field === "end" && e.reason === "out_of_range",
      );
    }
    assert.throws(
      () => periodKeyRange(NaN, 2001, "daily"),
      (e) => e instanceof InputError && e.field === "start" && e.reason === "not_finite",
    );
  });
});

Deno.test("periodSequence() equals periodOfKey() cell by cell across leap years and centuries", () => {
  for (const res of ["daily", "monthly", "annual"] as const) {
    const first = periodKey(1899.9, res), last = periodKey(2001.2, res);
    const s = periodSequence(first, last, res);
    assert.equal(s.middle.length, last - first + 1);
    for (let i = 0; i < s.middle.length; i += res === "daily" ? 97 : 1) {
      assert.equal(s.middle[i], periodOfKey(first + i, res).middle, `${res} ${first + i}`);
      assert.equal(s.days[i], periodDays(first + i, res));
    }
  }
  assert.throws(
    () => periodSequence(5, 4, "daily"),
    (e) => e instanceof InputError && e.field === "last",
  );
});

Deno.test("meanPeriodDays() is the mean Gregorian length (146,097 days per 400 years)", () => {
  assert.equal(meanPeriodDays("annual"), 146_097 / 400);
  assert.equal(meanPeriodDays("monthly"), 146_097 / 4800);
  assert.equal(meanPeriodDays("daily"), 1);
});

Deno.test("periodKeyer() gives periodKey's keys, in order, out of order and on boundaries", () => {
  // instants a tick before, on and after each day's start over 1582-1604 and 1896-1904 (the
  // Gregorian rules of 1600 and 1900), then shuffled ones from -4000 to 4000
  const times: number[] = [];
  for (const [from, to] of [[1582, 1604], [1896, 1904]]) {
    for (let d = daysFromCivil(from, 1, 1); d < daysFromCivil(to, 1, 1); d++) {
      const t = decimalYearFromEpochDays(d);
      times.push(t - 1e-9, t, t + 1e-9, decimalYearFromEpochDays(d + 0.5));
    }
  }
  let seed = 7;
  for (let i = 0; i < 20_000; i++) {
    seed = (seed * 16807) % 2147483647;
    times.push(-4000 + (seed / 2147483647) * 8000);
  }
  for (const resolution of ["daily", "monthly", "annual"] as const) {
    const keyOf = periodKeyer(resolution);
    const bad = times.filter((t) => keyOf(t) !== periodKey(t, resolution));
    assert.deepEqual(bad, [], resolution);
  }
  assert.throws(() => periodKeyer("monthly")(NaN), RangeError);
});

Deno.test("dailyBounds() equals periodOfKey for each day, to the bit", () => {
  for (const [first, count] of [[-800_000, 900_000], [0, 1], [-1, 3], [10_957, 0]]) {
    const b = dailyBounds(first, count);
    for (let i = 0; i < count; i++) {
      const p = periodOfKey(first + i, "daily");
      if (b.start[i] !== p.start || b.end[i] !== p.end || b.middle[i] !== p.middle) {
        assert.fail(
          `day ${first + i}: ${[b.start[i], b.end[i], b.middle[i]]} vs ${JSON.stringify(p)}`,
        );
      }
    }
  }
});
