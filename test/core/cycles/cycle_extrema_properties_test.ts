/**
 * Property tests of findCycleExtrema(): its linear-time prominences (monotone stacks over the
 * turning points) against the plain definition, written below as the text of the method says
 * (climb from each candidate until a strictly lower point on each side; O(N·K)).
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { type Extremum, findCycleExtrema } from "../../../core/cycles/mod.ts";

/** The plain definition (the method of findCycleExtrema's documentation, one step at a time). */
function extremaByDefinition(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  sep = 7,
  promOption?: number,
): Extremum[] {
  const idx: number[] = [];
  for (let i = 0; i < value.length; i++) if (Number.isFinite(value[i])) idx.push(i);
  const n = idx.length;
  if (n < 3) return [];
  const v = idx.map((i) => value[i]);
  const lo = Math.min(...v), hi = Math.max(...v);
  const prom = promOption ?? 0.1 * (hi - lo);
  if (!(hi > lo)) return [];
  const cands: { k: number; prom: number }[] = [];
  for (let k = 1; k < n - 1;) {
    if (v[k] < v[k - 1]) {
      let e = k;
      while (e + 1 < n && v[e + 1] === v[k]) e++;
      if (e + 1 < n && v[e + 1] > v[k]) {
        let left = v[k], right = v[k];
        for (let j = k - 1; j >= 0 && v[j] >= v[k]; j--) left = Math.max(left, v[j]);
        for (let j = e + 1; j < n && v[j] >= v[k]; j++) right = Math.max(right, v[j]);
        cands.push({ k: (k + e) >> 1, prom: Math.min(left, right) - v[k] });
      }
      k = e + 1;
    } else k++;
  }
  const strong = cands.filter((c) => c.prom >= prom);
  strong.sort((a, b) => v[a.k] - v[b.k] || a.k - b.k);
  const kept: { k: number; prom: number }[] = [];
  for (const c of strong) {
    if (kept.every((q) => Math.abs(time[idx[q.k]] - time[idx[c.k]]) >= sep)) kept.push(c);
  }
  kept.sort((a, b) => a.k - b.k);
  const out: Extremum[] = [];
  if (kept.length === 0) return out;
  const at = (k: number) => ({ index: idx[k], time: time[idx[k]], value: v[k] });
  const argmax = (from: number, to: number) => {
    let best = from;
    for (let j = from + 1; j <= to; j++) if (v[j] > v[best]) best = j;
    return best;
  };
  const minOf = (from: number, to: number) => Math.min(...v.slice(from, to + 1));
  const first = kept[0].k;
  if (first >= 2) {
    const m = argmax(0, first - 1);
    if (m > 0) {
      const fall = v[m] - minOf(0, m);
      out.push({ kind: "maximum", ...at(m), prominence: fall, provisional: fall < prom });
    }
  }
  for (let q = 0; q < kept.length; q++) {
    out.push({ kind: "minimum", ...at(kept[q].k), prominence: kept[q].prom, provisional: false });
    if (q + 1 < kept.length) {
      const m = argmax(kept[q].k + 1, kept[q + 1].k - 1);
      out.push({
        kind: "maximum",
        ...at(m),
        prominence: v[m] - v[kept[q + 1].k],
        provisional: false,
      });
    }
  }
  const last = kept[kept.length - 1].k;
  if (last <= n - 3) {
    const m = argmax(last + 1, n - 1);
    if (m < n - 1) {
      const fall = v[m] - minOf(m, n - 1);
      out.push({ kind: "maximum", ...at(m), prominence: fall, provisional: fall < prom });
    }
  }
  return out;
}

// small integers make plateaus, ties and equal minima common; NaN makes gaps
const sample = fc.oneof(
  { weight: 12, arbitrary: fc.integer({ min: 0, max: 9 }) },
  { weight: 1, arbitrary: fc.constant(NaN) },
);

Deno.test("findCycleExtrema() agrees with the plain definition of its method", async (t) => {
  await t.step("random series with plateaus, ties and gaps (every minimum kept)", () => {
    fc.assert(
      fc.property(fc.array(sample, { maxLength: 120 }), (vals) => {
        const time = vals.map((_, i) => i);
        assert.deepEqual(
          findCycleExtrema(time, vals, { minSeparation: 1 }),
          extremaByDefinition(time, vals, 1),
        );
      }),
      { numRuns: 2000, seed: 17 },
    );
  });
  await t.step("random separations and prominence thresholds", () => {
    fc.assert(
      fc.property(
        fc.array(sample, { maxLength: 200 }),
        fc.double({ min: 0.25, max: 30, noNaN: true }),
        fc.double({ min: 0.01, max: 5, noNaN: true }),
        (vals, sep, prom) => {
          const time = vals.map((_, i) => 1700 + i / 12);
          // separations of 3 to 360 samples
          assert.deepEqual(
            findCycleExtrema(time, vals, { minSeparation: sep, prominence: prom }),
            extremaByDefinition(time, vals, sep, prom),
          );
        },
      ),
      { numRuns: 1000, seed: 18 },
    );
  });
  await t.step("smooth noisy cycles (real-valued, few ties)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 50, maxLength: 600 }),
        (noise) => {
          const time = noise.map((_, i) => 1800 + i / 12);
          const v = noise.map((e, i) => 100 - 90 * Math.cos((2 * Math.PI * i) / 132) + 8 * e);
          assert.deepEqual(findCycleExtrema(time, v), extremaByDefinition(time, v));
        },
      ),
      { numRuns: 300, seed: 19 },
    );
  });
});
