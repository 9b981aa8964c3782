import assert from "node:assert/strict";
import {
  annualCycleShare,
  anomaliesFromBasePeriod,
  STRONG_ANNUAL_CYCLE_SHARE,
} from "../../../core/series/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { loadDataset } from "../cycles/load_dataset.ts";

// R 4.2.2: summary(lm(x ~ factor(cycle(x))))$r.squared and tapply(x, cycle(x), mean)
// (fixtures/reference/seasonal_r.R → seasonal_r.json)
const R = JSON.parse(
  Deno.readTextFileSync(new URL("../../../fixtures/reference/seasonal_r.json", import.meta.url)),
);
const nottem = loadDataset("nottem");
const spots = loadDataset("sunspot_month");
const k0 = spots.date.indexOf("1920-01"), k1 = spots.date.indexOf("1939-12") + 1;
const spots20 = { time: spots.time.slice(k0, k1), value: spots.value.slice(k0, k1) };

Deno.test("annualCycleShare() equals R's R² on the calendar month (nottem, sunspot.month)", () => {
  const a = annualCycleShare(nottem);
  assert.ok(Math.abs(a.share - R.nottem_eta2) < 1e-12);
  assert.equal(a.strong, true);
  const s = annualCycleShare(spots20);
  assert.ok(Math.abs(s.share - R.sunspot_month_1920_1939_eta2) < 1e-12);
  assert.equal(s.strong, false);
  // null moments for k = 12 months, n = 240 values (Beta(11/2, 228/2), derived)
  assert.ok(Math.abs(a.nullMean - 11 / 239) < 1e-15);
  assert.ok(Math.abs(a.nullSd - Math.sqrt((2 * 11 * 228) / (239 ** 2 * 241))) < 1e-15);
  assert.equal(a.threshold, Math.max(STRONG_ANNUAL_CYCLE_SHARE, a.nullMean + 3 * a.nullSd));
});

Deno.test("annualCycleShare() edge cases", async (t) => {
  const time = Array.from({ length: 36 }, (_, i) => 2000 + (i + 0.5) / 12);
  await t.step("a constant series has share 0", () => {
    assert.equal(annualCycleShare({ time, value: time.map(() => 3) }).share, 0);
  });
  await t.step("NaN values are skipped", () => {
    const v = time.map((_, i) => Math.cos((2 * Math.PI * i) / 12));
    const withGap = v.slice();
    withGap[5] = NaN;
    const a = annualCycleShare({ time, value: withGap });
    assert.equal(a.n, 35);
    assert.ok(a.share > 0.999);
  });
  await t.step("short noise is not called seasonal: the threshold rises with the null", () => {
    // 36 months: the null mean alone is 11/35 = 0.31 (derived)
    const v = time.map((_, i) => Math.sin(i * 2.39996) * 1.7 + Math.cos(i * 0.911));
    const a = annualCycleShare({ time, value: v });
    assert.ok(a.threshold > 0.5);
    assert.ok(Math.abs(a.nullMean - 11 / 35) < 1e-12);
  });
  await t.step("too few values or one calendar month are refused", () => {
    assert.throws(
      () => annualCycleShare({ time: time.slice(0, 12), value: time.slice(0, 12) }),
      (e: unknown) => e instanceof InputError && e.reason === "too_few_points",
    );
    assert.throws(
      () => annualCycleShare({ time: [1], value: [1, 2] }),
      (e: unknown) => e instanceof InputError && e.field === "value",
    );
  });
});

Deno.test("anomaliesFromBasePeriod() monthly climatology equals R's tapply means; minCount", () => {
  const a = anomaliesFromBasePeriod(nottem, { start: 1920, end: 1940 }, {
    climatology: "monthly",
    minCount: 2,
  });
  a.baseMeans.forEach((m, k) => assert.ok(Math.abs(m - R.nottem_climatology_degF[k]) < 1e-12));
  assert.ok(annualCycleShare({ time: nottem.time, value: a.value }).share < 1e-20);
  // one year of data: each calendar month seen once, refused with minCount 2
  assert.throws(
    () =>
      anomaliesFromBasePeriod(
        { time: nottem.time.slice(0, 18), value: nottem.value.slice(0, 18) },
        { start: 1920, end: 1922 },
        { climatology: "monthly", minCount: 2 },
      ),
    (e: unknown) =>
      e instanceof InputError && e.reason === "too_few_points" && e.field === "base" &&
      JSON.stringify(e.value) === JSON.stringify([7, 8, 9, 10, 11, 12]),
  );
  assert.throws(
    () => anomaliesFromBasePeriod(nottem, { start: 1920, end: 1940 }, { minCount: 0 }),
    (e: unknown) => e instanceof InputError && e.field === "minCount",
  );
});
