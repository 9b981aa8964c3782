/**
 * Worker task of the "spectral-irradiance-models" analysis: the calibration of a chunk of
 * bands (core/irradiance/spectral_band_models.ts), mapped over the pool with `ctx.parallel`.
 * The cross-band correlation is computed afterwards from every chunk's residuals.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
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

/** Calibrate one chunk of bands (no cross-correlation: that needs every band). */
export function bandFitsChunk(input: BandFitsChunk): BandModels {
  try {
    return calibrateBandModels(input.bands, input.terms, {
      ...input.options,
      crossCorrelation: false,
    });
  } catch (e) {
    if (e instanceof InputError && e.field === "bands" && e.index !== undefined) {
      throw new InputError(e.message.replace(/band \d+/g, `band ${e.index + input.offset}`), {
        field: "bands",
        reason: e.reason,
        index: e.index + input.offset,
        value: e.value,
      });
    }
    throw e;
  }
}

export const spectralModelTasks: Record<string, Task> = {
  [BAND_FITS_CHUNK]: bandFitsChunk,
};
