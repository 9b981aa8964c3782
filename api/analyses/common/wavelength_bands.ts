/**
 * Wavelength bands and ranges in requests and results: their schemas, the request check that
 * bands are sorted and do not overlap (core/irradiance/wavelength_bands.ts, as zod issues
 * that name the band), and the value kind a band series' quantity implies.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import {
  type BandValueKind,
  checkWavelengthBands,
  rangeWeights,
  type WavelengthBand,
} from "../../../core/irradiance/mod.ts";
import { InputError } from "../../../core/errors.ts";
import type { StoredSeries } from "../../store/types.ts";
import { InputProblem } from "../../runs/kind.ts";

/** A wavelength in nm, as requests give it. */
export const Wavelength = z.number().positive().max(1e6).openapi({
  description: "Wavelength, nm",
});

/** A wavelength range [lower, upper) in nm. */
export const WavelengthRange = z.object({
  lower: Wavelength,
  upper: Wavelength,
}).openapi("WavelengthRange", {
  description: "A wavelength range [lower, upper), nm, e.g. 200 to 400 for the near ultraviolet",
});

type Issue = { code: "custom"; path: (string | number)[]; message: string };

/**
 * Add an issue at /bands/i/lower or /bands/i/upper when the bands are not sorted, overlap or
 * are empty (for a superRefine).
 */
export function bandOrderIssues(bands: WavelengthBand[], addIssue: (i: Issue) => void): void {
  try {
    checkWavelengthBands(bands);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const what = {
      overlap: `overlaps the previous band, which ends at ${e.value} nm; bands must not overlap`,
      not_increasing: "is below the previous band's; bands must be sorted by wavelength",
      out_of_range: e.field === "upper"
        ? "must exceed the band's lower bound"
        : "must be a wavelength > 0 nm",
    }[e.reason as string] ?? e.message;
    addIssue({ code: "custom", path: ["bands", e.index ?? 0, e.field], message: what });
  }
}

/** Add an issue at /ranges/i/upper for a range whose upper bound is not above its lower. */
export function rangeOrderIssues(ranges: WavelengthBand[], addIssue: (i: Issue) => void): void {
  ranges.forEach((r, i) => {
    if (!(r.upper > r.lower)) {
      addIssue({ code: "custom", path: ["ranges", i, "upper"], message: "must exceed lower" });
    }
  });
}

/** Quantities a band series may have, with the kind of value each is. */
export const BAND_QUANTITIES: Record<string, BandValueKind> = {
  spectral_irradiance: "per_nm",
  band_irradiance: "per_band",
};

/**
 * The value kind of band series (all of one quantity: spectral_irradiance in W m-2 nm-1 or
 * band_irradiance in W m-2); a 422 at the band's series pointer otherwise.
 */
export function bandValueKind(series: readonly StoredSeries[], pointer: (i: number) => string): {
  kind: BandValueKind;
  quantity: string;
  units: string;
} {
  series.forEach((s, i) => {
    if (!(s.quantity in BAND_QUANTITIES)) {
      throw new InputProblem(
        pointer(i),
        `band ${i}: series ${s.id} has quantity ${s.quantity} (${s.units}); a band series is spectral irradiance: quantity spectral_irradiance in W m-2 nm-1, or band_irradiance in W m-2 integrated over the band`,
        { reason: "not_spectral_irradiance", band: i, quantity: s.quantity, units: s.units },
      );
    }
    if (s.quantity !== series[0].quantity) {
      throw new InputProblem(
        pointer(i),
        `band ${i}: series ${s.id} is ${s.quantity} (${s.units}) but band 0 is ${
          series[0].quantity
        } (${series[0].units}); every band must be of one quantity`,
        { reason: "mixed_units", band: i, quantity: s.quantity, units: s.units },
      );
    }
  });
  return {
    kind: BAND_QUANTITIES[series[0].quantity],
    quantity: series[0].quantity,
    units: series[0].units,
  };
}

/** Range weights, or a 422 at `pointer` when no band overlaps the range. */
export function rangeWeightsAt(
  bands: WavelengthBand[],
  range: WavelengthBand,
  kind: BandValueKind,
  pointer: string,
) {
  try {
    return rangeWeights(bands, range, kind);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    throw new InputProblem(pointer, e.message, { reason: e.reason });
  }
}
