/**
 * Worker task of the "spectral-irradiance-models" analysis: the calibration of a chunk of
 * bands (core/irradiance/spectral_band_models.ts), mapped over the pool with `ctx.parallel`.
 * The cross-band correlation is computed afterwards from every chunk's residuals. A stop
 * request is obeyed between bands (Prais–Winsten with cross-validation costs milliseconds per
 * band); least squares fits the chunk at once, on its one factorisation.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { type StopOptions, throwIfStopped } from "../../../core/stop_signal.ts";
import {
  type BandCalibrationOptions,
  type BandModels,
  calibrateBandModels,
  type ProxyTerm,
} from "../../../core/irradiance/mod.ts";
import { InputError } from "../../../core/errors.ts";

/** Task name of one chunk of band calibrations (stored runs replay by it: never rename). */
export const BAND_FITS_CHUNK = "irradiance.spectral_band_fits";

/** Input of one chunk: its bands on the cell axis, the proxy terms and the options. */
export interface BandFitsChunk {
  /** Index of the chunk's first band among all bands (errors name the band by it). */
  offset: number;
  bands: Float64Array[];
  terms: ProxyTerm[];
  options: BandCalibrationOptions;
}

/**
 * Calibrate one chunk of bands (no cross-correlation: that needs every band); band by band
 * unless the estimator is least squares, polling `control.shouldStop` before each. Each band's
 * fit depends on its own record and the common design only, so the numbers are the same.
 */
export function bandFitsChunk(input: BandFitsChunk, control: StopOptions = {}): BandModels {
  const options = { ...input.options, crossCorrelation: false };
  const per = input.options.method === "ols" ? input.bands.length : 1;
  const parts: BandModels[] = [];
  for (let b = 0; b < input.bands.length; b += per) {
    throwIfStopped(control, "calibrate band models");
    const block = input.bands.slice(b, b + per);
    parts.push(
      bandNumbered(() => calibrateBandModels(block, input.terms, options), input.offset + b),
    );
  }
  return {
    fits: parts.flatMap((p) => p.fits),
    cells: parts.flatMap((p) => p.cells),
    residuals: parts.flatMap((p) => p.residuals),
    correlation: null,
    quietLevels: parts[0].quietLevels,
  };
}

/** Run `fit`, a band error in it renumbered by the index of its first band among all. */
function bandNumbered(fit: () => BandModels, first: number): BandModels {
  try {
    return fit();
  } catch (e) {
    if (e instanceof InputError && e.field === "bands" && e.index !== undefined) {
      throw new InputError(e.message.replace(/band \d+/g, `band ${e.index + first}`), {
        field: "bands",
        reason: e.reason,
        index: e.index + first,
        value: e.value,
      });
    }
    throw e;
  }
}

export const spectralModelTasks: Record<string, Task> = {
  [BAND_FITS_CHUNK]: bandFitsChunk,
};
