/**
 * Adapter of the "forcing" analysis: the TSI (a series, or a reconstruction run's output with
 * its error model and ensemble) or a spectral reconstruction run's integral (with its
 * ensemble; spectral_input.ts), the reference, and core's ΔF = ΔTSI·(1 − α)/4 with its
 * uncertainty (core/irradiance/radiative_forcing.ts): member by member against each member's
 * own reference mean when the reconstruction has an ensemble, else from the reconstruction's
 * error model (the reference mean's variance and its covariance with each cell included).
 *
 * @module
 */
import type { OutputSeries, RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  type ForcingErrors,
  forcingInterval,
  forcingMembers,
  forcingSeries,
  type ReconstructionErrorModel,
} from "../../../core/irradiance/mod.ts";
import { parsePeriod, timeBound, type YearSpan } from "../common/time_period.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { requireQuantity } from "../common/sunspot_series.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { ASSESSMENT_CAUTION } from "../common/irradiance_notes.ts";
import {
  checkStoredMembers,
  memberBand,
  membersFromJson,
  membersJson,
} from "../common/ensemble_members.ts";
import { bandCaution, type UncertaintyBand, uncertaintyBand } from "../common/uncertainty_band.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import type { ReconstructionResultOut } from "../irradiance_reconstructions/result.ts";
import type { ForcingParams } from "./request.ts";
import type { ForcingResultIn } from "./result.ts";
import { spectralIntegralInput, type SpectralSourceJson } from "./spectral_input.ts";

/** The TSI to convert, with what is known of its errors. */
interface TsiInput {
  time: ArrayLike<number>;
  tsi: ArrayLike<number>;
  errors: ForcingErrors;
  /** Members of the reconstruction's ensemble, member-major, and their seed. */
  ensemble: { members: Float64Array; realizations: number; seed: number } | null;
  /** The reconstruction's band statement, or null for a series. */
  band: UncertaintyBand | null;
  source: string;
  /** How the quantity is named: "TSI", or "the 200–400 nm integral". */
  words: string;
  /** How the reference label names its mean: "mean TSI", "mean of the 200–400 nm integral". */
  mean: string;
  /** For a spectral integral: what it spans, and the caution that it is not TSI. */
  spectral: { json: SpectralSourceJson; caution: string } | null;
}

/** Forcing members are rounded to 1 μW m-2. */
const MEMBER_ROUNDING = 1e-6;

/** ΔF relative to the reference, with its uncertainty when the TSI has one. */
export function computeForcing(params: ForcingParams, ctx: RunContext): ForcingResultIn {
  const input = tsiInput(params, ctx);
  const { span, label, pointer } = reference(params, input.mean);
  const f = withInputPointers(
    { albedo: "/albedo", "*": pointer },
    () => forcingSeries(input.time, input.tsi, input.errors, span, params.albedo),
  );
  const out: OutputSeries = {
    name: input.spectral
      ? `Solar radiative forcing of ${input.words}${
        input.spectral.json.full_coverage ? "" : " (not TSI: that range's variation only)"
      }`
      : "Solar radiative forcing",
    quantity: "radiative_forcing",
    units: "W m-2",
    time: Array.from(input.time),
    value: undefinedAsNull(f.value),
    description: input.spectral
      ? `ΔF = (S − S_ref)(1 − ${params.albedo})/4, S ${input.words} (not TSI unless the ` +
        `range covers the spectrum), S_ref the ${label}; from ${input.source}`
      : `ΔF = (TSI − TSI_ref)(1 − ${params.albedo})/4, TSI_ref the ${label}; from ${input.source}`,
  };
  const ens = input.ensemble;
  let band: UncertaintyBand | null = null;
  let members: ForcingResultIn["ensemble"] = null;
  if (ens) {
    const fm = withInputPointers(
      { "*": pointer },
      () =>
        forcingMembers(input.time, ens.members, ens.realizations, span, params.albedo, {
          shouldStop: ctx.cancelled,
        }),
    );
    const b = memberBand(
      f.value,
      fm,
      ens.realizations,
      0.95,
      "members, each against its own reference mean",
      { shouldStop: ctx.cancelled },
    );
    out.uncertainty = undefinedAsNull(b.sd);
    out.lower = undefinedAsNull(b.lower);
    out.upper = undefinedAsNull(b.upper);
    out.interval = b.interval;
    band = { ...input.band!, method: b.method };
    members = {
      output: "forcing",
      realizations: ens.realizations,
      seed: ens.seed,
      units: "W m-2",
      rounding: MEMBER_ROUNDING,
      members: membersJson(fm, ens.realizations, MEMBER_ROUNDING),
    };
  } else if (f.sd) {
    const interval = forcingInterval(f);
    out.uncertainty = undefinedAsNull(f.sd);
    out.lower = undefinedAsNull(interval.lower);
    out.upper = undefinedAsNull(interval.upper);
    out.interval = "95 % interval (normal, ±1.96 σ)";
    band = input.band
      ? { ...input.band, method: "analytic" }
      : uncertaintyBand("independent_points", [], [
        "errors of the TSI series shared between points (its uncertainties are taken as " +
        "independent: a stored series states no error correlations)",
      ]);
  }
  return {
    formula: input.spectral ? `ΔF = ΔS·(1 − α)/4, S ${input.words} (W m-2)` : "ΔF = ΔTSI·(1 − α)/4",
    albedo: params.albedo,
    reference: { ...span, label, tsi: f.referenceTsi, points: f.referencePoints },
    reference_sd: f.referenceSd,
    uncertainty_method: ens
      ? "ensemble: each member against its own reference mean"
      : input.errors?.kind === "error_model"
      ? "analytic: Var(x_t − m̄) = Var(x_t) + Var(m̄) − 2Cov(x_t, m̄) from the reconstruction's error model"
      : input.errors?.kind === "independent"
      ? "analytic: Var(x_t − m̄) with the series' uncertainties taken as independent between points"
      : "none: the TSI input carries no uncertainty",
    source: input.source,
    ...(input.spectral ? { spectral: input.spectral.json } : {}),
    band,
    outputs: { forcing: out },
    ensemble: members,
    warnings: input.errors || ens ? [] : input.spectral
      ? [
        `Spectral reconstruction run ${input.spectral.json.run} has no ensemble, so the forcing ` +
        "has no uncertainty: its analytic band does not store how the integral's errors " +
        "correlate over time, which the difference from the reference mean needs. Ask the " +
        "spectral reconstruction for realizations to carry its members.",
      ]
      : ["The TSI input carries no uncertainty, so the forcing has none."],
    cautions: [
      ...(input.spectral ? [input.spectral.caution] : []),
      "This is the instantaneous top-of-atmosphere solar forcing; it is not an attribution of any climate change to the Sun.",
      ASSESSMENT_CAUTION,
      ...(band ? [bandCaution(band, `The forcing's uncertainty band`)] : []),
    ],
  };
}

