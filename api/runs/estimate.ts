/**
 * How long a run will compute, before it starts: each analysis' `estimateSeconds` is a cost
 * model of its real work (points × grid × replicates ...) in seconds on one core of the
 * reference machine; this module scales it by the speed of the machine the service runs on.
 *
 * Machine speed: a fixed reference workload (Lomb–Scargle periodograms on an even and an
 * uneven frequency grid, a sort: the loops most analyses spend their time in) is timed once per
 * process, at start-up or at the first estimate, as the fastest of several repetitions, in CPU
 * time of the thread (so other work on the machine does not count);
 * its ratio to {@link REFERENCE_WORKLOAD_SECONDS} scales every estimate. A machine twice as
 * slow (or one busy with other work at start-up) gets estimates twice as long, so more runs go
 * asynchronous and stay cancellable; the factor is bounded to [1/4, 20]. The reference
 * machine: 2 cores (x86-64), Debian 12, Deno 2.9.6, where the cost models' coefficients were
 * measured (test/api/estimate_accuracy_test.ts checks them to within a factor of three).
 *
 * Estimates are one-core seconds: a run whose chunks spread over W workers finishes up to W
 * times sooner, which is still on the safe (asynchronous) side of the decision.
 *
 * Beside its own cost model, a run built on other runs reads their warnings and cautions, and
 * those of the runs they were built on (api/runs/inherit.ts): stored results parsed again,
 * about {@link LINEAGE_SECONDS} per input run on the reference machine (measured on the
 * demo's chains: a forcing run over a reconstruction, a model and a darkening run).
 *
 * @module
 */
import { InputProblem, type RunKind } from "./kind.ts";
import { type LoadedInputs, loadedInputs } from "./loaded_inputs.ts";
import { lombScargle } from "../../core/spectral/lomb_scargle.ts";

/** CPU seconds the reference workload takes on the reference machine. */
export const REFERENCE_WORKLOAD_SECONDS = 0.022;

/** Seconds to read the lineage of one input run (its stored ancestors' notes). */
export const LINEAGE_SECONDS = 0.01;

/** Bounds of the machine-speed factor. */
const FACTOR_RANGE = [0.25, 20] as const;

/** The reference workload: a few milliseconds of the loops the analyses spend time in. */
export function referenceWorkload(): number {
  const n = 1200;
  const t = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = i / 12 + 0.01 * Math.sin(i);
    y[i] = Math.sin((2 * Math.PI * i) / 132) + 0.3 * Math.cos(i * 1.7);
  }
  const even = Float64Array.from({ length: 1500 }, (_, k) => 0.01 + k * 0.004);
  const uneven = Float64Array.from({ length: 250 }, (_, k) => 1 / (2 + k * 0.3));
  const a = lombScargle(t, y, even);
  const b = lombScargle(t, y, uneven);
  const s = Float64Array.from({ length: 40_000 }, (_, i) => Math.sin(i * 12.9898) * 43758.5453)
    .sort();
  return a[7] + b[3] + s[100];
}

let schedstat: boolean | null = null;

/**
 * CPU time of the calling thread, seconds, where Linux tells it (`/proc/thread-self/schedstat`,
 * nanoseconds on the CPU); elsewhere, or without read permission, wall time. Other threads and
 * processes sharing the machine then do not count, so a measurement holds on a busy machine.
 *
 * @example
 * ```ts
 * import { threadCpuSeconds } from "./estimate.ts";
 * import assert from "node:assert/strict";
 * const t0 = threadCpuSeconds();
 * let x = 0;
 * for (let i = 0; i < 1e6; i++) x += i;
 * assert.ok(threadCpuSeconds() >= t0 && x > 0);
 * ```
 */
export function threadCpuSeconds(): number {
  if (schedstat !== false) {
    try {
      const ns = Number(Deno.readTextFileSync("/proc/thread-self/schedstat").split(" ")[0]);
      if (Number.isFinite(ns)) {
        schedstat = true;
        return ns / 1e9;
      }
    } catch {
      // not Linux, or no read permission: wall time
    }
    schedstat = false;
  }
  return performance.now() / 1000;
}

/**
 * Time the reference workload: the fastest of `repeats` batches of 4 runs (after one to warm
 * up), seconds of this thread's CPU time per run ({@link threadCpuSeconds}).
 *
 * @example
 * ```ts
 * import { timeReferenceWorkload } from "./estimate.ts";
 * import assert from "node:assert/strict";
 * assert.ok(timeReferenceWorkload(2) > 0);
 * ```
 */
export function timeReferenceWorkload(repeats = 3): number {
  referenceWorkload();
  let best = Infinity;
  for (let r = 0; r < repeats; r++) {
    // in batches of 4: Linux updates a running thread's CPU time every few milliseconds only
    const t0 = threadCpuSeconds();
    for (let k = 0; k < 4; k++) referenceWorkload();
    best = Math.min(best, (threadCpuSeconds() - t0) / 4);
  }
  return best;
}

/**
 * Measure this machine's time for work that takes 1 s on the reference machine, now (bounded
 * to [1/4, 20]).
 */
export function measureMachineSpeedFactor(): number {
  const f = timeReferenceWorkload() / REFERENCE_WORKLOAD_SECONDS;
  return Math.min(FACTOR_RANGE[1], Math.max(FACTOR_RANGE[0], f));
}

let factor: number | null = null;

/**
 * This machine's time for work that takes 1 s on the reference machine, measured once per
 * process (call it at start-up to take the measurement off the first request).
 */
export function machineSpeedFactor(): number {
  factor ??= measureMachineSpeedFactor();
  return factor;
}

/**
 * The estimated computing time of a run on this machine, seconds (0 for a kind without a
 * cost model). An estimate that cannot be made (inputs it does not understand) counts as 0:
 * the run is then computed synchronously, where a bad input gets its problem at once.
 */
export function estimateRunSeconds(
  kind: RunKind,
  params: Record<string, unknown>,
  inputs: LoadedInputs,
  speed: () => number = machineSpeedFactor,
): number {
  if (!kind.estimateSeconds) return 0;
  let seconds: number;
  try {
    seconds = kind.estimateSeconds(params as never, loadedInputs(inputs)) +
      LINEAGE_SECONDS * Object.keys(inputs.runs).length;
  } catch (e) {
    // a bad input gets its problem from the computation; anything else is a defect to log
    if (!(e instanceof InputProblem)) {
      console.error(JSON.stringify({ level: "warn", estimate: kind.kind, error: String(e) }));
    }
    return 0;
  }
  return Number.isFinite(seconds) && seconds > 0 ? seconds * speed() : 0;
}
