/**
 * Adapter of the "forcing" analysis: the TSI (a series, or a reconstruction run's output with
 * its uncertainty), the reference, and core's ΔF = ΔTSI·(1 − α)/4 with its interval
 * (core/irradiance/radiative_forcing.ts).
 *
 * @module
 */
import type { OutputSeries, RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import { forcingInterval, forcingSeries } from "../../../core/irradiance/mod.ts";
import { parsePeriod, timeBound, type YearSpan } from "../common/time_period.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { requireQuantity } from "../common/sunspot_series.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { ASSESSMENT_CAUTION } from "../common/irradiance_notes.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import type { ForcingParams } from "./request.ts";
import type { ForcingResultIn } from "./result.ts";

/** The TSI to convert: times, values and one-sigma uncertainty (NaN where missing). */
interface TsiInput {
  time: ArrayLike<number>;
  tsi: ArrayLike<number>;
  sd: ArrayLike<number> | null;
  source: string;
}

/** ΔF relative to the reference, with its uncertainty when the TSI has one. */
export function computeForcing(params: ForcingParams, ctx: RunContext): ForcingResultIn {
  const input = tsiInput(params, ctx);
  const { span, label, pointer } = reference(params);
  const f = withInputPointers(
    { albedo: "/albedo", "*": pointer },
    () => forcingSeries(input.time, input.tsi, input.sd, span, params.albedo),
  );
  const out: OutputSeries = {
    name: "Solar radiative forcing",
    quantity: "radiative_forcing",
    units: "W m-2",
    time: Array.from(input.time),
    value: undefinedAsNull(f.value),
    description:
      `ΔF = (TSI − TSI_ref)(1 − ${params.albedo})/4, TSI_ref the ${label}; from ${input.source}`,
  };
  if (f.sd) {
    const band = forcingInterval(f);
    out.uncertainty = undefinedAsNull(f.sd);
    out.lower = undefinedAsNull(band.lower);
    out.upper = undefinedAsNull(band.upper);
    out.interval = "95 % interval (normal, ±1.96 σ)";
  }
  return {
    formula: "ΔF = ΔTSI·(1 − α)/4",
    albedo: params.albedo,
    reference: { ...span, label, tsi: f.referenceTsi, points: f.referencePoints },
    reference_sd: f.referenceSd,
    source: input.source,
    outputs: { forcing: out },
    warnings: f.sd ? [] : ["The TSI input carries no uncertainty, so the forcing has none."],
    cautions: [
      "This is the instantaneous top-of-atmosphere solar forcing; it is not an attribution of any climate change to the Sun.",
      ASSESSMENT_CAUTION,
    ],
  };
}

/** A reconstruction run's TSI output (typed through its result schema), or a TSI series. */
function tsiInput(params: ForcingParams, ctx: RunContext): TsiInput {
  if (params.reconstruction) {
    const r = ctx.resultOf(irradianceReconstructions, params.reconstruction, "/reconstruction");
    const o = r.outputs.tsi;
    return {
      time: o.time,
      tsi: o.value.map((v) => v ?? NaN),
      sd: (o.uncertainty ?? []).map((v) => v ?? NaN),
      source: `reconstruction run ${params.reconstruction}`,
    };
  }
  const s = requireQuantity(ctx.series(refId(params.tsi!)), "tsi", "/tsi");
  return { time: s.time, tsi: s.value, sd: s.uncertainty, source: `series ${s.id}` };
}

/** The reference span, its label, and the pointer of its field. */
function reference(params: ForcingParams): { span: YearSpan; label: string; pointer: string } {
  const ref = params.reference;
  if (ref.kind === "period") {
    const span = parsePeriod(ref.period, "/reference/period");
    return {
      span,
      label: `mean TSI over [${span.start.toFixed(4)}, ${span.end.toFixed(4)})`,
      pointer: "/reference/period",
    };
  }
  const t = timeBound(ref.time, "middle", "/reference/time");
  return {
    span: { start: t - ref.half_width_years, end: t + ref.half_width_years },
    label: `mean TSI within ±${ref.half_width_years} yr of the cycle minimum at ${t.toFixed(3)}`,
    pointer: "/reference/time",
  };
}
