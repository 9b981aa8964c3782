/**
 * CF time (CF conventions 1.10 §4.4) against cftime 1.6.2 (Debian python3-cftime):
 * fixtures/netcdf/time_cases.json holds cftime.num2date / date2num on random values for every
 * calendar name and a set of units; fixtures/netcdf/make_reference.py wrote it.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import {
  calendarInstant,
  CF_CALENDAR_NAMES,
  CF_CALENDARS,
  cfDateFromDayNumber,
  cfDateTimeToDecimalYear,
  cfDayNumber,
  cfDaysInMonth,
  cfDaysInYear,
  cfMonthBounds,
  CfTimeError,
  cfYearBounds,
  civilFromDays,
  daysFromCivil,
  daysFromJulianCivil,
  decimalYear,
  decimalYearToCfDateTime,
  decodeCfTime,
  encodeCfTime,
  julianCivilFromDays,
  parseCfCalendar,
  parseCfTimeUnits,
} from "../../../core/time/mod.ts";

interface Case {
  calendar: string;
  units: string;
  value: number;
  date: number[];
  encoded: number;
}
const CASES: Case[] = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/netcdf/time_cases.json", import.meta.url)),
).cases;

Deno.test("decodeCfTime() agrees with cftime.num2date on every calendar, day for day", () => {
  assert.ok(CASES.length > 1000, `expected > 1000 cases, got ${CASES.length}`);
  const byCalendar = new Map<string, number>();
  for (const c of CASES) {
    const cal = parseCfCalendar(c.calendar);
    const [d] = decodeCfTime([c.value], c.units, cal);
    const [y, m, day, hh, mm, ss, us] = c.date;
    const label = `${c.calendar} ${c.value} ${c.units}`;
    assert.deepEqual([d.year, d.month, d.day], [y, m, day], label);
    // cftime computes in float64 microseconds (granularity up to 4 µs past 1e16 µs): 1 ms.
    const expected = hh * 3600 + mm * 60 + ss + us * 1e-6;
    assert.ok(Math.abs(d.seconds - expected) < 1e-3, `${label}: ${d.seconds} vs ${expected}`);
    byCalendar.set(c.calendar, (byCalendar.get(c.calendar) ?? 0) + 1);
  }
  assert.deepEqual([...byCalendar.keys()].sort(), Object.keys(CF_CALENDAR_NAMES).sort());
});

Deno.test("encodeCfTime() agrees with cftime.date2num", () => {
  for (const c of CASES) {
    const cal = parseCfCalendar(c.calendar);
    const [y, m, d, hh, mm, ss, us] = c.date;
    const v = encodeCfTime(
      [{ year: y, month: m, day: d, seconds: hh * 3600 + mm * 60 + ss + us * 1e-6 }],
      c.units,
      cal,
    )[0];
    const perUnit = parseCfTimeUnits(c.units, cal).secondsPerUnit;
    assert.ok(
      Math.abs(v - c.encoded) * perUnit < 1e-3,
      `${c.calendar} ${c.units}: ${v} vs ${c.encoded}`,
    );
  }
});

Deno.test("cfDayNumber() and cfDateFromDayNumber() are inverse on every calendar", () => {
  fc.assert(
    fc.property(
      fc.constantFrom(...CF_CALENDARS),
      fc.integer({ min: -1_500_000, max: 1_500_000 }),
      (cal, n) => {
        const d = cfDateFromDayNumber(cal, n);
        assert.equal(cfDayNumber(cal, d.year, d.month, d.day), n);
        assert.ok(d.day >= 1 && d.day <= 31 && d.month >= 1 && d.month <= 12);
      },
    ),
    { numRuns: 3000 },
  );
});

Deno.test("cfDayNumber() on the real-world calendars is one absolute day scale", async (t) => {
  await t.step("proleptic_gregorian is daysFromCivil (Hinnant 2013)", () => {
    fc.assert(fc.property(fc.integer({ min: -800000, max: 800000 }), (n) => {
      const g = civilFromDays(n);
      assert.equal(cfDayNumber("proleptic_gregorian", g.year, g.month, g.day), n);
    }));
  });
  await t.step("the reform: 1582-10-04 then 1582-10-15 on standard, 10 days skipped", () => {
    assert.equal(
      cfDayNumber("standard", 1582, 10, 15) - cfDayNumber("standard", 1582, 10, 4),
      1,
    );
    assert.equal(cfDayNumber("standard", 1582, 10, 4), cfDayNumber("julian", 1582, 10, 4));
    assert.equal(
      cfDayNumber("standard", 1582, 10, 15),
      cfDayNumber("proleptic_gregorian", 1582, 10, 15),
    );
    for (let d = 5; d <= 14; d++) {
      assert.throws(() => cfDayNumber("standard", 1582, 10, d), { code: "date_not_in_calendar" });
    }
  });
  await t.step("Julian day number of 2000-01-01 12:00 TT is 2451545 (J2000.0, IAU)", () => {
    // common practice: JD 2451545.0 = 2000-01-01 12:00 (Gregorian); JDN 2451545 - 2440588 days.
    assert.equal(daysFromCivil(2000, 1, 1), 2451545 - 2440588);
    assert.equal(daysFromJulianCivil(1999, 12, 19), 2451545 - 2440588);
    assert.deepEqual(julianCivilFromDays(2451545 - 2440588), { year: 1999, month: 12, day: 19 });
  });
});

Deno.test("CF calendars: month and year lengths", async (t) => {
  await t.step("noleap has no 29 February; all_leap always has one; 360_day months are 30", () => {
    for (const y of [1900, 2000, 2001, 2004]) {
      assert.equal(cfDaysInMonth("noleap", y, 2), 28);
      assert.equal(cfDaysInMonth("all_leap", y, 2), 29);
      assert.equal(cfDaysInMonth("360_day", y, 2), 30);
      assert.throws(() => cfDayNumber("noleap", y, 2, 29), { code: "date_not_in_calendar" });
      assert.equal(cfDaysInYear("360_day", y), 360);
    }
  });
  await t.step("julian keeps 1900 as a leap year; standard and proleptic do not", () => {
    assert.equal(cfDaysInYear("julian", 1900), 366);
    assert.equal(cfDaysInYear("standard", 1900), 365);
    assert.equal(cfDaysInYear("standard", 1500), 366);
    assert.equal(cfDaysInYear("proleptic_gregorian", 1500), 365);
  });
  await t.step("month and year bounds add up to the year on every calendar", () => {
    for (const cal of CF_CALENDARS) {
      for (const y of [1581, 1582, 1583, 1900, 2000, 2001, -1, 1]) {
        if (y === -1 && (cal === "noleap" || cal === "all_leap" || cal === "360_day")) continue;
        const yb = cfYearBounds(cal, y);
        let total = 0;
        let at = yb.start;
        for (let m = 1; m <= 12; m++) {
          const b = cfMonthBounds(cal, y, m);
          assert.equal(b.start, at, `${cal} ${y}-${m}`);
          total += b.end - b.start;
          at = b.end;
        }
        assert.equal(at, yb.end);
        assert.equal(total, cfDaysInYear(cal, y), `${cal} ${y}`);
      }
    }
  });
  await t.step("standard and julian have no year 0", () => {
    assert.throws(() => cfDayNumber("julian", 0, 1, 1), { code: "date_not_in_calendar" });
    assert.equal(cfDayNumber("julian", 1, 1, 1) - cfDayNumber("julian", -1, 12, 31), 1);
    assert.equal(cfDayNumber("noleap", 1, 1, 1) - cfDayNumber("noleap", 0, 12, 31), 1);
  });
});

Deno.test("parseCfCalendar() names every CF calendar and refuses others", () => {
  assert.equal(parseCfCalendar(" NOLEAP "), "noleap");
  assert.equal(parseCfCalendar("366_day"), "all_leap");
  assert.equal(parseCfCalendar(""), "standard");
  for (const bad of ["lunar", "360", "gregorian_proleptic"]) {
    assert.throws(() => parseCfCalendar(bad), (e: unknown) => {
      assert.ok(e instanceof CfTimeError);
      assert.equal(e.code, "unknown_calendar");
      assert.equal(e.field, "calendar");
      assert.equal(e.value, bad);
      return true;
    });
  }
  assert.throws(() => parseCfCalendar("none"), { code: "unsupported_calendar" });
});

Deno.test("parseCfTimeUnits() reads UDUNITS spellings and refuses what is not a time axis", async (t) => {
  await t.step("spellings, T separator, zone and fractional seconds", () => {
    const u = parseCfTimeUnits("Hours Since 1990-1-2T03:04:05.5Z", "standard");
    assert.equal(u.unit, "hours");
    assert.deepEqual(u.reference, { year: 1990, month: 1, day: 2, seconds: 3 * 3600 + 245.5 });
    const z = parseCfTimeUnits("days since 2000-01-01 01:00 +02:00", "standard");
    assert.deepEqual(z.reference, { year: 1999, month: 12, day: 31, seconds: 23 * 3600 });
    assert.equal(parseCfTimeUnits("s since 1970-01-01", "noleap").secondsPerUnit, 1);
    assert.equal(parseCfTimeUnits("days since 1850-01", "360_day").reference.day, 1);
  });
  await t.step("refusals carry code, field and value", () => {
    const cases: [string, string, string][] = [
      ["months since 2000-01-01", "standard", "unsupported_unit"],
      ["years since 0001-01-01", "360_day", "unsupported_unit"],
      ["meters since 2000-01-01", "standard", "unsupported_unit"],
      ["days", "standard", "bad_units"],
      ["", "standard", "bad_units"],
      ["days since yesterday", "standard", "bad_reference"],
      ["days since 2001-02-29", "noleap", "bad_reference"],
      ["days since 1582-10-10", "standard", "bad_reference"],
      ["days since 2000-01-01 25:00", "standard", "bad_reference"],
    ];
    for (const [text, cal, code] of cases) {
      assert.throws(
        () => parseCfTimeUnits(text, parseCfCalendar(cal)),
        (e: unknown) =>
          e instanceof CfTimeError && e.code === code && e.field === "units" &&
          e.value === text,
        text,
      );
    }
    assert.doesNotThrow(() => parseCfTimeUnits("days since 2001-02-30", "360_day"));
  });
  await t.step("a non-finite value names its index", () => {
    assert.throws(() => decodeCfTime([0, NaN], "days since 2000-01-01", "standard"), {
      code: "not_finite",
      index: 1,
    });
  });
});

Deno.test("cfDateTimeToDecimalYear() and decimalYearToCfDateTime()", async (t) => {
  await t.step("real-world calendars: exact instants, both ways", () => {
    fc.assert(fc.property(fc.integer({ min: -200000, max: 100000 }), (n) => {
      const t0 = decimalYear(
        civilFromDays(n).year,
        civilFromDays(n).month,
        civilFromDays(n).day,
        0.25,
      );
      for (const cal of ["standard", "julian", "proleptic_gregorian"] as const) {
        const d = decimalYearToCfDateTime(t0, cal);
        assert.equal(d.seconds, 21600);
        const back = cfDateTimeToDecimalYear(d, cal);
        assert.ok(Math.abs(back - t0) < 1e-11, `${cal}: ${back} vs ${t0}`);
      }
    }));
  });
  await t.step("idealised calendars, rule date: same calendar date", () => {
    const d = { year: 2001, month: 3, day: 1, seconds: 43200 };
    assert.equal(cfDateTimeToDecimalYear(d, "noleap"), decimalYear(2001, 3, 1, 0.5));
    assert.throws(
      () => cfDateTimeToDecimalYear({ year: 2001, month: 2, day: 30, seconds: 0 }, "360_day"),
      { code: "not_representable" },
    );
    assert.throws(() => decimalYearToCfDateTime(decimalYear(2001, 1, 31), "360_day"), {
      code: "not_representable",
    });
  });
  await t.step("idealised calendars, rule month_position: a month's middle to its middle", () => {
    for (const cal of ["noleap", "all_leap", "360_day"] as const) {
      for (const y of [2000, 2001]) {
        for (let m = 1; m <= 12; m++) {
          const b = cfMonthBounds(cal, y, m);
          const mid = cfDateFromDayNumber(cal, b.start + Math.floor((b.end - b.start) / 2));
          const seconds = (b.end - b.start) % 2 === 1 ? 43200 : 0;
          const t0 = cfDateTimeToDecimalYear({ ...mid, seconds }, cal, "month_position");
          const c = calendarInstant(t0);
          assert.equal(c.month, m);
          const gmid = decimalYear(y, m, 1) +
            (decimalYear(m === 12 ? y + 1 : y, m === 12 ? 1 : m + 1, 1) - decimalYear(y, m, 1)) / 2;
          assert.ok(Math.abs(t0 - gmid) < 1e-12, `${cal} ${y}-${m}: ${t0} vs ${gmid}`);
        }
      }
    }
  });
});
