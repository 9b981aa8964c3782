import assert from "node:assert/strict";
import { resampleMeans } from "../../../core/series/mod.ts";
import { decimalYear, formatIsoTime, parseIsoTime } from "../../../core/time/mod.ts";

const close = (a: number, b: number, tol: number) =>
  assert.ok(Math.abs(a - b) <= tol, `${a} vs ${b}`);

Deno.test("resampleMeans() agrees with pandas resample (fixtures/reference/resample_pandas.py)", async (t) => {
  // Reference: pandas 1.5.3 Series.resample("MS").agg(["mean", "count"]), then annual means of
  // the months with >= 20 days, kept with >= 10 covered months; script beside the JSON.
  const ref = JSON.parse(
    await Deno.readTextFile(
      new URL("../../../fixtures/reference/resample_pandas.json", import.meta.url),
    ),
  );
  const time = ref.input.date.map((d: string) => parseIsoTime(d).decimalYear);
  const value = ref.input.value as number[];
  await t.step("daily → monthly, at least 20 days", () => {
    const m = resampleMeans({ time, value }, "monthly");
    assert.equal(m.time.length, ref.monthly.length);
    for (const [j, r] of ref.monthly.entries()) {
      assert.equal(formatIsoTime(m.time[j], "monthly"), r.period);
      assert.equal(m.count[j], r.count, r.period);
      assert.equal(m.covered[j], r.mean === null ? 0 : 1, r.period);
      if (r.mean === null) assert.ok(Number.isNaN(m.value[j]));
      else close(m.value[j], r.mean, 1e-9);
    }
  });
  await t.step("daily → annual, two stages (20 days, 10 months)", () => {
    const a = resampleMeans({ time, value }, "annual");
    assert.deepEqual(Array.from(a.time), [2000.5, 2001.5, 2002.5, 2003.5, 2004.5]);
    for (const [j, r] of ref.annual.entries()) {
      assert.equal(a.count[j], r.count, r.period);
      if (r.mean === null) assert.equal(a.covered[j], 0);
      else close(a.value[j], r.mean, 1e-9);
    }
    assert.match(a.rule, /annual means of monthly means/);
  });
});

Deno.test("resampleMeans() leaves periods that fail coverage as gaps, never biased means", async (t) => {
  await t.step("a month with 19 days is a gap, 20 days is covered", () => {
    const jan = Array.from({ length: 19 }, (_, d) => decimalYear(2001, 1, d + 1, 0.5));
    const feb = Array.from({ length: 20 }, (_, d) => decimalYear(2001, 2, d + 1, 0.5));
    const time = [...jan, ...feb];
    const m = resampleMeans({ time, value: time.map((_, i) => (i < 19 ? 100 : 1)) }, "monthly");
    assert.deepEqual(Array.from(m.count), [19, 20]);
    assert.deepEqual(Array.from(m.covered), [0, 1]);
    assert.ok(Number.isNaN(m.value[0]));
    assert.equal(m.value[1], 1);
    // with a lower threshold January counts
    assert.equal(
      resampleMeans({ time, value: time }, "monthly", { minDaysPerMonth: 19 }).covered[0],
      1,
    );
  });
  await t.step("monthly → annual needs 10 months; empty periods inside the span are listed", () => {
    const months = [1, 2, 3, 4, 5, 6, 7, 8, 9].map((m) =>
      parseIsoTime(`1990-${String(m).padStart(2, "0")}`).decimalYear
    )
      .concat(
        [1, 2, 3, 4, 5, 6, 7, 8, 9, 10].map((m) =>
          parseIsoTime(`1992-${String(m).padStart(2, "0")}`).decimalYear
        ),
      );
    const a = resampleMeans({ time: months, value: months.map(() => 2) }, "annual");
    assert.deepEqual(Array.from(a.time), [1990.5, 1991.5, 1992.5]);
    assert.deepEqual(Array.from(a.count), [9, 0, 10]);
    assert.deepEqual(Array.from(a.covered), [0, 0, 1]);
    assert.equal(a.required, 10);
  });
  await t.step("uncertainty of a mean is sqrt(sum of squares) / n", () => {
    const time = [1990.5, 1990.6, 1991.5];
    const a = resampleMeans({ time, value: [1, 3, 5] }, "annual", {
      from: "irregular",
      uncertainty: [0.3, 0.4, 0.2],
    });
    close(a.uncertainty![0], 0.25, 1e-15);
    assert.equal(a.uncertainty![1], 0.2);
    assert.equal(a.value[0], 2);
  });
});