/** The error model of a reconstruction result, as core reads it. */
function errorModelOf(r: ReconstructionResultOut): ReconstructionErrorModel {
  return {
    cells: r.outputs.tsi.time.length,
    factors: r.error_model.factors.map((f) => ({
      source: f.source,
      label: f.label,
      loading: Float64Array.from(f.loading),
    })),
    processes: r.error_model.processes.map((p) => ({
      source: p.source,
      label: p.label,
      loading: Float64Array.from(p.loading),
      lag1: Float64Array.from(p.lag1),
    })),
  };
}

/** A reconstruction run's TSI output (typed through its result schema), or a TSI series. */
function tsiInput(params: ForcingParams, ctx: RunContext): TsiInput {
  if (params.reconstruction) {
    const r = ctx.resultOf(irradianceReconstructions, params.reconstruction, "/reconstruction");
    const o = r.outputs.tsi;
    const e = r.ensemble;
    if (e) checkStoredMembers(e, o.time.length, "/reconstruction", params.reconstruction);
    return {
      time: o.time,
      tsi: o.value.map((v) => v ?? NaN),
      errors: { kind: "error_model", model: errorModelOf(r) },
      ensemble: e
        ? { members: membersFromJson(e.members), realizations: e.realizations, seed: e.seed }
        : null,
      band: r.band,
      source: `reconstruction run ${params.reconstruction}`,
      words: "TSI",
      mean: "mean TSI",
      spectral: null,
    };
  }
  if (params.spectral_reconstruction) {
    const { run, output } = params.spectral_reconstruction;
    const x = spectralIntegralInput(ctx, run, output);
    return {
      time: x.time,
      tsi: x.value,
      errors: null,
      ensemble: x.ensemble,
      band: x.band,
      source: `spectral reconstruction run ${run}, output ${output}`,
      words: x.words,
      mean: `mean of ${x.words}`,
      spectral: { json: x.spectral, caution: x.caution },
    };
  }
  const s = requireQuantity(ctx.series(refId(params.tsi!)), "tsi", "/tsi");
  return {
    time: s.time,
    tsi: s.value,
    errors: s.uncertainty ? { kind: "independent", sd: s.uncertainty } : null,
    ensemble: null,
    band: null,
    source: `series ${s.id}`,
    words: "TSI",
    mean: "mean TSI",
    spectral: null,
  };
}

/** The reference span, its label, and the pointer of its field. */
function reference(
  params: ForcingParams,
  mean: string,
): { span: YearSpan; label: string; pointer: string } {
  const ref = params.reference;
  if (ref.kind === "period") {
    const span = parsePeriod(ref.period, "/reference/period");
    return {
      span,
      label: `${mean} over [${span.start.toFixed(4)}, ${span.end.toFixed(4)})`,
      pointer: "/reference/period",
    };
  }
  const t = timeBound(ref.time, "middle", "/reference/time");
  return {
    span: { start: t - ref.half_width_years, end: t + ref.half_width_years },
    label: `${mean} within ±${ref.half_width_years} yr of the cycle minimum at ${t.toFixed(3)}`,
    pointer: "/reference/time",
  };
}
