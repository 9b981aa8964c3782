/**
 * deno bench for the solar-cycle area (means per iteration; medians and the side-by-side
 * comparison with numpy/scipy are printed by cycles_medians.ts):
 *
 *   deno bench -A test/bench/cycles_bench.ts
 */
import {
  cycleTable,
  findCycleExtrema,
  fitHathawayCycle,
  forecastCycle,
  hathawayShape,
  smoothed13Month,
} from "../../core/cycles/mod.ts";
import { lombScargle, periodGrid } from "../../core/spectral/mod.ts";
import { activity, monthTimes, PERIODS, unevenTimes } from "./cycles_case.ts";

const x = activity(), tm = monthTimes(), tu = unevenTimes();
const fEven = periodGrid({ minPeriod: 1 / 6, maxPeriod: 100, count: PERIODS });
const fPeriod = periodGrid({ minPeriod: 1 / 6, maxPeriod: 100, count: PERIODS, spacing: "period" });

Deno.bench("13-month smoothing + extrema + cycle table, 3,600 months", () => {
  const s = smoothed13Month(x);
  cycleTable(tm, findCycleExtrema(tm, s), { activity: x });
});

Deno.bench("13-month smoothing only, 3,600 months", () => {
  smoothed13Month(x);
});

Deno.bench("Lomb-Scargle, 3,600 uneven points, 5,000 periods even in frequency", () => {
  lombScargle(tu, x, fEven);
});

Deno.bench("Lomb-Scargle, 3,600 uneven points, 5,000 periods even in period", () => {
  lombScargle(tu, x, fPeriod);
});

const ct = Array.from({ length: 132 }, (_, i) => 2000 + i / 12);
const cv = ct.map((t, i) =>
  hathawayShape((t - 2000) * 12 + 3, { t0: 0, a: 0.002 }) + 8 * Math.sin(i * 1.7)
);
Deno.bench("Hathaway shape fit of one 132-month cycle (free width, multi-start)", () => {
  fitHathawayCycle(ct, cv);
});

Deno.bench("forecast from 36 months, 200 bootstrap replicates", () => {
  forecastCycle(ct.slice(0, 36), cv.slice(0, 36), { seed: 1, curveTime: ct, replicates: 200 });
});
