/**
 * Cost model of the "field-composites" analysis, per cell with data: its preprocessing and
 * window means (steps), then per random epoch set of the Monte Carlo field significance one t
 * statistic over the epochs of both sets. The epochs of a cycle table are counted as one per
 * 11 years of the field in each set. Seconds on one core of the reference machine
 * (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { fieldSizeOf } from "../common/cost_model.ts";
import { fieldResolution } from "../common/field_axis.ts";
import type { FieldCompositeParams } from "./request.ts";

/** Seconds per cell × step (preprocessing, window means). */
const PREPARE = 2e-8;
/** Seconds per random set × cell × epoch, and per random set × cell. */
const PER_EPOCH = 6e-9, PER_SET_CELL = 2.3e-8;

/** Seconds to composite the field and test the map. */
export function estimateFieldCompositesSeconds(
  p: FieldCompositeParams,
  inputs: EstimateInputs,
): number {
  const f = fieldSizeOf(inputs, p.field);
  if (!f) return 0;
  const cells = f.withData;
  const monthly = fieldResolution(inputs.field(p.field), "/field") === "monthly";
  const years = f.steps / (monthly ? 12 : 1);
  const cycles = Math.max(2, Math.round(years / 11));
  const epochs = p.cycle_run
    ? cycles * (p.contrast ? 2 : 1)
    : (p.epoch_dates?.length ?? 0) + (p.contrast_dates?.length ?? 0);
  return 0.005 + PREPARE * cells * f.steps +
    p.random_sets * cells * (PER_SET_CELL + PER_EPOCH * epochs);
}
