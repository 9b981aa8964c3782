/**
 * deno bench for the solar–climate area (means per iteration; medians and the side-by-side
 * comparison with numpy/scipy are in test/bench/peers, `deno task bench:peers`):
 *
 *   deno bench -A test/bench/climate_bench.ts
 */
import {
  attributionRegression,
  laggedCorrelationTable,
  oneBoxResponse,
  surrogateLagChunk,
} from "../../core/climate/mod.ts";
import { attributionCase, lagCase, MAX_LAG } from "./climate_case.ts";

const { x, y, plan } = lagCase();
const att = attributionCase();

Deno.bench("lagged correlation table, 4,096 months, lags ±120 (analytic)", () => {
  laggedCorrelationTable(x, y, { minLag: -MAX_LAG, maxLag: MAX_LAG });
});

Deno.bench("500 phase-randomised surrogates, 4,096 months, lags ±120, one thread", () => {
  surrogateLagChunk({ plan, start: 0, end: 500 });
});

Deno.bench("attribution, 4 regressors, lags 0–24 each, 1,800 months, AR(1) errors", () => {
  attributionRegression(att.y, att.regressors, { errors: "ar1" });
});

Deno.bench("attribution, 4 regressors, lags 0–24 each, 1,800 months, OLS + Newey–West", () => {
  attributionRegression(att.y, att.regressors, { errors: "ols_hac" });
});

const t = Float64Array.from({ length: 12 * 2000 }, (_, i) => i / 12);
const f = t.map((v) => Math.sin(v));
Deno.bench("one-box response, 24,000 months", () => {
  oneBoxResponse(t, f);
});
