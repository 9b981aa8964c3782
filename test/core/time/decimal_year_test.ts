import assert from "node:assert/strict";
import {
  calendarInstant,
  civilFromDays,
  daysFromCivil,
  decimalYear,
  decimalYearFromEpochDays,
  isLeapYear,
} from "../../../core/time/mod.ts";

Deno.test("isLeapYear() follows the Gregorian rule", () => {
  // Gregorian rule (common practice): divisible by 4, except centuries not divisible by 400.
  assert.deepEqual(
    [1600, 1700, 1800, 1900, 2000, 2023, 2024, 2100, 0, -4].map(isLeapYear),
    [true, false, false, false, true, false, true, false, true, true],
  );
  assert.throws(() => isLeapYear(2000.5), RangeError);
});

Deno.test("decimalYear() is exact at day boundaries and rejects impossible dates", async (t) => {
  await t.step("1 January is the integer year", () => {
    for (const y of [1700, 1900, 2000, 2024]) assert.equal(decimalYear(y, 1, 1), y);
  });
  await t.step("day lengths are 1/365 or 1/366 of their year", () => {
    assert.ok(Math.abs(decimalYear(1900, 1, 2) - 1900 - 1 / 365) < 1e-13);
    assert.equal(decimalYear(2000, 1, 2), 2000 + 1 / 366);
  });
  await t.step("impossible dates and fractions throw", () => {
    assert.throws(() => decimalYear(1900, 2, 29), /day must be an integer in 1\.\.28/);
    assert.throws(() => decimalYear(2000, 13, 1), /month/);
    assert.throws(() => decimalYear(2000, 1, 1, 1.5), /fractionOfDay/);
    assert.throws(() => decimalYear(2000, 1, 1, NaN), /fractionOfDay/);
    assert.throws(() => decimalYear(2000.5), /integer/);
  });
});

Deno.test("calendarInstant() inverts decimalYear()", () => {
  for (
    const [y, m, d, f] of [[2024, 2, 29, 0.5], [1900, 12, 31, 0.75], [2000, 3, 1, 0], [
      1755,
      2,
      14,
      0.1,
    ]]
  ) {
    const c = calendarInstant(decimalYear(y, m, d, f));
    assert.deepEqual([c.year, c.month, c.day], [y, m, d]);
    assert.ok(Math.abs(c.fractionOfDay - f) < 1e-6);
  }
  assert.throws(() => calendarInstant(Infinity), RangeError);
});

Deno.test("daysFromCivil() and civilFromDays() agree with the JavaScript Date over 1600..2400", () => {
  // Reference: ECMAScript Date (proleptic Gregorian, ECMA-262 §21.4.1) for years >= 100.
  for (let days = daysFromCivil(1600, 1, 1); days < daysFromCivil(2400, 1, 1); days += 37) {
    const d = new Date(days * 86_400_000);
    assert.deepEqual(civilFromDays(days), {
      year: d.getUTCFullYear(),
      month: d.getUTCMonth() + 1,
      day: d.getUTCDate(),
    });
  }
  assert.equal(decimalYearFromEpochDays(daysFromCivil(2024, 3, 1) + 0.5), 2024 + 60.5 / 366);
});
