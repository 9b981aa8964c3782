/**
 * Cost model of the "solar-signal-maps" analysis, per cell with data: the preprocessing of
 * its series (steps; n log n with the high-pass), the map (lags × steps × (controls + 4)
 * multiply-adds, and a t distribution per lag), then per surrogate of the Monte Carlo field
 * significance its preprocessing and residuals (lags × steps × (controls + 2)) and its float32
 * products with every cell (2 × lags × steps × cells operations). Seconds on one core of the
 * reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { fieldSizeOf } from "../common/cost_model.ts";
import type { SolarSignalMapParams } from "./request.ts";

/** Seconds per cell × step of the preprocessing (× log2 steps for the high-pass). */
const PREPROCESS = 2e-8;
/** Seconds per cell × lag × step × (controls + 4) of the map, and per cell × lag. */
const MAP = 1e-9, MAP_CELL_LAG = 2e-6;
/** Seconds per surrogate × lag × step × (controls + 2): its residuals on each lag's basis. */
const SURROGATE = 2e-9;
/** Seconds per operation of the surrogates' float32 products with the cells. */
const PRODUCT = 5e-11;

/** Seconds to map the solar signal and test the map. */
export function estimateSolarSignalMapsSeconds(
  p: SolarSignalMapParams,
  inputs: EstimateInputs,
): number {
  const f = fieldSizeOf(inputs, p.field);
  if (!f) return 0;
  const n = f.steps, cells = f.withData;
  const lags = (p.max_lag ?? 24) - p.min_lag + 1;
  const q = p.controls.length + (p.trend_control ? 1 : 0);
  const filter = p.preprocess === "high_pass" ? Math.log2(Math.max(2, n)) : 1;
  const prepare = PREPROCESS * cells * n * filter;
  const map = cells * lags * (MAP * n * (q + 4) + MAP_CELL_LAG);
  const surrogates = p.surrogates *
    (SURROGATE * lags * n * (q + 2) * filter + PRODUCT * 2 * lags * n * cells);
  return 0.005 + prepare + map + surrogates;
}
