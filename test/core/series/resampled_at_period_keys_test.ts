import assert from "node:assert/strict";
import { resampledAtPeriodKeys, resampleMeans } from "../../../core/series/mod.ts";
import { decimalYear } from "../../../core/time/mod.ts";
import { loadDataset } from "../cycles/load_dataset.ts";

Deno.test("resampledAtPeriodKeys() applies resampleMeans' coverage rule at given keys", async (t) => {
  // R's sunspot.month ends 2013-09 (fixtures/datasets/PROVENANCE.md)
  const ss = loadDataset("sunspot_month");
  const keys = [1749, 1750, 2012, 2013, 2014];
  const v = resampledAtPeriodKeys(ss, "monthly", "annual", keys);
  await t.step("a year of 9 months is no annual cell; 12 months make one", () => {
    assert.ok(Number.isNaN(v[3]) && Number.isNaN(v[4]));
    const m = resampleMeans(ss, "annual", { from: "monthly" });
    assert.equal(v[0], m.value[0]);
    assert.equal(v[2], m.value[2012 - 1749]);
    // R: mean(window(sunspot.month, c(1749, 1), c(1749, 12))) = 80.9 (hand sum of the export)
    const first = ss.value.slice(0, 12).reduce((a, b) => a + b, 0) / 12;
    assert.equal(v[0], first);
  });
  await t.step("with a lower threshold the nine months are enough", () => {
    const w = resampledAtPeriodKeys(ss, "monthly", "annual", [2013], { minMonthsPerYear: 9 });
    const last9 = ss.value.slice(-9).reduce((a, b) => a + b, 0) / 9;
    assert.ok(Math.abs(w[0] - last9) < 1e-12);
  });
  await t.step("missing values are no values", () => {
    const value = ss.value.slice();
    value[value.length - 12] = NaN; // 2012-10
    value[value.length - 13] = NaN; // 2012-09
    value[value.length - 14] = NaN; // 2012-08: 2012 keeps 9 months
    const w = resampledAtPeriodKeys({ time: ss.time, value }, "monthly", "annual", [2011, 2012]);
    assert.ok(Number.isFinite(w[0]) && Number.isNaN(w[1]));
  });
  await t.step("coarser input lands in the one cell holding it", () => {
    const annual = { time: [2000.5, 2001.5], value: [1, 2] };
    const keys = [2000 * 12, 2000 * 12 + 6, 2001 * 12 + 6];
    assert.deepEqual(
      Array.from(resampledAtPeriodKeys(annual, "annual", "monthly", keys)).map((x) =>
        Number.isNaN(x) ? null : x
      ),
      [null, 1, 2],
    );
  });
  await t.step("daily values: 20 days for a month", () => {
    const days = [...Array(19).keys()].map((d) => decimalYear(2001, 1, d + 1, 0.5))
      .concat([...Array(25).keys()].map((d) => decimalYear(2001, 2, d + 1, 0.5)));
    const w = resampledAtPeriodKeys(
      { time: days, value: days.map(() => 3) },
      "daily",
      "monthly",
      [2001 * 12, 2001 * 12 + 1],
    );
    assert.ok(Number.isNaN(w[0]));
    assert.equal(w[1], 3);
    // one point: a month from one day fails the 20-day rule
    const one = resampledAtPeriodKeys({ time: [days[0]], value: [3] }, "daily", "monthly", [
      2001 * 12,
    ]);
    assert.ok(Number.isNaN(one[0]));
    assert.equal(resampledAtPeriodKeys({ time: [], value: [] }, "daily", "monthly", [0]).length, 1);
  });
});
