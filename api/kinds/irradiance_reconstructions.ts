/**
 * `POST /v1/irradiance/reconstructions`: apply a calibrated model (cited by run id) to proxy
 * series over a period, at daily, monthly or annual resolution, with 95 % prediction
 * intervals; back-extension through the model's sunspot → proxy mappings; optional secular
 * background scenario.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  cellKey,
  cellMeans,
  cellSequence,
  evaluateSunspotMapping,
  reconstructFromProxies,
  type ReconstructionCells,
  secularBackground,
  SOURCE_BACK_EXTENDED,
  SOURCE_DIRECT,
  type SunspotProxyMapping,
  tsiCycleAmplitude,
  valuesAtKeys,
} from "../../core/irradiance/mod.ts";
import { normalQuantile, tQuantile } from "../../core/stats/distributions.ts";
import type { StoredMappings, StoredModel } from "./irradiance_models.ts";
import {
  camelKeys,
  cycleAmplitudeWarning,
  IRRADIANCE_CAUTIONS,
  parsePeriod,
  PeriodInput,
  quietSunWarning,
  requireSunspotVersion,
  snakeKeys,
} from "./irradiance_common.ts";

const RUN_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

const Background = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("none") }),
  z.object({
    kind: z.literal("sunspot_running_mean"),
    window_years: z.number().min(1).max(100).default(11),
    reference_minimum: PeriodInput.openapi({
      description: "Period of the reference minimum (e.g. a grand minimum)",
    }),
    later_period: PeriodInput.openapi({
      description: "Later period whose background exceeds the reference by delta_tsi",
    }),
    delta_tsi: z.number().min(-10).max(10).openapi({
      description: "Background change from the reference minimum to the later period, W m-2",
    }),
  }).openapi({
    description: "A scenario, not a measurement: B(t) ∝ the running mean of sunspot number, " +
      "scaled so that its change from reference_minimum to later_period is delta_tsi, and zero " +
      "on average over the calibration period",
  }),
]).openapi("SecularBackground");

const Request = z.object({
  model: z.string().regex(RUN_ID, "must be a run id (UUIDv7)").openapi({
    description: "Id of a succeeded /v1/irradiance/models run",
  }),
  proxies: z.array(z.object({
    term: z.string().min(1).max(40).openapi({ description: "A term name of the model" }),
    series: SeriesRef,
  })).max(6).default([]).openapi({
    description: "Direct proxy series per model term; where a term has no value the " +
      "reconstruction back-extends from sunspot_number",
  }),
  sunspot_number: SeriesRef.optional().openapi({
    description: "Sunspot-number series for back-extension; its version must match the model's",
  }),
  sunspot_conversion: z.object({
    factor: z.number().positive().max(10).openapi({
      description: "Multiply the sunspot series by this to put it on the model's version",
    }),
    note: z.string().max(400).optional(),
  }).optional(),
  period: PeriodInput,
  resolution: z.enum(["daily", "monthly", "annual"]).default("monthly"),
  level: z.number().min(0.5).max(0.999).default(0.95).openapi({
    description: "Level of the prediction intervals",
  }),
  background: Background.default({ kind: "none" }),
}).superRefine((v, ctx) => {
  const seen = new Set<string>();
  v.proxies.forEach((p, i) => {
    if (seen.has(p.term)) {
      ctx.addIssue({ code: "custom", path: ["proxies", i, "term"], message: "duplicate term" });
    }
    seen.add(p.term);
  });
}).openapi("ReconstructionRequest");

type Params = z.output<typeof Request>;

const RANK: Record<string, number> = { daily: 0, monthly: 1, annual: 2, irregular: 3 };

const SOURCE_NAMES = ["none", "direct", "back_extended"] as const;

/** Runs of equal source code as { source, start, end, cells } (start/end: cell middles). */
function segments(source: Uint8Array, time: ArrayLike<number>) {
  const out: { source: string; start: number; end: number; cells: number }[] = [];
  for (let i = 0; i < source.length;) {
    let j = i;
    while (j + 1 < source.length && source[j + 1] === source[i]) j++;
    out.push({ source: SOURCE_NAMES[source[i]], start: time[i], end: time[j], cells: j - i + 1 });
    i = j + 1;
  }
  return out;
}

