import assert from "node:assert/strict";
import {
  cycleAmplitudesAgainstReference,
  tsiCycleAmplitude,
} from "../../../core/irradiance/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { decimalYear } from "../../../core/time/mod.ts";

/** Monthly cells of an 11-year sinusoid (amplitude `a` peak to trough) from y0 to y1. */
function monthly(y0: number, y1: number, a: (y: number) => number) {
  const time: number[] = [], value: number[] = [];
  for (let y = y0; y <= y1; y++) {
    for (let m = 1; m <= 12; m++) {
      const t = decimalYear(y, m, 15);
      time.push(t);
      value.push(1361 + (a(y) / 2) * Math.sin((2 * Math.PI * (t - 1900)) / 11));
    }
  }
  return { time, value };
}

Deno.test("tsiCycleAmplitude() uses annual means with the coverage rule", () => {
  const s = monthly(1900, 1960, () => 1);
  // the last year with 9 months is no annual mean (10 needed), like a resampled series
  const cut = s.time.length - 3;
  const partial = tsiCycleAmplitude(s.time.slice(0, cut), s.value.slice(0, cut));
  const full = tsiCycleAmplitude(s.time, s.value);
  const cut12 = s.time.length - 12;
  const without = tsiCycleAmplitude(s.time.slice(0, cut12), s.value.slice(0, cut12));
  assert.deepEqual(partial, without);
  assert.ok(full.cycles.length > without.cycles.length, "the full last year makes a maximum");
  // a year with 4 missing months inside the record is a gap: no extremum can use it
  const v = s.value.slice();
  for (let i = 0; i < 4; i++) v[12 * 30 + i] = NaN;
  const holed = tsiCycleAmplitude(s.time, v);
  assert.ok(holed.cycles.every((c) => c.minimumYear !== 1930 && c.maximumYear !== 1930));
  // peak to trough of annual means of a 1 W m-2 sinusoid: a little under 1 (derived)
  assert.ok(full.median! > 0.9 && full.median! <= 1.0);
  assert.deepEqual(tsiCycleAmplitude([2000.5], [1361]), { median: null, cycles: [] });
});

Deno.test("cycleAmplitudesAgainstReference() judges each cycle against its own yardstick", () => {
  // a weak-cycle era (0.4 W m-2) is consistent with a yardstick that is weak there too
  const weak = (y: number) => (y < 1930 ? 0.4 : 1);
  const ref = monthly(1880, 1990, weak);
  const same = cycleAmplitudesAgainstReference(ref.time, ref.value, ref.value);
  assert.ok(same.length >= 8);
  assert.ok(same.every((c) => c.consistent && Math.abs(c.ratio! - 1) < 1e-12));
  assert.ok(same.some((c) => c.amplitude < 0.45));
  // 18 % too large from 1947 on (a constant version factor across 1947): flagged there only
  const wrong = monthly(1880, 1990, (y) => weak(y) * (y >= 1947 ? 1.18 : 1));
  const c = cycleAmplitudesAgainstReference(wrong.time, wrong.value, ref.value, {
    tolerance: 0.05,
  });
  for (const x of c) {
    if (x.minimumYear >= 1947) assert.ok(!x.consistent && Math.abs(x.ratio! - 1.18) < 0.01);
    if (x.maximumYear < 1947) assert.ok(x.consistent);
  }
  // the floor: a 3 % difference on a 1 W m-2 cycle is below 0.05 W m-2
  const close = monthly(1880, 1990, (y) => weak(y) * 1.03);
  assert.ok(
    cycleAmplitudesAgainstReference(close.time, close.value, ref.value, { tolerance: 0 })
      .every((x) => x.consistent),
  );
  assert.throws(
    () => cycleAmplitudesAgainstReference(ref.time, ref.value, ref.value.slice(1)),
    (e: unknown) => e instanceof InputError && e.field === "reference",
  );
  assert.throws(
    () => cycleAmplitudesAgainstReference(ref.time, ref.value, ref.value, { floor: -1 }),
    (e: unknown) => e instanceof InputError && e.field === "floor",
  );
});