Deno.test("resampleMeans() refuses what it cannot do", () => {
  const annual = { time: [2000.5, 2001.5], value: [1, 2] };
  assert.throws(() => resampleMeans(annual, "monthly"), {
    name: "InputError",
    field: "to",
    reason: "unsupported",
    value: "monthly",
  });
  assert.throws(
    () => resampleMeans({ time: [2000.5], value: [1] }, "annual"),
    { field: "value", reason: "too_few_points", value: 1 },
  );
  assert.throws(
    () => resampleMeans({ time: [2000.5, 2001.5], value: [1, NaN] }, "annual"),
    { field: "value", reason: "not_finite", index: 1 },
  );
  assert.throws(
    () => resampleMeans({ time: [2000.5, 2001.5], value: [1] }, "annual"),
    { field: "value", reason: "length_mismatch", value: 1 },
  );
  assert.throws(
    () => resampleMeans(annual, "annual", { minMonthsPerYear: 13 }),
    { field: "minMonthsPerYear", reason: "out_of_range", value: 13 },
  );
  // same resolution: each period is its own mean
  const same = resampleMeans(annual, "annual");
  assert.deepEqual(Array.from(same.value), [1, 2]);
  assert.equal(same.required, 1);
});

Deno.test("resampleMeans() maxMissingRunDays refuses months with a long run of missing days", async (t) => {
  // January 2001, 31 days: drop days 10..14 (a run of 5); 26 days remain
  const keepDay = (d: number) => d < 10 || d > 14;
  const jan = Array.from({ length: 31 }, (_, i) => i + 1).filter(keepDay)
    .map((d) => decimalYear(2001, 1, d, 0.5));
  // February 2001, 28 days: drop the last 4 days (a trailing run of 4); 24 remain
  const feb = Array.from({ length: 24 }, (_, i) => decimalYear(2001, 2, i + 1, 0.5));
  const time = [...jan, ...feb];
  const value = time.map(() => 1);
  await t.step("runs are reported, counted from the month's first to its last day", () => {
    const m = resampleMeans({ time, value }, "monthly", { maxMissingRunDays: 4 });
    assert.deepEqual(Array.from(m.longestMissingRun!), [5, 4]);
    assert.deepEqual(Array.from(m.covered), [0, 1]);
    assert.match(m.rule, /no run of more than 4 missing days/);
  });
  await t.step("without the rule both months pass the 20-day count", () => {
    const m = resampleMeans({ time, value }, "monthly");
    assert.equal(m.longestMissingRun, null);
    assert.deepEqual(Array.from(m.covered), [1, 1]);
  });
  await t.step("a leading run counts too, and the rule reaches the annual stage", () => {
    const late = Array.from({ length: 25 }, (_, i) => decimalYear(2001, 3, i + 7, 0.5)); // from 7 March
    const m = resampleMeans({ time: late, value: late.map(() => 2) }, "monthly", {
      maxMissingRunDays: 5,
    });
    assert.equal(m.longestMissingRun![0], 6);
    assert.equal(m.covered[0], 0);
    const a = resampleMeans({ time, value }, "annual", {
      maxMissingRunDays: 4,
      minMonthsPerYear: 1,
    });
    assert.equal(a.count[0], 1); // only February counts
  });
  await t.step("out-of-range values are refused", () => {
    assert.throws(
      () => resampleMeans({ time, value }, "monthly", { maxMissingRunDays: -1 }),
      { field: "maxMissingRunDays", reason: "out_of_range", value: -1 },
    );
  });
});
