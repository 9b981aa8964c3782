/**
 * Cost model of the "composites" analysis: every bootstrap replicate and random set averages
 * the window around each epoch (epochs × window samples); seconds on one core of the reference
 * machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { perYear, seriesOf } from "../common/cost_model.ts";
import type { CompositeParams } from "./request.ts";

/** Seconds to composite the epochs and test the composite. */
export function estimateCompositesSeconds(p: CompositeParams, inputs: EstimateInputs): number {
  const s = seriesOf(inputs, p.series);
  const span = s ? s.end - s.start : 0;
  // epochs: the dates given, or about one solar maximum (or minimum) every 11 years
  const epochs = p.epoch_dates?.length ?? Math.max(2, span / 11);
  const step = perYear(p.resolution ?? (s?.resolution === "annual" ? "annual" : "monthly"));
  const window = (p.before_years + p.after_years) * step + 1;
  return 0.002 + (p.bootstrap + p.random_sets) * epochs * window * 6.5e-9;
}
