/**
 * `POST /v1/forcing`: solar radiative forcing ΔF = ΔTSI·(1 − α)/4 relative to a stated
 * reference period, from a TSI series or a reconstruction run.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type OutputSeries, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import { forcingSeries, PLANETARY_ALBEDO } from "../../core/irradiance/mod.ts";
import { normalQuantile } from "../../core/stats/distributions.ts";
import { nullable, parsePeriod, PeriodInput, timeBound, TimeInput } from "./irradiance_common.ts";

const RUN_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

const Reference = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("period"), period: PeriodInput }),
  z.object({
    kind: z.literal("cycle_minimum"),
    time: TimeInput.openapi({
      description: "Time of a cycle minimum (e.g. from a cycle analysis)",
    }),
    half_width_years: z.number().gt(0).max(5).default(0.5).openapi({
      description: "Average TSI over the minimum ± this many years",
    }),
  }),
]).openapi("ForcingReference");

const Request = z.object({
  tsi: SeriesRef.optional().openapi({ description: "A TSI series (W m-2)" }),
  reconstruction: z.string().regex(RUN_ID, "must be a run id (UUIDv7)").optional().openapi({
    description:
      "Instead of tsi: a /v1/irradiance/reconstructions run (its uncertainty is carried)",
  }),
  reference: Reference,
  albedo: z.number().min(0).max(0.99).default(PLANETARY_ALBEDO).openapi({
    description: "Planetary albedo α (IPCC AR6 WG1 §7.3.4.4: 0.29)",
  }),
}).superRefine((v, ctx) => {
  if ((v.tsi === undefined) === (v.reconstruction === undefined)) {
    ctx.addIssue({
      code: "custom",
      path: ["tsi"],
      message: "give exactly one of tsi (a series) or reconstruction (a run id)",
    });
  }
}).openapi("ForcingRequest");

export const forcing: RunKind<typeof Request> = {
  kind: "forcing",
  path: "/v1/forcing",
  algorithmVersion: "2",
  tag: "Irradiance",
  summary: "Solar radiative forcing ΔF = ΔTSI·(1 − α)/4 relative to a reference period",
  description: "Converts TSI to radiative forcing relative to the mean TSI of a reference " +
    "period (a period, or a window around a cycle minimum), with albedo α = 0.29 by default " +
    "(IPCC AR6 WG1 §7.3.4.4). The one-sigma uncertainty of a reconstruction is carried: " +
    "σ_F = (1 − α)/4·√(σ(t)² + σ_ref²), σ_ref the mean σ in the reference period (errors " +
    "there taken as fully correlated, an upper bound).",
  request: Request,
  result: LegacyResult,
  runRefs: (p) => (p.reconstruction ? [p.reconstruction] : []),
  compute(params, ctx) {
    let time: ArrayLike<number>, tsi: ArrayLike<number>, sd: ArrayLike<number> | null = null;
    let source: string;
    if (params.reconstruction) {
      const run = ctx.run(params.reconstruction);
      const o = (run.result?.outputs as Record<string, OutputSeries> | undefined)?.tsi;
      if (run.kind !== "irradiance-reconstructions" || !o) {
        throw new InputProblem(
          "/reconstruction",
          `run ${run.id} is a ${run.kind} run; a /v1/irradiance/reconstructions run is needed`,
        );
      }
      time = o.time;
      tsi = o.value.map((v) => v ?? NaN);
      sd = (o.uncertainty ?? []).map((v) => v ?? NaN);
      source = `reconstruction run ${run.id}`;
    } else {
      const s = ctx.series(refId(params.tsi!));
      if (s.quantity !== "tsi") {
        throw new InputProblem(
          "/tsi",
          `series ${s.id} has quantity ${s.quantity}; a tsi series is needed`,
        );
      }
      time = s.time;
      tsi = s.value;
      sd = s.uncertainty;
      source = `series ${s.id}`;
    }
    const ref = params.reference;
    let refPeriod: { start: number; end: number };
    let refLabel: string;
    if (ref.kind === "period") {
      refPeriod = parsePeriod(ref.period, "/reference/period");
      refLabel = `mean TSI over [${refPeriod.start.toFixed(4)}, ${refPeriod.end.toFixed(4)})`;
    } else {
      const t = timeBound(ref.time, "middle", "/reference/time");
      refPeriod = { start: t - ref.half_width_years, end: t + ref.half_width_years };
      refLabel = `mean TSI within ±${ref.half_width_years} yr of the cycle minimum at ${
        t.toFixed(3)
      }`;
    }
    let f;
    try {
      f = forcingSeries(time, tsi, sd, refPeriod, params.albedo);
    } catch (e) {
      throw new InputProblem(
        ref.kind === "period" ? "/reference/period" : "/reference/time",
        (e as Error).message,
      );
    }
    const z = normalQuantile(0.975);
    const out: OutputSeries = {
      name: "Solar radiative forcing",
      quantity: "radiative_forcing",
      units: "W m-2",
      time: Array.from(time),
      value: nullable(f.value),
      description:
        `ΔF = (TSI − TSI_ref)(1 − ${params.albedo})/4, TSI_ref the ${refLabel}; from ${source}`,
    };
    if (f.sd) {
      out.uncertainty = nullable(f.sd);
      out.lower = nullable(f.value.map((v, i) => v - z * f.sd![i]));
      out.upper = nullable(f.value.map((v, i) => v + z * f.sd![i]));
      out.interval = "95 % interval (normal, ±1.96 σ)";
    }
    return {
      formula: "ΔF = ΔTSI·(1 − α)/4",
      albedo: params.albedo,
      reference: { ...refPeriod, label: refLabel, tsi: f.referenceTsi, points: f.referencePoints },
      reference_sd: f.referenceSd,
      source,
      outputs: { forcing: out },
      warnings: f.sd ? [] : ["The TSI input carries no uncertainty, so the forcing has none."],
      cautions: [
        "This is the instantaneous top-of-atmosphere solar forcing; it is not an attribution of any climate change to the Sun.",
        "These results do not replace peer-reviewed assessment of solar forcing.",
      ],
    };
  },
};
