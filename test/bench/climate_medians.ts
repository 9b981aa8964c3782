/**
 * Medians and the side-by-side ratio for the solar–climate area:
 *
 * - 10,000 phase-randomised surrogates of a 4,096-month series, lags −120..120, linear
 *   detrend, overlap Pearson r: sunlag on 2 Web Workers (chunks of 500 surrogates, result
 *   buffers transferred) and on one thread, beside the numpy, scipy.fft and "packed numpy"
 *   versions of the same work in climate_numpy.py (run here, same machine, same moment);
 * - attribution with 4 regressors, lags 0–24 months each, 1,800 months.
 *
 *   deno run -A test/bench/climate_medians.ts [rounds]
 */
import { median as d3Median } from "d3-array";
import {
  attributionRegression,
  combineSurrogateChunks,
  type SurrogateChunkOutput,
  surrogateLagChunk,
} from "../../core/climate/mod.ts";
import { attributionCase, lagCase, SURROGATES } from "./climate_case.ts";

const median = (xs: number[]): number => d3Median(xs) ?? NaN;

const ROUNDS = Number(Deno.args[0] ?? 5);
const CHUNK = 500;

const { plan } = lagCase();

// one pool for all rounds, as the service keeps its pool
const pool = Array.from(
  { length: 2 },
  () => new Worker(new URL("./climate_worker.ts", import.meta.url).href, { type: "module" }),
);

async function withWorkers(count: number): Promise<SurrogateChunkOutput[]> {
  const workers = pool.slice(0, count);
  const chunks: { start: number; end: number }[] = [];
  for (let s = 0; s < SURROGATES; s += CHUNK) {
    chunks.push({ start: s, end: Math.min(SURROGATES, s + CHUNK) });
  }
  const results: SurrogateChunkOutput[] = [];
  let next = 0;
  await Promise.all(workers.map((w) =>
    new Promise<void>((resolve) => {
      const send = () => {
        if (next >= chunks.length) {
          resolve();
          return;
        }
        w.postMessage({ plan, ...chunks[next++] });
      };
      w.onmessage = (e) => {
        results.push(e.data);
        send();
      };
      send();
    })
  ));
  return results;
}

async function timed<T>(
  rounds: number,
  fn: () => Promise<T> | T,
): Promise<{ median: number; last: T }> {
  const ts: number[] = [];
  let last!: T;
  for (let i = 0; i < rounds; i++) {
    const t0 = performance.now();
    last = await fn();
    ts.push((performance.now() - t0) / 1000);
  }
  return { median: median(ts), last };
}

function python(variant: string): number {
  const out = new Deno.Command("/usr/bin/python3", {
    args: [new URL("./climate_numpy.py", import.meta.url).pathname, "1", variant],
    env: { OPENBLAS_CORETYPE: "", OPENBLAS_L2_SIZE: "" },
    stdout: "piped",
  }).outputSync();
  const ref = JSON.parse(new TextDecoder().decode(out.stdout));
  versions = ref.versions;
  return ref[`${variant}_seconds`];
}
let versions: { numpy: string; scipy: string } = { numpy: "?", scipy: "?" };

// The machine is shared, so load changes from minute to minute: the rounds interleave the
// four contenders so that each sees the same conditions, and medians are taken per contender.
await withWorkers(2); // warm-up: compile the worker module
const times = {
  two: [] as number[],
  one: [] as number[],
  numpy: [] as number[],
  scipy: [] as number[],
  packed: [] as number[],
};
let lastTwo: SurrogateChunkOutput[] = [], lastOne: SurrogateChunkOutput[] = [];
const load0 = Deno.loadavg()[0];
for (let r = 0; r < ROUNDS; r++) {
  let t0 = performance.now();
  lastTwo = await withWorkers(2);
  times.two.push((performance.now() - t0) / 1000);
  times.numpy.push(python("numpy"));
  times.scipy.push(python("scipy"));
  times.packed.push(python("numpy_packed"));
  t0 = performance.now();
  lastOne = [surrogateLagChunk({ plan, start: 0, end: SURROGATES })];
  times.one.push((performance.now() - t0) / 1000);
}
const load1 = Deno.loadavg()[0];
const resTwo = combineSurrogateChunks(plan, lastTwo);
const resOne = combineSurrogateChunks(plan, lastOne);
if (resTwo.pFamilyWise !== resOne.pFamilyWise) throw new Error("worker count changed the result");
const two = { median: median(times.two) }, one = { median: median(times.one) };
const ref = {
  versions,
  numpy_seconds: median(times.numpy),
  scipy_seconds: median(times.scipy),
  numpy_packed_seconds: median(times.packed),
};
const fastest = Math.min(ref.numpy_seconds, ref.scipy_seconds);
const ratios = times.two.map((t, i) => t / Math.min(times.numpy[i], times.scipy[i]));

const att = attributionCase();
const a1 = await timed(
  ROUNDS,
  () => attributionRegression(att.y, att.regressors, { errors: "ar1" }),
);
const a2 = await timed(
  ROUNDS,
  () => attributionRegression(att.y, att.regressors, { errors: "ols_hac" }),
);

pool.forEach((w) => w.terminate());
const f = (s: number) => `${s.toFixed(3)} s`;
console.log(`surrogate test, ${SURROGATES} surrogates, 4,096 months, lags ±120 (medians)`);
console.log(`  sunlag, 2 workers          ${f(two.median)}   (${ROUNDS} rounds)`);
console.log(`  sunlag, 1 thread           ${f(one.median)}`);
console.log(`  numpy ${ref.versions.numpy}              ${f(ref.numpy_seconds)}`);
console.log(`  scipy.fft ${ref.versions.scipy} (workers=-1) ${f(ref.scipy_seconds)}`);
console.log(`  numpy, packed algorithm    ${f(ref.numpy_packed_seconds)}`);
console.log(
  `  ratio sunlag(2 workers) / faster of numpy, scipy = ${(two.median / fastest).toFixed(3)}`,
);
console.log(
  `  ratio sunlag(2 workers) / packed numpy         = ${
    (two.median / ref.numpy_packed_seconds).toFixed(3)
  }`,
);
console.log(`  speed-up 1 → 2 workers = ${(one.median / two.median).toFixed(2)}`);
console.log(
  `  per-round ratios: ${ratios.map((r) => r.toFixed(3)).join(", ")} (median ${
    median(ratios).toFixed(3)
  })`,
);
console.log(
  `  load average (1 min) at start/end: ${load0.toFixed(2)} / ${
    load1.toFixed(2)
  } on ${navigator.hardwareConcurrency} cores`,
);
console.log(
  `  family-wise p (sunlag data): ${resTwo.pFamilyWise.toFixed(4)}, identical on 1 and 2 workers`,
);
console.log(`attribution, 4 regressors × lags 0–24, 1,800 months (medians, ${ROUNDS} rounds)`);
console.log(
  `  AR(1) errors   ${f(a1.median)}  (${a1.last.search} search, ${a1.last.fitsEvaluated} fits)`,
);
console.log(`  OLS + HAC      ${f(a2.median)}  (${a2.last.fitsEvaluated} fits)`);
