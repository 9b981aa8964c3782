import assert from "node:assert/strict";
import {
  decimalYear,
  formatIsoTime,
  parseIsoDecimalYear,
  parseIsoTime,
  periodBounds,
} from "../../../core/time/mod.ts";

const close = (a: number, b: number, tol = 1e-12) =>
  assert.ok(Math.abs(a - b) <= tol, `${a} vs ${b} (tol ${tol})`);

Deno.test("parseIsoTime() leap-year dates match hand-computed decimal years", async (t) => {
  await t.step("2024-03-01 (leap year)", () => {
    // 2024 is a leap year: 366 days. 1 March is day 31 (Jan) + 29 (Feb) + 1 = 61.
    // Noon: 2024 + (61 − 1 + 0.5) / 366 = 2024 + 60.5 / 366 = 2024.165300546448...
    close(parseIsoTime("2024-03-01").decimalYear, 2024.1653005464481);
    assert.equal(parseIsoTime("2024-03-01").decimalYear, 2024 + 60.5 / 366);
  });
  await t.step("2023-03-01 (common year)", () => {
    // 2023 has 365 days. 1 March is day 31 + 28 + 1 = 60.
    // Noon: 2023 + (60 − 1 + 0.5) / 365 = 2023 + 59.5 / 365 = 2023.163013698630...
    close(parseIsoTime("2023-03-01").decimalYear, 2023.1630136986302);
    assert.equal(parseIsoTime("2023-03-01").decimalYear, 2023 + 59.5 / 365);
  });
  await t.step("1900 is not a leap year, 2000 is", () => {
    // 1900: divisible by 100, not by 400 → 365 days; 1900-02-29 does not exist.
    assert.throws(() => parseIsoTime("1900-02-29"), /day must be 01\.\.28/);
    // 1900-03-01 noon = 1900 + (59 + 0.5) / 365
    assert.equal(parseIsoTime("1900-03-01").decimalYear, 1900 + 59.5 / 365);
    // 2000: divisible by 400 → 366 days; 2000-02-29 noon = 2000 + (59 + 0.5) / 366
    assert.equal(parseIsoTime("2000-02-29").decimalYear, 2000 + 59.5 / 366);
    // 2000-12-31 noon = 2000 + 365.5 / 366
    assert.equal(parseIsoTime("2000-12-31").decimalYear, 2000 + 365.5 / 366);
    assert.equal(parseIsoTime("1900-12-31").decimalYear, 1900 + 364.5 / 365);
  });
});

Deno.test("parseIsoTime() reads every accepted format", async (t) => {
  await t.step("YYYY is the middle of the year", () => {
    assert.deepEqual(parseIsoTime("1996"), {
      decimalYear: 1996.5,
      precision: "year",
      start: 1996,
      end: 1997,
    });
  });
  await t.step("YYYY-MM is the middle of the month", () => {
    // August 1996 (leap year): 213 days before it (31+29+31+30+31+30+31), 31 days long.
    const p = parseIsoTime("1996-08");
    assert.equal(p.precision, "month");
    assert.equal(p.decimalYear, 1996 + (213 + 15.5) / 366);
    assert.equal(p.start, 1996 + 213 / 366);
    assert.equal(p.end, 1996 + 244 / 366);
    // February 2023: middle is 14 days after 1 February 00:00 = 2023 + (31 + 14) / 365
    assert.equal(parseIsoTime("2023-02").decimalYear, 2023 + 45 / 365);
    assert.equal(parseIsoTime("2023-12").end, 2024);
  });
  await t.step("YYYY-MM-DD is noon", () => {
    const p = parseIsoTime("1996-08-15");
    assert.equal(p.precision, "day");
    assert.equal(p.decimalYear, 1996 + (213 + 14.5) / 366);
    assert.equal(p.start, 1996 + (213 + 14) / 366);
    assert.equal(p.end, 1996 + (213 + 15) / 366);
  });
  await t.step("ordinal YYYY-DDD is noon of that day", () => {
    assert.equal(parseIsoTime("2024-061").decimalYear, parseIsoTime("2024-03-01").decimalYear);
    assert.throws(() => parseIsoTime("2023-366"), /ordinal day must be 001\.\.365/);
  });
  await t.step("date-times: Z, offsets, no offset (UTC), space separator, fractions", () => {
    assert.equal(parseIsoTime("2024-01-01T00:00:00Z").decimalYear, 2024);
    assert.equal(parseIsoTime("2024-01-01T00:00Z").decimalYear, 2024);
    assert.equal(parseIsoTime("2024-01-01 12:00").decimalYear, 2024 + 0.5 / 366);
    assert.equal(parseIsoTime("2024-01-01T12:00:00").precision, "instant");
    // +05:30 means 05:30 ahead of UTC: 2024-01-01T05:30+05:30 = 2024-01-01T00:00Z
    assert.equal(parseIsoTime("2024-01-01T05:30:00+05:30").decimalYear, 2024);
    assert.equal(parseIsoTime("2024-01-01T05:30:00+0530").decimalYear, 2024);
    // an offset that crosses the year boundary: 2023-12-31T21:00-03:00 = 2024-01-01T00:00Z
    assert.equal(parseIsoTime("2023-12-31T21:00:00-03:00").decimalYear, 2024);
    close(parseIsoTime("2024-01-01T00:00:00.5Z").decimalYear, 2024 + 0.5 / 86400 / 366, 1e-15);
    // 24:00 is the end of the day
    assert.equal(parseIsoTime("2023-12-31T24:00Z").decimalYear, 2024);
  });
  await t.step("expanded years", () => {
    assert.equal(parseIsoTime("-0001").decimalYear, -0.5);
    assert.equal(parseIsoTime("+012000-01").precision, "month");
  });
});

