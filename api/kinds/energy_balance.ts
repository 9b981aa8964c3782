/**
 * Run kind "energy-balance": temperature response of a one-box or two-box energy-balance
 * model to a forcing series or to a sinusoidal test forcing, with the analytic sinusoid
 * amplitude and lag beside the numerical ones (core/climate/energy_balance.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type OutputSeries, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  fitSinusoid,
  ONE_BOX_DEFAULTS,
  oneBoxResponse,
  oneBoxSinusoidResponse,
  TWO_BOX_DEFAULTS,
  twoBoxResponse,
  twoBoxSinusoidResponse,
  twoBoxTransfer,
} from "../../core/climate/mod.ts";
import { CAUTION_REVIEW, jsonArray, RUN_ID } from "./climate_common.ts";

const Sinusoid = z.object({
  amplitude: z.number().positive().max(1000).default(0.08875).openapi({
    description: "Forcing amplitude F₀, W m-2 (default: half of 1 W m-2 peak-to-peak TSI × " +
      "(1 − 0.29)/4, shared/SCIENCE.md §10)",
  }),
  period_years: z.number().positive().max(10_000).default(11),
  years: z.number().positive().max(10_000).default(110).openapi({
    description: "Length of the run, years (whole periods are best)",
  }),
  steps_per_year: z.number().int().min(1).max(3660).default(365).openapi({
    description: "Samples of the forcing per year; the first-order-hold integration reads the " +
      "sine piecewise-linearly, lowering the amplitude by about (ωh)²/12",
  }),
}).openapi("SinusoidForcing");

export const EnergyBalanceRequest = z.object({
  model: z.enum(["one_box", "two_box"]).default("one_box"),
  forcing: SeriesRef.optional().openapi({
    description: "Radiative forcing series, W m-2 (e.g. a saved /v1/forcing output)",
  }),
  forcing_run: z.string().regex(RUN_ID, "must be a run id (UUIDv7)").optional().openapi({
    description: "Instead of forcing: a /v1/forcing run (its `forcing` output is used)",
  }),
  sinusoid: Sinusoid.optional().openapi({
    description: "Instead of forcing: F₀ sin(2πt/P), started on the steady state so the " +
      "numerical answer can be compared with the analytic one",
  }),
  heat_capacity: z.number().min(0.01).max(10_000).optional().openapi({
    description: "Mixed-layer heat capacity C, W yr m-2 K-1 (one-box default 8.0, shared/" +
      "SCIENCE.md §10; two-box default 7.3, Held et al. 2010, from memory)",
  }),
  feedback: z.number().min(0.01).max(100).optional().openapi({
    description: "Feedback parameter λ, W m-2 K-1 (default 1.3)",
  }),
  deep_heat_capacity: z.number().min(0.01).max(100_000).optional().openapi({
    description: "Two-box: deep-ocean heat capacity C_d, W yr m-2 K-1 (default 106, Held et " +
      "al. 2010, from memory)",
  }),
  exchange: z.number().min(1e-6).max(100).optional().openapi({
    description: "Two-box: exchange coefficient γ, W m-2 K-1 (default 0.7, Held et al. 2010, " +
      "from memory)",
  }),
}).openapi("EnergyBalanceRequest");

export const energyBalanceKind: RunKind<typeof EnergyBalanceRequest> = {
  kind: "energy-balance",
  path: "/v1/energy-balance",
  algorithmVersion: "2",
  tag: "Solar–climate linkage",
  summary: "Energy-balance temperature response to a forcing (one-box or two-box)",
  description: "Integrates C dT/dt = F − λT (one-box) or the two-box model with a deep ocean " +
    "(C dT/dt = F − λT − γ(T − T_d), C_d dT_d/dt = γ(T − T_d)) through a forcing series, " +
    "exactly for forcing linear between samples. Always reports the analytic steady-state " +
    "response to an 11-year (or the given) sinusoid; with a sinusoidal forcing the numerical " +
    "amplitude and lag are measured and reported beside the analytic ones.",
  request: EnergyBalanceRequest,
  result: LegacyResult,
  runRefs: (p) => (p.forcing_run ? [p.forcing_run] : []),
  estimateSeconds: (p) =>
    0.05 + (p.sinusoid ? p.sinusoid.years * p.sinusoid.steps_per_year * 2e-7 : 0.05),
  compute(p, ctx) {
    const given = [p.forcing, p.forcing_run, p.sinusoid].filter((v) => v !== undefined).length;
    if (given !== 1) {
      throw new InputProblem(
        "/forcing",
        given === 0
          ? "give forcing, forcing_run or sinusoid"
          : "give only one of forcing, forcing_run and sinusoid",
      );
    }
    const base = p.model === "one_box" ? ONE_BOX_DEFAULTS : TWO_BOX_DEFAULTS;
    const params = {
      heatCapacity: p.heat_capacity ?? base.heatCapacity,
      feedback: p.feedback ?? base.feedback,
      deepHeatCapacity: p.deep_heat_capacity ?? TWO_BOX_DEFAULTS.deepHeatCapacity,
      exchange: p.exchange ?? TWO_BOX_DEFAULTS.exchange,
    };
    if (p.model === "one_box" && (p.deep_heat_capacity !== undefined || p.exchange !== undefined)) {
      throw new InputProblem(
        "/model",
        "deep_heat_capacity and exchange belong to the two_box model",
      );
    }
    const period = p.sinusoid?.period_years ?? 11;
    const analytic = p.model === "one_box"
      ? oneBoxSinusoidResponse(params, period)
      : twoBoxSinusoidResponse(params, period);
    let time: Float64Array, forcing: Float64Array, name: string, units = "W m-2";
    const quantity = "temperature_anomaly";
    let skipped = 0;
    let init: [number, number] = [0, 0];
    if (p.sinusoid) {
      const sn = p.sinusoid;
      if (sn.period_years * sn.steps_per_year < 8) {
        throw new InputProblem(
          "/sinusoid/steps_per_year",
          `${sn.steps_per_year} steps per year give ${
            (sn.period_years * sn.steps_per_year).toFixed(1)
          } samples per period; at least 8 are needed`,
        );
      }
      const n = Math.round(sn.years * sn.steps_per_year) + 1;
      if (n > 2_000_000) {
        throw new InputProblem(
          "/sinusoid/years",
          `years × steps_per_year gives ${n} steps; at most 2,000,000`,
        );
      }
      time = Float64Array.from({ length: n }, (_, i) => i / sn.steps_per_year);
      const w = (2 * Math.PI) / sn.period_years;
      forcing = time.map((t) => sn.amplitude * Math.sin(w * t));
      name = `sinusoidal forcing ${sn.amplitude} W m-2, ${sn.period_years} yr`;
      if (p.model === "one_box") {
        init = [sn.amplitude * analytic.gain * Math.sin(-analytic.phase), 0];
      } else {
        const h = twoBoxTransfer(params, w);
        init = [sn.amplitude * h.surfaceIm, sn.amplitude * h.deepIm];
      }
    } else {
      let o: {
        time: ArrayLike<number>;
        value: ArrayLike<number | null>;
        units: string;
        name: string;
      };
      if (p.forcing_run) {
        const run = ctx.run(p.forcing_run);
        const out = (run.result?.outputs as Record<string, OutputSeries> | undefined)?.forcing;
        if (!out) {
          throw new InputProblem(
            "/forcing_run",
            `run ${run.id} (${run.kind}) has no forcing output`,
          );
        }
        o = out;
      } else {
        const s = ctx.series(refId(p.forcing!));
        o = s;
        if (s.quantity !== "radiative_forcing") {
          throw new InputProblem(
            "/forcing",
            `the series is ${s.quantity}; a radiative_forcing series (W m-2) is needed`,
          );
        }
      }
      units = o.units;
      if (units !== "W m-2") {
        throw new InputProblem(
          p.forcing_run ? "/forcing_run" : "/forcing",
          `forcing must be in W m-2, got ${units}`,
        );
      }
      const t: number[] = [], f: number[] = [];
      for (let i = 0; i < o.time.length; i++) {
        const v = o.value[i];
        if (v !== null && Number.isFinite(v)) {
          t.push(o.time[i]);
          f.push(v);
        }
      }
      if (t.length < 2) throw new InputProblem("/forcing", "the forcing has fewer than 2 values");
      skipped = o.time.length - t.length;
      time = Float64Array.from(t);
      forcing = Float64Array.from(f);
      name = o.name;
    }
    let surface: Float64Array, deep: Float64Array | null = null;
    try {
      if (p.model === "one_box") surface = oneBoxResponse(time, forcing, params, init[0]);
      else {
        const r = twoBoxResponse(time, forcing, params, init);
        surface = r.surface;
        deep = r.deep;
      }
    } catch (e) {
      if (e instanceof RangeError) throw new InputProblem("/forcing", e.message);
      throw e;
    }
    if (!surface.every(Number.isFinite) || (deep && !deep.every(Number.isFinite))) {
      throw new InputProblem("/forcing", "the model response is not finite for these inputs");
    }
    let numerical = null;
    if (p.sinusoid) {
      const sn = p.sinusoid;
      // whole periods at the end of the run
      const per = Math.floor(sn.years / sn.period_years);
      const k = per >= 1
        ? time.length - Math.round(per * sn.period_years * sn.steps_per_year) - 1
        : 0;
      const f = fitSinusoid(
        time.subarray(Math.max(0, k)),
        surface.subarray(Math.max(0, k)),
        sn.period_years,
      );
      const aAmp = analytic.gain * sn.amplitude;
      numerical = !Number.isFinite(f.amplitude) || !Number.isFinite(f.lagYears) ? null : {
        amplitude_k: f.amplitude,
        peak_to_peak_k: 2 * f.amplitude,
        lag_years: f.lagYears,
        relative_difference_amplitude: (f.amplitude - aAmp) / aAmp,
        relative_difference_lag: (f.lagYears - analytic.lagYears) / analytic.lagYears,
        fitted_over_years: time[time.length - 1] - time[Math.max(0, k)],
      };
    }
    const amp0 = p.sinusoid?.amplitude ?? null;
    const outputs: Record<string, OutputSeries> = {
      temperature: {
        name: `${p.model === "one_box" ? "one-box" : "two-box"} response to ${name}`,
        quantity,
        units: "K",
        time: Array.from(time),
        ...(p.sinusoid ? { time_axis: "model_years" as const } : {}),
        value: jsonArray(surface),
        description: "Mixed-layer temperature response, K, relative to the initial state",
      },
    };
    if (deep) {
      outputs.deep_temperature = {
        name: `two-box deep-ocean response to ${name}`,
        quantity,
        units: "K",
        time: Array.from(time),
        ...(p.sinusoid ? { time_axis: "model_years" as const } : {}),
        value: jsonArray(deep),
      };
    }
    return {
      model: p.model,
      parameters: {
        heat_capacity: params.heatCapacity,
        feedback: params.feedback,
        ...(p.model === "two_box"
          ? { deep_heat_capacity: params.deepHeatCapacity, exchange: params.exchange }
          : {}),
        units: { heat_capacity: "W yr m-2 K-1", feedback: "W m-2 K-1", exchange: "W m-2 K-1" },
        sources: p.model === "one_box"
          ? "defaults λ = 1.3, C = 8.0: the worked case of shared/SCIENCE.md §10"
          : "defaults C = 7.3, C_d = 106, λ = 1.3, γ = 0.7: Held et al. 2010, J. Climate 23, 2418 (from memory)",
      },
      equilibrium_sensitivity_k_per_w_m2: 1 / params.feedback,
      sinusoid_analytic: {
        period_years: period,
        gain_k_per_w_m2: analytic.gain,
        phase_degrees: (analytic.phase * 180) / Math.PI,
        lag_years: analytic.lagYears,
        ...(amp0 === null
          ? {}
          : { amplitude_k: analytic.gain * amp0, peak_to_peak_k: 2 * analytic.gain * amp0 }),
      },
      sinusoid_numerical: numerical,
      outputs,
      warnings: skipped > 0
        ? [`${skipped} forcing value(s) missing: the forcing is taken as linear across the gaps`]
        : [],
      cautions: [
        "An energy-balance model is a deliberately simple description of the climate system; " +
        "its response depends on the assumed heat capacity and feedback.",
        CAUTION_REVIEW,
      ],
    };
  },
};
