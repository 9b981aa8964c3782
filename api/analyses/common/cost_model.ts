/**
 * Pieces of the analyses' cost models (`estimateSeconds`, see api/runs/estimate.ts): the size
 * of the inputs a request names, and of the common axis of several series. The coefficients
 * of each model live beside its analysis (`api/analyses/<kind>/estimate.ts`); they are
 * seconds on one core of the reference machine, measured with test/bench/estimate_calibration.ts
 * and checked by test/api/estimate_accuracy_test.ts.
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";

/** The stored series of a reference (an id once the request is prepared), or null. */
export function seriesOf(inputs: EstimateInputs, ref: unknown): StoredSeries | null {
  return typeof ref === "string" ? inputs.series(ref) : null;
}

/** Points of the series a reference names (0 when none). */
export function pointsOf(inputs: EstimateInputs, ref: unknown): number {
  return seriesOf(inputs, ref)?.n ?? 0;
}

/** Samples per year of a resolution (irregular series: counted as daily). */
export function perYear(resolution: string): number {
  return resolution === "annual" ? 1 : resolution === "monthly" ? 12 : 365.25;
}

/**
 * Periods of the common monthly or annual axis of several series: their overlap in years times
 * the samples per year of the requested (or coarsest) resolution.
 */
export function commonAxisLength(series: StoredSeries[], requested?: string): number {
  if (series.length === 0) return 0;
  const resolution = requested ??
    (series.some((s) => s.resolution === "annual") ? "annual" : "monthly");
  const start = Math.max(...series.map((s) => s.start));
  const end = Math.min(...series.map((s) => s.end));
  return Math.max(0, Math.round((end - start) * perYear(resolution)) + 1);
}

/** The size of a loaded gridded field (the time steps loaded for the run). */
export interface FieldSize {
  /** Time steps loaded. */
  steps: number;
  /** Grid cells (latitudes × longitudes). */
  cells: number;
  /** Cells with a value at the first loaded step (e.g. the ocean of a sea-surface field). */
  withData: number;
}

/** The size of the field a reference names, or null when there is none. */
export function fieldSizeOf(inputs: EstimateInputs, ref: unknown): FieldSize | null {
  if (typeof ref !== "string") return null;
  const f = inputs.field(ref);
  const cells = f.lat.length * f.lon.length;
  let withData = 0;
  for (let c = 0; c < Math.min(cells, f.values.length); c++) {
    if (Number.isFinite(f.values[c])) withData++;
  }
  return { steps: f.time.length, cells, withData };
}