Deno.test("parseIsoTime() rejects what is not a valid time, naming the reason", () => {
  for (
    const [text, why] of [
      ["", /expected ISO 8601/],
      ["1996.5", /expected ISO 8601/],
      ["96-08", /expected ISO 8601/],
      ["19960815", /expected ISO 8601/],
      ["1996-13", /month must be 01\.\.12/],
      ["1996-00-10", /month must be 01\.\.12/],
      ["2023-02-29", /day must be 01\.\.28/],
      ["2023-04-31", /day must be 01\.\.30/],
      ["2023-01-01T25:00Z", /hour/],
      ["2023-01-01T24:30Z", /hour/],
      ["2023-01-01T10:60Z", /minute/],
      ["2023-01-01T10:00:61Z", /second/],
      ["2023-01-01T10:00+25:00", /offset/],
      ["August 1996", /expected ISO 8601/],
    ] as const
  ) {
    assert.throws(() => parseIsoTime(text), (e: unknown) => {
      assert.ok(e instanceof RangeError);
      assert.match(e.message, why);
      assert.match(e.message, /^Cannot parse time/);
      return true;
    }, text);
  }
});

Deno.test("parseIsoTime() agrees with Python datetime (fixtures/reference/decimal_year_python.py)", async () => {
  // Reference: Python 3.11 datetime, proleptic Gregorian; script and JSON in fixtures/reference/.
  const ref = JSON.parse(
    await Deno.readTextFile(
      new URL("../../../fixtures/reference/decimal_year_python.json", import.meta.url),
    ),
  ) as { cases: { time: string; decimal_year: number }[] };
  assert.ok(ref.cases.length >= 25);
  for (const c of ref.cases) close(parseIsoTime(c.time).decimalYear, c.decimal_year, 1e-11);
});

Deno.test("formatIsoTime() and parseIsoTime() round-trip at each resolution", async (t) => {
  await t.step("every day 1899..2001 (covers 1900 and 2000)", () => {
    for (let y = 1899; y <= 2001; y++) {
      for (let d = 0; d < (y % 4 === 0 && y !== 1900 ? 366 : 365); d++) {
        const iso = formatIsoTime(y + (d + 0.5) / (y % 4 === 0 && y !== 1900 ? 366 : 365), "daily");
        const back = parseIsoTime(iso);
        assert.equal(formatIsoTime(back.decimalYear, "daily"), iso);
        assert.equal(back.precision, "day");
      }
    }
  });
  await t.step("months and years", () => {
    for (let y = 1700; y <= 2030; y++) {
      for (let m = 1; m <= 12; m++) {
        const iso = `${y}-${String(m).padStart(2, "0")}`;
        const t = parseIsoTime(iso).decimalYear;
        assert.equal(formatIsoTime(t, "monthly"), iso);
        assert.equal(parseIsoTime(formatIsoTime(t, "monthly")).decimalYear, t);
      }
      assert.equal(formatIsoTime(parseIsoTime(String(y)).decimalYear, "annual"), String(y));
    }
  });
  await t.step("instants to the millisecond", () => {
    for (
      const iso of ["2024-02-29T18:00:00Z", "1999-12-31T23:59:59.5Z", "1850-07-01T06:07:08.009Z"]
    ) {
      const t = parseIsoTime(iso).decimalYear;
      assert.equal(formatIsoTime(t, "irregular"), iso.replace(".5Z", ".500Z"));
    }
  });
  await t.step("period starts are not read as the previous period", () => {
    assert.equal(formatIsoTime(2024, "daily"), "2024-01-01");
    assert.equal(formatIsoTime(decimalYear(2024, 3, 1), "monthly"), "2024-03");
    assert.equal(formatIsoTime(decimalYear(2024, 3, 1), "daily"), "2024-03-01");
    assert.equal(formatIsoTime(decimalYear(2023, 12, 31, 0.9999), "daily"), "2023-12-31");
  });
  await t.step("periodBounds() equals the parsed period", () => {
    for (const iso of ["2024-02", "2023-02", "2000-02-29", "1996"]) {
      const p = parseIsoTime(iso);
      const res = p.precision === "year" ? "annual" : p.precision === "month" ? "monthly" : "daily";
      const b = periodBounds(p.decimalYear, res);
      assert.deepEqual([b.start, b.end, b.middle], [p.start, p.end, p.decimalYear]);
    }
  });
});

