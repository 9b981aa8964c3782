/**
 * A spectral reconstruction run's integral as the input of a forcing: the covered-range
 * integral (`integral`) or a requested range's (`range_<lower>_<upper>`), its members when the
 * run has an ensemble, the wavelengths it spans, and the caution that a band integral over part
 * of the spectrum is not TSI (ΔF = ΔS·(1 − α)/4 then holds for the variation of that range
 * only).
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { spectralIrradianceReconstructions } from "../spectral_irradiance_reconstructions/mod.ts";
import type { SpectralReconstructionResultOut } from "../spectral_irradiance_reconstructions/result.ts";
import { memberValues } from "../spectral_irradiance_reconstructions/ensemble.ts";

/** What a forcing reads from a spectral reconstruction run. */
export interface SpectralIntegralInput {
  time: number[];
  /** The integral, W m-2 (NaN where it has no value). */
  value: Float64Array;
  /** Members, member-major (realizations × cells), or null without an ensemble. */
  ensemble: { members: Float64Array; realizations: number; seed: number } | null;
  /** The run's statement of what its intervals contain. */
  band: SpectralReconstructionResultOut["band"];
  /** What the forcing result states of the integral. */
  spectral: SpectralSourceJson;
  /** "the 200–400 nm integral": how the label and description name the quantity. */
  words: string;
  /** The caution that the integral is (or stands for) TSI or not. */
  caution: string;
}

/** The part of a forcing result that names the spectral integral it converts. */
export interface SpectralSourceJson {
  run: string;
  output: string;
  lower: number;
  upper: number;
  covered_nm: number;
  missing: [number, number][];
  full_coverage: boolean;
}

const POINTER = "/spectral_reconstruction";

/** Integral outputs of a spectral result, by output name, with the wavelengths each spans. */
function integralOutputs(r: SpectralReconstructionResultOut) {
  const list: {
    output: string;
    lower: number;
    upper: number;
    covered: number;
    missing: [number, number][];
  }[] = [];
  const c = r.consistency?.spectral_coverage;
  if (c && r.outputs.integral) {
    list.push({
      output: "integral",
      lower: c.lower,
      upper: c.upper,
      covered: c.width_nm,
      missing: c.gaps,
    });
  }
  for (const x of r.ranges) {
    if (r.outputs[x.output]) {
      list.push({
        output: x.output,
        lower: x.range.lower,
        upper: x.range.upper,
        covered: x.covered_nm,
        missing: x.missing,
      });
    }
  }
  return list;
}

/**
 * Read a spectral reconstruction run's integral for a forcing.
 *
 * @param ctx the run context
 * @param id the spectral reconstruction run
 * @param output `integral` or a requested range's output name
 * @throws {InputProblem} at /spectral_reconstruction/run (a run of another kind, no result)
 *   or /spectral_reconstruction/output (no such integral; stored members that do not match)
 */
export function spectralIntegralInput(
  ctx: RunContext,
  id: string,
  output: string,
): SpectralIntegralInput {
  const r = ctx.resultOf(spectralIrradianceReconstructions, id, `${POINTER}/run`);
  const available = integralOutputs(r);
  const chosen = available.find((o) => o.output === output);
  if (!chosen) {
    throw new InputProblem(
      `${POINTER}/output`,
      available.length
        ? `spectral reconstruction run ${id} has no integral named "${output}"; its integrals are ${
          available.map((o) => `"${o.output}"`).join(", ")
        }`
        : `spectral reconstruction run ${id} has no integral over bands (its model has no cross-band error correlation)`,
      { reason: "unknown_output", available: available.map((o) => o.output) },
    );
  }
  const o = r.outputs[output];
  const n = o.time.length;
  const value = Float64Array.from(o.value, (v) => v ?? NaN);
  let ensemble: SpectralIntegralInput["ensemble"] = null;
  if (r.ensemble) {
    const m = r.ensemble.outputs[output];
    const N = r.ensemble.realizations;
    if (!m || m.offsets.length !== N || m.offsets.some((row) => row.length !== n)) {
      throw new InputProblem(
        `${POINTER}/output`,
        `spectral reconstruction run ${id} stores no members of "${output}" matching its ${N} realizations of ${n} cells; replay it`,
        { reason: "members_mismatch" },
      );
    }
    const members = new Float64Array(N * n);
    for (let k = 0; k < N; k++) members.set(memberValues(o.value, m, k), k * n);
    ensemble = { members, realizations: N, seed: r.ensemble.seed };
  }
  const cover = r.consistency!;
  const whole = cover.full_coverage && chosen.lower <= cover.spectral_coverage.lower &&
    chosen.upper >= cover.spectral_coverage.upper;
  const span = `${chosen.lower}–${chosen.upper} nm`;
  return {
    time: o.time,
    value,
    ensemble,
    band: r.band,
    spectral: {
      run: id,
      output,
      lower: chosen.lower,
      upper: chosen.upper,
      covered_nm: chosen.covered,
      missing: chosen.missing,
      full_coverage: whole,
    },
    words: `the ${span} integral`,
    caution: spectralCaution(id, output, chosen, cover, whole),
  };
}

/** The caution: what the integral spans and that its forcing is not the total solar forcing. */
function spectralCaution(
  id: string,
  output: string,
  chosen: { lower: number; upper: number; covered: number; missing: [number, number][] },
  cover: NonNullable<SpectralReconstructionResultOut["consistency"]>,
  whole: boolean,
): string {
  const pct = (x: number) => `${(100 * x).toFixed(1)} %`;
  const c = cover.spectral_coverage;
  const gaps = chosen.missing.length
    ? `; no band covers ${chosen.missing.map(([a, b]) => `${a}–${b} nm`).join(", ")}`
    : "";
  const what =
    `the irradiance integrated over ${chosen.lower}–${chosen.upper} nm (${chosen.covered} nm covered by bands${gaps}) of spectral reconstruction run ${id}, output ${output}`;
  if (whole) {
    return `The forcing is ΔF = ΔS·(1 − α)/4 with S ${what}: this is the whole integral the spectral model's TSI check uses (its bands hold ${
      pct(c.blackbody_fraction)
    } of a 5772 K blackbody and ${
      pct(c.quiet_level_ratio)
    } of the TSI model's quiet level), so S stands for TSI; irradiance outside ${c.lower}–${c.upper} nm is not included.`;
  }
  return `Not TSI: the forcing is ΔF = ΔS·(1 − α)/4 with S ${what}. The bands of that run span ${c.lower}–${c.upper} nm (${
    pct(c.blackbody_fraction)
  } of a 5772 K blackbody, ${
    pct(c.quiet_level_ratio)
  } of the TSI model's quiet level), and the formula is applied to the variation of this range only: the variation of the rest of the spectrum is not included, so this is not the total solar forcing and is not comparable with a forcing computed from TSI.`;
}
