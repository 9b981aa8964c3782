/**
 * Medians for the solar-cycle area, beside the numpy/scipy versions of the same work
 * (test/bench/cycles_numpy.py, run here, same machine, same moment):
 *
 * - 13-month smoothing + extrema + cycle table of a 3,600-month series;
 * - Lomb–Scargle of 3,600 uneven points over 5,000 periods (grid even in frequency, and even
 *   in period).
 *
 *   deno run -A test/bench/cycles_medians.ts [rounds]
 */
import { median as d3Median } from "d3-array";
import { cycleTable, findCycleExtrema, smoothed13Month } from "../../core/cycles/mod.ts";
import { lombScargle, periodGrid } from "../../core/spectral/mod.ts";
import { activity, monthTimes, PERIODS, unevenTimes } from "./cycles_case.ts";

const median = (xs: number[]): number => d3Median(xs) ?? NaN;

const ROUNDS = Number(Deno.args[0] ?? 15);

function timeIt(f: () => void): number {
  f(); // warm-up
  const ts: number[] = [];
  for (let r = 0; r < ROUNDS; r++) {
    const t0 = performance.now();
    f();
    ts.push((performance.now() - t0) / 1000);
  }
  return median(ts);
}

const x = activity(), tm = monthTimes(), tu = unevenTimes();
const fEven = periodGrid({ minPeriod: 1 / 6, maxPeriod: 100, count: PERIODS });
const fPeriod = periodGrid({ minPeriod: 1 / 6, maxPeriod: 100, count: PERIODS, spacing: "period" });

const table = timeIt(() => {
  const s = smoothed13Month(x);
  cycleTable(tm, findCycleExtrema(tm, s), { activity: x });
});
const lsEven = timeIt(() => lombScargle(tu, x, fEven));
const lsPeriod = timeIt(() => lombScargle(tu, x, fPeriod));

const py = new Deno.Command("/usr/bin/python3", {
  args: [new URL("./cycles_numpy.py", import.meta.url).pathname, String(Math.min(ROUNDS, 7))],
  env: { OPENBLAS_CORETYPE: "", OPENBLAS_L2_SIZE: "" },
  stdout: "piped",
  stderr: "inherit",
}).outputSync();
const ref = py.success ? JSON.parse(new TextDecoder().decode(py.stdout)) : null;

console.log(JSON.stringify(
  {
    rounds: ROUNDS,
    cycle_table_13_month_3600_months_ms: table * 1e3,
    lomb_scargle_3600x5000_even_frequency_ms: lsEven * 1e3,
    lomb_scargle_3600x5000_even_period_ms: lsPeriod * 1e3,
    numpy: ref && {
      versions: { numpy: ref.numpy, scipy: ref.scipy },
      cycle_table_ms: ref.cycle_table_seconds * 1e3,
      lomb_scargle_ms: ref.lomb_scargle_seconds * 1e3,
      ratio_cycle_table_sunlag_over_numpy: table / ref.cycle_table_seconds,
      ratio_lomb_scargle_even_sunlag_over_scipy: lsEven / ref.lomb_scargle_seconds,
      ratio_lomb_scargle_period_sunlag_over_scipy: lsPeriod / ref.lomb_scargle_seconds,
    },
  },
  null,
  2,
));
