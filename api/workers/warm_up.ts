/**
 * Warm-up of a compute worker at service start: a small lag-correlation run (with its
 * surrogate test, whose chunks run in this worker) and a cycles run on invented monthly
 * series, so that the first user's run does not pay for compiling and optimising the code of
 * its hot loops. The results are thrown away; nothing is stored. A kind missing from the
 * registry (an app built with other analyses) is skipped, and a failure is reported to the
 * caller, never thrown at it.
 *
 * @module
 */
import type { RunKind, Task } from "../runs/kind.ts";
import { makeContext } from "../runs/context.ts";
import type { StoredSeries } from "../store/types.ts";

/** Invented monthly series of `n` months from 1900 (an 11-year cycle and a lagged echo). */
function inventedMonthly(id: string, quantity: string, n: number, lag: number): StoredSeries {
  const time = new Float64Array(n), value = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    time[i] = 1900 + (i + 0.5) / 12;
    const c = 0.5 - 0.5 * Math.cos((2 * Math.PI * (i - lag)) / 132);
    value[i] = 100 * c + 7 * Math.sin(0.7331 * i) * Math.sin(1.913 * i + 0.4);
  }
  return {
    id,
    name: `warm-up ${quantity}`,
    quantity,
    units: quantity === "sunspot_number" ? "1" : "K",
    description: null,
    source: null,
    version: quantity === "sunspot_number" ? "2" : null,
    resolution: "monthly",
    n,
    start: time[0],
    end: time[n - 1],
    derived_from: null,
    created_at: "1970-01-01T00:00:00.000Z",
    time,
    value,
    uncertainty: null,
  };
}

const SOLAR = `sha256:${"0".repeat(63)}1`;
const CLIMATE = `sha256:${"0".repeat(63)}2`;

/** The warm-up requests, by kind. */
const REQUESTS: Record<string, Record<string, unknown>> = {
  "lag-correlations": { solar: SOLAR, climate: CLIMATE, max_lag: 24, surrogates: 200, seed: 1 },
  cycles: { series: SOLAR },
};

/** The analyses the warm-up runs (a worker loads them first). */
export const WARM_UP_KINDS: readonly string[] = Object.keys(REQUESTS);

/**
 * Run the warm-up requests in this thread (chunks of a parallel map too).
 *
 * @returns milliseconds per kind warmed, and the error of any that failed
 */
export async function warmUp(
  kinds: readonly RunKind[],
  tasks: Record<string, Task>,
): Promise<{ ms: Record<string, number>; errors: Record<string, string> }> {
  const series = {
    [SOLAR]: inventedMonthly(SOLAR, "sunspot_number", 600, 0),
    [CLIMATE]: inventedMonthly(CLIMATE, "temperature_anomaly", 600, 12),
  };
  const ms: Record<string, number> = {}, errors: Record<string, string> = {};
  for (const [name, body] of Object.entries(REQUESTS)) {
    const kind = kinds.find((k) => k.kind === name);
    if (!kind) continue;
    const t0 = performance.now();
    try {
      const params = kind.request.parse(body) as Record<string, unknown>;
      const ctx = makeContext(
        { series, runs: {} },
        { progress: () => {}, isCancelled: () => false },
        <I, O>(task: string, chunks: I[]) =>
          Promise.resolve(chunks.map((c) => tasks[task](c) as O)),
      );
      await kind.compute(params as never, ctx);
      ms[name] = Math.round(performance.now() - t0);
    } catch (e) {
      errors[name] = (e as Error)?.message ?? String(e);
    }
  }
  return { ms, errors };
}
