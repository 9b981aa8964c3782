import assert from "node:assert/strict";
import fc from "fast-check";
import {
  meansAtPeriodKeys,
  periodMeansByKey,
  periodSums,
  resampleMeans,
  seriesAtPeriodKeys,
} from "../../../core/series/mod.ts";
import { decimalYear } from "../../../core/time/mod.ts";
import { InputError } from "../../../core/errors.ts";

Deno.test("periodMeansByKey() property: equals grouping by ISO month strings, NaN not counted", () => {
  fc.assert(
    fc.property(
      fc.array(
        fc.record({
          day: fc.integer({ min: 0, max: 900 }),
          value: fc.oneof(fc.integer({ min: -500, max: 500 }), fc.constant(NaN)),
        }),
        { minLength: 1, maxLength: 200 },
      ),
      fc.integer({ min: 1, max: 5 }),
      (points, minCount) => {
        // noon of days counted from 1999-12-01 (a reference written with Date, proleptic UTC)
        const iso = points.map((p) =>
          new Date(Date.UTC(1999, 11, 1 + p.day)).toISOString().slice(0, 10)
        );
        const time = iso.map((d) => decimalYear(+d.slice(0, 4), +d.slice(5, 7), +d.slice(8), 0.5));
        const value = points.map((p) => p.value);
        const groups = new Map<string, number[]>();
        iso.forEach((d, i) => {
          const k = d.slice(0, 7);
          if (!groups.has(k)) groups.set(k, []);
          if (!Number.isNaN(value[i])) groups.get(k)!.push(value[i]);
        });
        const m = periodMeansByKey({ time, value }, "monthly", { minCount });
        const want = [...groups].filter(([, v]) => v.length >= minCount).sort();
        assert.deepEqual(
          Array.from(m.keys),
          want.map(([k]) => +k.slice(0, 4) * 12 + +k.slice(5, 7) - 1),
        );
        want.forEach(([, v], j) => {
          assert.equal(m.count[j], v.length);
          // the same left-to-right sum in input order
          let s = 0;
          for (const x of v) s += x;
          assert.equal(m.mean[j], s / v.length);
        });
      },
    ),
    { numRuns: 200, seed: 20260112 },
  );
});

Deno.test("periodSums() is the binning pass of resampleMeans(): same sums, counts and points", () => {
  const time = Array.from({ length: 70 }, (_, i) => decimalYear(2001, 1, 1, 0.5) + i / 365);
  const value = time.map((_, i) => (i * 37) % 11);
  const s = periodSums(time, value, "monthly");
  const r = resampleMeans({ time, value }, "monthly", { minDaysPerMonth: 1 });
  assert.deepEqual(Array.from(s.count), Array.from(r.count));
  assert.deepEqual(Array.from(s.points), Array.from(r.points));
  r.value.forEach((v, j) => assert.equal(v, s.sum[j] / s.count[j]));
});

Deno.test("meansAtPeriodKeys() reads NaN for uncovered periods, dense and sparse lookups alike", () => {
  const m = periodMeansByKey({ time: [1700.5, 2001.5, 2003.5], value: [4, 1, 3] }, "annual");
  // 1700..2003 spans more than 4n + 1024 keys only for daily data; check both paths
  assert.deepEqual(Array.from(meansAtPeriodKeys(m, [2001, 2002, 1700])), [1, NaN, 4]);
  const d = periodMeansByKey({ time: [1700.5, 2001.5], value: [4, 1] }, "daily");
  const v = meansAtPeriodKeys(d, [d.keys[1], d.keys[0], d.keys[0] + 1]);
  assert.deepEqual(Array.from(v), [1, 4, NaN]);
  assert.deepEqual(
    Array.from(seriesAtPeriodKeys({ time: [2001.1, 2001.2], value: [1, 2] }, "annual", [2001])),
    [1.5],
  );
});

Deno.test("periodMeansByKey() refuses bad input naming the field", () => {
  const refused = (field: string, index?: number) => (e: unknown) =>
    e instanceof InputError && e.field === field && e.index === index;
  assert.throws(
    () => periodMeansByKey({ time: [2001, NaN], value: [1, 2] }, "daily"),
    refused("time", 1),
  );
  assert.throws(() => periodMeansByKey({ time: [2001], value: [1, 2] }, "daily"), refused("value"));
  assert.throws(
    () => periodMeansByKey({ time: [2001], value: [1] }, "daily", { minCount: 0 }),
    refused("minCount"),
  );
  assert.throws(() => periodSums([-9000, 9000], [1, 1], "daily"), refused("time"));
  assert.equal(periodMeansByKey({ time: [], value: [] }, "monthly").keys.length, 0);
});
