import assert from "node:assert/strict";
import { decimalYear, inferResolution, parseIsoTime } from "../../../core/time/mod.ts";

const iso = (xs: string[]) => xs.map((x) => parseIsoTime(x).decimalYear);

Deno.test("inferResolution() recognises middle-of-period axes, with gaps", () => {
  assert.equal(inferResolution(iso(["1700", "1701", "1705"])), "annual");
  assert.equal(inferResolution(iso(["1996-01", "1996-02", "1996-05", "1997-02"])), "monthly");
  assert.equal(
    inferResolution(iso(["2024-02-28", "2024-02-29", "2024-03-01", "2024-03-09"])),
    "daily",
  );
});

Deno.test("inferResolution() recognises month-start, midnight and year-start stamps", () => {
  const monthStarts = Array.from(
    { length: 24 },
    (_, i) => decimalYear(2000 + Math.floor(i / 12), (i % 12) + 1, 1),
  );
  assert.equal(inferResolution(monthStarts), "monthly");
  const midnights = Array.from({ length: 40 }, (_, i) => decimalYear(2024, 2, 1) + i / 366);
  assert.equal(inferResolution(midnights), "daily");
  assert.equal(inferResolution([1900, 1901, 1902, 1904]), "annual");
});

Deno.test("inferResolution() calls anything else irregular", () => {
  assert.equal(
    inferResolution(iso(["2024-01-01T10:00Z", "2024-01-01T11:00Z", "2024-01-01T13:00Z"])),
    "irregular",
  );
  // two points in one month with monthly-like spacing elsewhere (midnight stamps; all-noon
  // stamps would be a daily series with gaps)
  assert.equal(
    inferResolution(
      iso(["2024-01-01T00:00Z", "2024-01-30T00:00Z", "2024-03-01T00:00Z", "2024-04-01T00:00Z"]),
    ),
    "irregular",
  );
  // mixed times of day at daily spacing
  assert.equal(
    inferResolution(iso(["2024-01-01T00:00Z", "2024-01-02T06:00Z", "2024-01-03T00:00Z"])),
    "irregular",
  );
});

Deno.test("inferResolution() rejects short, unsorted or non-finite axes", () => {
  assert.throws(() => inferResolution([2000]), /at least 2 points, got 1/);
  assert.throws(() => inferResolution([]), /got 0/);
  assert.throws(() => inferResolution([2000, 2000]), /strictly increasing/);
  assert.throws(() => inferResolution([2000, NaN]), /not finite/);
});