Deno.test("parseIsoDecimalYear() equals parseIsoTime().decimalYear bit for bit, and fails alike", () => {
  for (let y = 1599; y <= 2401; y += 1) {
    const ys = String(y);
    assert.equal(parseIsoDecimalYear(ys), parseIsoTime(ys).decimalYear);
    for (let m = 1; m <= 12; m++) {
      const ms = `${ys}-${String(m).padStart(2, "0")}`;
      assert.equal(parseIsoDecimalYear(ms), parseIsoTime(ms).decimalYear);
      for (const d of [1, 15, 28, 29, 30, 31]) {
        const ds = `${ms}-${String(d).padStart(2, "0")}`;
        let slow: number | Error;
        try {
          slow = parseIsoTime(ds).decimalYear;
        } catch (e) {
          slow = e as Error;
        }
        if (slow instanceof Error) assert.throws(() => parseIsoDecimalYear(ds), RangeError);
        else assert.equal(parseIsoDecimalYear(ds), slow);
      }
    }
  }
  for (const bad of ["1996-13", "1996-00", "abcd", "1996-1-01", "+96"]) {
    assert.throws(() => parseIsoDecimalYear(bad), RangeError, bad);
  }
});

Deno.test("parseIsoTime() reads ISO 8601 intervals as their middle", async (t) => {
  await t.step("start/duration", () => {
    // 1996-08/P1M is August 1996: same middle as "1996-08"
    const p = parseIsoTime("1996-08/P1M");
    assert.equal(p.precision, "interval");
    close(p.decimalYear, parseIsoTime("1996-08").decimalYear, 1e-12);
    close(p.end, parseIsoTime("1996-08").end, 1e-12);
    // a year from 1 July 2023 ends 1 July 2024 and its middle is 183 days in (2023-12-31T00:00)
    close(parseIsoTime("2023-07-01/P1Y").decimalYear, 2023 + 364 / 365, 1e-12);
    close(parseIsoTime("2024-01-01T00:00Z/PT12H").decimalYear, 2024 + 0.25 / 366, 1e-15);
    close(parseIsoTime("2024-01-01/P1W2D").end, 2024 + 9 / 366, 1e-12);
    // 31 January + 1 month is clamped to 29 February 2024
    close(parseIsoTime("2024-01-31/P1M").end, 2024 + (31 + 28) / 366, 1e-12);
  });
  await t.step("start/end: whole periods, inclusive", () => {
    const p = parseIsoTime("1961/1990");
    assert.deepEqual([p.start, p.end], [1961, 1991]);
    // 10957 days (three leap years); the middle is 5478.5 days in: 1976-01-01T12:00Z
    close(p.decimalYear, 1976 + 0.5 / 366, 1e-12);
    close(parseIsoTime("2000-01/2000-03").end, 2000 + 91 / 366, 1e-12);
  });
  await t.step("bad intervals", () => {
    assert.throws(() => parseIsoTime("1990/1961"), /must end after it starts/);
    assert.throws(() => parseIsoTime("P1M/1996-08"), /duration\/end intervals/);
    assert.throws(() => parseIsoTime("1996-08/P"), /unparseable duration/);
    assert.throws(() => parseIsoTime("1996-08/P1X"), /unparseable duration/);
    assert.throws(() => parseIsoTime("1996/1997/1998"), /an interval is start\/end/);
  });
});
