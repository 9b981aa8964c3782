/**
 * Side-by-side medians for the irradiance benchmarks: the workload of irradiance_case.ts,
 * timed with performance.now() over repeated runs, printed in the format of
 * irradiance_numpy.py so the two can be run back to back and compared (the minimum is printed
 * too: on a loaded machine it is the steadier figure):
 *
 *   deno run -A test/bench/irradiance_medians.ts
 *   (unset OPENBLAS_CORETYPE OPENBLAS_L2_SIZE; /usr/bin/python3 test/bench/irradiance_numpy.py)
 */
import { median, min } from "d3-array";
import { irradianceCase } from "./irradiance_case.ts";

function timings(fn: () => void, repeat: number): number[] {
  for (let i = 0; i < 3; i++) fn(); // warm-up (JIT)
  const t: number[] = [];
  for (let i = 0; i < repeat; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  return t;
}

const work = irradianceCase();
const cal = timings(work.calibrate, 30);
const rec = timings(work.reconstruct, 50);
const ms = (x: number | undefined) => (x ?? NaN).toFixed(2);
console.log(`deno ${Deno.version.deno}`);
console.log(
  `calibrate 17,000 days (Prais-Winsten + 5-fold blocked CV): median ${ms(median(cal))} ms, min ${
    ms(min(cal))
  } ms`,
);
console.log(
  `reconstruct 153,000 days with 95 % prediction intervals: median ${ms(median(rec))} ms, min ${
    ms(min(rec))
  } ms`,
);
