/**
 * The workloads of the side-by-side benchmarks, sunlag side (the numpy/scipy side of each is
 * the function of the same name in peer_side.py):
 *
 * - `lag4096`, `lag4000`: Monte Carlo significance of a lagged correlation: two series of
 *   4,096 (a power of two) or 4,000 months (2⁵·5³), linear detrend, lags −120..120, overlap
 *   Pearson r, 10,000 phase-randomised surrogates (Ebisuzaki 1997) on 2 Web Workers, chunked
 *   as the service chunks them (16 chunks of 625), tallies combined into per-lag and
 *   family-wise p-values, null spread and per-lag 95 % thresholds;
 * - `irradiance`: calibrate a two-proxy model on 17,000 days (Prais–Winsten + 5-fold blocked
 *   cross-validation) and reconstruct 153,000 days with 95 % prediction intervals, half of
 *   them back-extended through sunspot mappings (test/bench/irradiance_case.ts), with
 *   everything the core call returns: the linearised error model (calibration and mapping
 *   loadings, residual processes) and the variance by source; the peer computes the same
 *   (listed in peer_side.py);
 * - `cycles`: 13-month smoothing of 3,000 months and the cycle minima and maxima.
 *
 * @module
 */
import {
  combineSurrogateChunks,
  planSurrogateLagTest,
  type SurrogateChunkInput,
  type SurrogateChunkOutput,
} from "../../../core/climate/mod.ts";
import { findCycleExtrema, smoothed13Month } from "../../../core/cycles/mod.ts";
import { lagCase } from "../climate_case.ts";
import { activity, monthTimes } from "../cycles_case.ts";
import { irradianceCase } from "../irradiance_case.ts";

/** One prepared workload: `run` does one repetition and returns a few numbers to compare. */
export interface Job {
  /** Repetitions per timed `run` command (short workloads are timed over many). */
  repeat: number;
  run(): unknown;
  close?(): void | Promise<void>;
}

async function writeInputs(dir: string, arrays: Record<string, Float64Array>): Promise<void> {
  for (const [k, v] of Object.entries(arrays)) {
    await Deno.writeFile(`${dir}/${k}.f64`, new Uint8Array(v.buffer, v.byteOffset, v.byteLength));
  }
}

export const SURROGATES = 10_000, MAX_LAG = 120;

/** The service's split (api/kinds/lag_correlations.ts): up to 16 chunks of ≥ 250 surrogates. */
function serviceChunks(total: number): { start: number; end: number }[] {
  const per = Math.ceil(total / Math.min(16, Math.ceil(total / 250)));
  const out = [];
  for (let s = 0; s < total; s += per) out.push({ start: s, end: Math.min(total, s + per) });
  return out;
}

async function lagJob(n: number, dir: string): Promise<Job> {
  const { x, y } = lagCase(n);
  await writeInputs(dir, { x, y });
  const pool = Array.from(
    { length: 2 },
    () => new Worker(new URL("../climate_worker.ts", import.meta.url).href, { type: "module" }),
  );
  const runOnPool = (inputs: SurrogateChunkInput[]) => {
    const results: SurrogateChunkOutput[] = [];
    let next = 0;
    return Promise.all(pool.map((w) =>
      new Promise<void>((resolve) => {
        const send = () => next < inputs.length ? w.postMessage(inputs[next++]) : resolve();
        w.onmessage = (e) => {
          results.push(e.data);
          send();
        };
        send();
      })
    )).then(() => results);
  };
  return {
    repeat: 1,
    async run() {
      const plan = planSurrogateLagTest(x, y, {
        minLag: -MAX_LAG,
        maxLag: MAX_LAG,
        seed: 7,
        preprocess: { method: "linear" },
      });
      const outs = await runOnPool(serviceChunks(SURROGATES).map((c) => ({ plan, ...c })));
      const res = combineSurrogateChunks(plan, outs);
      let sd = 0;
      for (const v of res.nullSd) sd += v / res.nullSd.length;
      return {
        observed_max_abs_r: res.observedMaxAbs,
        p_family_wise: res.pFamilyWise,
        max_abs_r_95: res.maxAbs95,
        mean_null_sd: sd,
      };
    },
    close: () => pool.forEach((w) => w.terminate()),
  };
}

function mean(a: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i];
  return s / a.length;
}

async function irradianceJob(dir: string): Promise<Job> {
  const work = irradianceCase();
  await writeInputs(dir, work.inputs);
  return {
    repeat: 5,
    run() {
      const fit = work.calibrate();
      const rec = work.reconstruct();
      let v = 0, s = 0;
      for (let i = 0; i < rec.value.length; i++) {
        v += rec.value[i];
        s += rec.sd[i];
      }
      return {
        coefficients: fit.coefficients,
        rho: fit.rho,
        cv_rmse: fit.crossValidation?.rmse,
        mean_value: v / rec.value.length,
        mean_sd: s / rec.sd.length,
        mean_variance: Object.fromEntries(
          Object.entries(rec.components).map(([k, c]) => [k, mean(c)]),
        ),
        loadings: rec.errorModel.factors.length,
        processes: rec.errorModel.processes.length,
      };
    },
  };
}

async function cyclesJob(dir: string): Promise<Job> {
  const months = 3000;
  const x = activity(months), t = monthTimes(months);
  await writeInputs(dir, { activity: x });
  return {
    repeat: 200,
    run() {
      const ex = findCycleExtrema(t, smoothed13Month(x));
      return {
        minima: ex.filter((e) => e.kind === "minimum").map((e) => e.index),
        maxima: ex.filter((e) => e.kind === "maximum").map((e) => e.index),
      };
    },
  };
}

/** Workload name → set-up (writes the inputs into `dir`). */
export const workloads: Record<string, { setup(dir: string): Promise<Job> }> = {
  lag4096: { setup: (dir) => lagJob(4096, dir) },
  lag4000: { setup: (dir) => lagJob(4000, dir) },
  irradiance: { setup: irradianceJob },
  cycles: { setup: cyclesJob },
};