/** Round to 1e-6 (W m-2): far below any interval width, and a third shorter in JSON. */
function micro(x: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) {
    out[i] = Number.isFinite(x[i]) ? Math.round(x[i] * 1e6) / 1e6 : null;
  }
  return out;
}

function outsideCount(x: Float64Array, lo: number, hi: number): number {
  const pad = 0.25 * (hi - lo);
  let c = 0;
  for (const v of x) if (Number.isFinite(v) && (v < lo - pad || v > hi + pad)) c++;
  return c;
}

export const irradianceReconstructions: RunKind<typeof Request> = {
  kind: "irradiance-reconstructions",
  path: "/v1/irradiance/reconstructions",
  algorithmVersion: "2",
  tag: "Irradiance",
  summary: "Reconstruct TSI from a calibrated model, with prediction intervals",
  description: "Applies a model run to proxy series averaged into daily, monthly or annual " +
    "cells over a period. Prediction intervals combine the coefficient covariance with the " +
    "residual variance, reduced for cell means by the AR(1) variance factor of the residuals " +
    "(so intervals of monthly and annual means are not too narrow). Where a proxy has no value, " +
    "its value is mapped from sunspot number with the model's fitted mapping; the band then " +
    "uses the residual process of the sunspot-only model and the mappings' parameter " +
    "uncertainty, so it widens where proxies are weaker. The sunspot series version must match " +
    "the model's unless a conversion factor is given. An optional secular background scenario " +
    "is added and labelled; the default is none.",
  request: Request,
  result: LegacyResult,
  runRefs: (p) => [p.model],
  estimateSeconds: (p) => (p.resolution === "daily" ? 0.5 : 0.1),
  compute(params: Params, ctx) {
    const run = ctx.run(params.model);
    if (run.kind !== "irradiance-models") {
      throw new InputProblem(
        "/model",
        `run ${run.id} is a ${run.kind} run; a /v1/irradiance/models run is needed`,
      );
    }
    // snakeKeys also reads model runs stored before results were snake_case
    const model = snakeKeys((run.result as { model: unknown }).model) as StoredModel;
    const mappings = snakeKeys((run.result as { mappings: unknown }).mappings) as
      | StoredMappings
      | null;
    const period = parsePeriod(params.period, "/period");
    const res = params.resolution;
    // target cells
    const k0 = cellKey(period.start + 1e-9, res);
    const k1 = cellKey(period.end - 1e-9, res);
    const n = k1 - k0 + 1;
    if (n > 400_000) {
      throw new InputProblem("/period", `the period has ${n} ${res} cells; at most 400000`);
    }
    const keys = new Int32Array(n);
    for (let i = 0; i < n; i++) keys[i] = k0 + i;
    const seq = cellSequence(k0, k1, res);
    const time = seq.middle, days = seq.days;
    const termNames = model.terms.map((t) => t.name);
    params.proxies.forEach((p, i) => {
      if (!termNames.includes(p.term)) {
        throw new InputProblem(
          `/proxies/${i}/term`,
          `the model has no term "${p.term}"; its terms are ${termNames.join(", ")}`,
        );
      }
    });
    const direct = model.terms.map((t) => {
      const p = params.proxies.find((q) => q.term === t.name);
      if (!p) return new Float64Array(n).fill(NaN);
      const s = ctx.series(refId(p.series));
      return valuesAtKeys(cellMeans(s.time, s.value, res), keys);
    });
    // sunspot number: version check, optional conversion, mapping
    let sunspot: Float64Array | null = null;
    let sunspotSeries = null as null | { time: Float64Array; value: Float64Array };
    let conversion: string | null = null;
    let sunspotResolution: string | null = null;
    const warnings: string[] = [];
    if (params.sunspot_number !== undefined) {
      const ss = ctx.series(refId(params.sunspot_number));
      const version = requireSunspotVersion(ss, "/sunspot_number");
      sunspotResolution = ss.resolution;
      if (!mappings) {
        throw new InputProblem(
          "/sunspot_number",
          `model run ${run.id} was calibrated without a sunspot series, so it has no sunspot → proxy mappings; calibrate with sunspot_number to back-extend`,
        );
      }
      let values = ss.value;
      if (version !== mappings.sunspot_version) {
        if (!params.sunspot_conversion) {
          throw new InputProblem(
            "/sunspot_number",
            `the sunspot series is version "${version}" but the model was calibrated with version "${mappings.sunspot_version}"; supply the matching version or a sunspot_conversion factor (e.g. version 1 → 2 before 1947 is about 1/0.6)`,
          );
        }
        const f = params.sunspot_conversion.factor;
        values = ss.value.map((v) => v * f);
        conversion = `sunspot version ${version} × ${f} → version ${mappings.sunspot_version}` +
          (params.sunspot_conversion.note ? ` (${params.sunspot_conversion.note})` : "");
      } else if (params.sunspot_conversion) {
        warnings.push(
          `sunspot_conversion was ignored: the series is already version ${version}, as the model.`,
        );
      }
      sunspotSeries = { time: ss.time, value: values };
      sunspot = valuesAtKeys(cellMeans(ss.time, values, res), keys);
    }
    const mapped: ReconstructionCells["mapped"] = model.terms.map((t) => {
      if (!sunspot || !mappings) return null;
      const m = camelKeys(mappings.terms[t.name].chosen) as SunspotProxyMapping;
      const v = new Float64Array(n), pv = new Float64Array(n);
      evaluateSunspotMapping(m, sunspot, v, pv);
      return { value: v, paramVariance: pv };
    });
    const hasAny = direct.some((d) => d.some(Number.isFinite)) ||
      (sunspot !== null && sunspot.some(Number.isFinite));
    if (!hasAny) {
      throw new InputProblem(
        "/period",
        `the period [${period.start.toFixed(3)}, ${
          period.end.toFixed(3)
        }) is outside the coverage of every proxy and of the sunspot series`,
      );
    }
    const z = params.level === 0.95
      ? model.t_quantile975
      : tQuantile(1 - (1 - params.level) / 2, model.df_residual);
    const rec = reconstructFromProxies(
      {
        coefficients: model.coefficients,
        covariance: model.covariance,
        terms: model.terms.map((t) => ({ role: t.role, quietLevel: t.quiet_level })),
        psiReference: model.psi_reference,
        residualSd: model.residual_sd,
        rho: model.rho,
        stepDays: model.step_days,
        backExtension: mappings
          ? {
            residualSd: mappings.back_extension.residual_sd,
            rho: mappings.back_extension.rho,
            stepDays: mappings.back_extension.step_days,
          }
          : null,
      },
      { days, direct, mapped },
      z,
    );
    // secular background
    let scenario: Record<string, unknown> = {
      kind: "none",
      label:
        "No secular background: the reconstruction contains only the proxy-driven variability.",
    };
    if (params.background.kind === "sunspot_running_mean") {
      const bg = params.background;
      if (!sunspotSeries) {
        throw new InputProblem(
          "/background",
          "the sunspot_running_mean background needs a sunspot_number series",
        );
      }
      let b;
      try {
        b = secularBackground(sunspotSeries.time, sunspotSeries.value, {
          windowYears: bg.window_years,
          referenceMinimum: parsePeriod(bg.reference_minimum, "/background/reference_minimum"),
          laterPeriod: parsePeriod(bg.later_period, "/background/later_period"),
          deltaTsi: bg.delta_tsi,
          calibrationPeriod: model.calibration_period,
        });
      } catch (e) {
        if (e instanceof InputProblem) throw e;
        const msg = (e as Error).message;
        const ptr = /reference minimum/.test(msg)
          ? "/background/reference_minimum"
          : /later period/.test(msg)
          ? "/background/later_period"
          : "/background";
        throw new InputProblem(ptr, msg);
      }
      const bAt = valuesAtKeys(cellMeans(sunspotSeries.time, b.value, res), keys);
      for (let i = 0; i < n; i++) {
        if (!Number.isFinite(rec.value[i])) continue;
        const add = Number.isFinite(bAt[i]) ? bAt[i] : NaN;
        rec.value[i] += add;
        rec.lower[i] += add;
        rec.upper[i] += add;
      }
      scenario = {
        kind: "sunspot_running_mean",
        label:
          `SCENARIO: secular background proportional to the ${bg.window_years}-year running mean of sunspot number, ΔTSI = ${bg.delta_tsi} W m-2 from the reference minimum to the later period; the band does not include the (large) uncertainty of this choice`,
        scale: b.scale,
        reference_mean: b.referenceMean,
        later_mean: b.laterMean,
        calibration_mean: b.calibrationMean,
      };
    }
    // coverage and plausibility
    let nDirect = 0, nBack = 0, nNone = 0;
    let firstBack = Infinity, lastBack = -Infinity, firstDirect = Infinity, lastDirect = -Infinity;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(rec.value[i])) {
        nNone++;
        rec.source[i] = 0;
      } else if (rec.source[i] === SOURCE_DIRECT) {
        nDirect++;
        firstDirect = Math.min(firstDirect, time[i]);
        lastDirect = Math.max(lastDirect, time[i]);
      } else if (rec.source[i] === SOURCE_BACK_EXTENDED) {
        nBack++;
        firstBack = Math.min(firstBack, time[i]);
        lastBack = Math.max(lastBack, time[i]);
      }
    }
    if (nDirect + nBack === 0) {
      throw new InputProblem(
        "/period",
        "no cell of the period has every model proxy (directly or mapped from sunspot number)",
      );
    }
    if (nNone > 0) {
      const coarse = sunspotResolution !== null && RANK[sunspotResolution] > RANK[res]
        ? ` The sunspot series is ${sunspotResolution}, coarser than the requested ${res} cells, so back-extension fills only the cells that hold one of its points; request ${sunspotResolution} or coarser resolution for the sunspot-only era.`
        : "";
      warnings.push(
        `${nNone} of ${n} ${res} cells have no value (a proxy and the sunspot series are both missing there).${coarse}`,
      );
    }
    model.terms.forEach((t, k) => {
      const c = outsideCount(direct[k], t.min, t.max);
      if (c > 0) {
        warnings.push(
          `Term ${t.name}: ${c} cells lie far outside the calibration range [${t.min}, ${t.max}] (by more than a quarter of the range); the linear model is extrapolated there.`,
        );
      }
    });
    if (sunspot && mappings) {
      const m = Object.values(mappings.terms)[0].chosen;
      let c = 0;
      for (let i = 0; i < n; i++) {
        if (rec.source[i] === SOURCE_BACK_EXTENDED && sunspot[i] > 1.25 * m.sunspot_max) c++;
      }
      if (c > 0) {
        warnings.push(
          `${c} back-extended cells have sunspot numbers above 1.25 × the largest in the mapping fit (${
            m.sunspot_max.toFixed(1)
          }); the mappings are extrapolated there.`,
        );
      }
    }
    const amp = tsiCycleAmplitude(time, rec.value);
    warnings.push(...cycleAmplitudeWarning(amp.median), ...quietSunWarning(model.quiet_sun.value));
    const zNote = params.level === 0.95 ? "95 %" : `${(params.level * 100).toFixed(1)} %`;
    const sdOut = micro(rec.sd);
    const valOut = micro(rec.value);
    return {
      model: run.id,
      resolution: res,
      period,
      level: params.level,
      interval_quantile: z,
      normal_quantile: normalQuantile(1 - (1 - params.level) / 2),
      scenario,
      sunspot_conversion: conversion,
      coverage: {
        cells: n,
        direct: {
          cells: nDirect,
          start: nDirect ? firstDirect : null,
          end: nDirect ? lastDirect : null,
        },
        back_extended: {
          cells: nBack,
          start: nBack ? firstBack : null,
          end: nBack ? lastBack : null,
        },
        missing: nNone,
      },
      source_segments: segments(rec.source, time),
      cycle_amplitude: snakeKeys(amp),
      outputs: {
        tsi: {
          name: "Reconstructed TSI",
          quantity: "tsi",
          units: "W m-2",
          time: Array.from(time),
          value: valOut,
          uncertainty: sdOut,
          lower: micro(rec.lower),
          upper: micro(rec.upper),
          interval: `${zNote} prediction interval`,
          description: `Model run ${run.id}, ${res} means, values rounded to 1e-6 W m-2; ${scenario
            .label as string}`,
        },
      },
      warnings,
      cautions: [
        ...IRRADIANCE_CAUTIONS,
        "Intervals of monthly and annual means assume AR(1) residuals; residuals with longer memory (instrument drifts, slow facular changes) would make them wider.",
        `Background scenario: ${scenario.label as string}`,
      ],
    };
  },
};
