/**
 * The benchmark cases of the solar–climate area, shared by climate_bench.ts and
 * test/bench/peers/workloads.ts: two 4,096-month series (invented AR(1) data, fixed seeds), lags
 * −120..120, linear detrend; and a 1,800-month attribution with 4 regressors whose lags are
 * searched over 0–24 months.
 *
 * @module
 */
import { randomStream } from "../../core/random/random_stream.ts";
import {
  ar1Surrogate,
  type AttributionRegressor,
  planSurrogateLagTest,
  preprocessSeries,
  type SurrogateLagPlan,
} from "../../core/climate/mod.ts";

export const N = 4096, MAX_LAG = 120, SURROGATES = 10_000;

/** Preprocessed solar-like and climate-like series of n months and the surrogate plan. */
export function lagCase(n = N): { x: Float64Array; y: Float64Array; plan: SurrogateLagPlan } {
  const raw = ar1Surrogate(n, 0.95, 1, randomStream(101, 0));
  const x = preprocessSeries(
    raw.map((v, i) => v + Math.sin((2 * Math.PI * i) / 132)),
    { method: "linear" },
  );
  const y = preprocessSeries(ar1Surrogate(n, 0.6, 1, randomStream(102, 0)), { method: "linear" });
  const plan = planSurrogateLagTest(x, y, {
    minLag: -MAX_LAG,
    maxLag: MAX_LAG,
    seed: 7,
    preprocess: { method: "linear" },
  });
  return { x, y, plan };
}

/** 1,800 months, 4 regressors each searched over lags 0..24. */
export function attributionCase(): { y: Float64Array; regressors: AttributionRegressor[] } {
  const n = 1800, st = randomStream(103, 0);
  const mk = (f: (i: number) => number) => Float64Array.from({ length: n }, (_, i) => f(i));
  let a = 0, e = 0;
  const solar = mk((i) => Math.sin((2 * Math.PI * i) / 132) + 0.3 * st.normal());
  const enso = mk(() => (a = 0.9 * a + 0.4 * st.normal()));
  const volcanic = mk((i) => (i % 300 < 24 ? Math.exp(-(i % 300) / 12) : 0) + 0.01 * st.normal());
  const anthro = mk((i) => (i / n) ** 2 + 0.02 * st.normal());
  const y = mk((i) => {
    e = 0.6 * e + 0.1 * st.normal();
    const l = (x: Float64Array, k: number) => (i >= k ? x[i - k] : x[0]);
    return 0.1 * l(solar, 14) + 0.08 * l(enso, 3) - 0.5 * l(volcanic, 6) + 0.8 * l(anthro, 0) + e;
  });
  const r = (name: string, values: Float64Array) => ({ name, values, minLag: 0, maxLag: 24 });
  return {
    y,
    regressors: [
      r("solar", solar),
      r("enso", enso),
      r("volcanic", volcanic),
      r("anthropogenic", anthro),
    ],
  };
}
