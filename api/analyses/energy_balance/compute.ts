/**
 * Adapter of the "energy-balance" analysis: the forcing (a series, a forcing run's output or a
 * sinusoid started on its steady state), the one-box or two-box integration and the analytic
 * sinusoid response from core (core/climate/energy_balance.ts), and the result.
 *
 * @module
 */
import {
  CancelledError,
  InputProblem,
  type OutputSeries,
  type RunContext,
} from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  fitSinusoid,
  ONE_BOX_DEFAULTS,
  oneBoxResponse,
  oneBoxSinusoidResponse,
  oneBoxSinusoidStart,
  type SinusoidResponse,
  TWO_BOX_DEFAULTS,
  type TwoBoxParameters,
  twoBoxResponse,
  twoBoxSinusoidResponse,
  twoBoxSinusoidStart,
} from "../../../core/climate/mod.ts";
import { CAUTION_REVIEW } from "../common/cautions.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { checkStoredMembers, memberBand, membersJson } from "../common/ensemble_members.ts";
import { bandCaution, type UncertaintyBand } from "../common/uncertainty_band.ts";
import { forcing as forcingAnalysis } from "../forcing/mod.ts";
import type { ForcingResultOut } from "../forcing/result.ts";
import type { EnergyBalanceParams } from "./request.ts";
import type { EnergyBalanceResultIn } from "./result.ts";

/** The forcing the model is driven with. */
interface Forcing {
  time: Float64Array;
  value: Float64Array;
  name: string;
  /** Missing values left out of a forcing series. */
  skipped: number;
  /** Initial [surface, deep] temperatures (the steady state for a sinusoid). */
  initial: [number, number];
  /** A forcing run's members at the same points (member-major), its seed and band. */
  ensemble: { members: Float64Array; realizations: number; seed: number } | null;
  band: UncertaintyBand | null;
}

/** F₀ sin(2πt/P) on its sampling grid, started on the steady state. */
function sinusoidForcing(
  p: EnergyBalanceParams,
  sn: NonNullable<EnergyBalanceParams["sinusoid"]>,
  params: TwoBoxParameters,
): Forcing {
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
  const time = Float64Array.from({ length: n }, (_, i) => i / sn.steps_per_year);
  const w = (2 * Math.PI) / sn.period_years;
  return {
    time,
    value: time.map((t) => sn.amplitude * Math.sin(w * t)),
    name: `sinusoidal forcing ${sn.amplitude} W m-2, ${sn.period_years} yr`,
    skipped: 0,
    ensemble: null,
    band: null,
    initial: p.model === "one_box"
      ? [oneBoxSinusoidStart(params, sn.period_years, sn.amplitude), 0]
      : twoBoxSinusoidStart(params, sn.period_years, sn.amplitude),
  };
}

/** A forcing series or a forcing run's `forcing` output, in W m-2, without its gaps. */
function forcingInput(p: EnergyBalanceParams, ctx: RunContext): Forcing {
  let o: { time: ArrayLike<number>; value: ArrayLike<number | null>; units: string; name: string };
  let run: ForcingResultOut | null = null;
  if (p.forcing_run) {
    run = ctx.resultOf(forcingAnalysis, p.forcing_run, "/forcing_run");
    o = run.outputs.forcing;
  } else {
    const s = ctx.series(refId(p.forcing!));
    if (s.quantity !== "radiative_forcing") {
      throw new InputProblem(
        "/forcing",
        `the series is ${s.quantity}; a radiative_forcing series (W m-2) is needed`,
      );
    }
    o = s;
  }
  if (o.units !== "W m-2") {
    throw new InputProblem(
      p.forcing_run ? "/forcing_run" : "/forcing",
      `forcing must be in W m-2, got ${o.units}`,
    );
  }
  const keep: number[] = [];
  for (let i = 0; i < o.time.length; i++) {
    const v = o.value[i];
    if (v !== null && Number.isFinite(v)) keep.push(i);
  }
  if (keep.length < 2) throw new InputProblem("/forcing", "the forcing has fewer than 2 values");
  const e = run?.ensemble ?? null;
  if (e) checkStoredMembers(e, o.time.length, "/forcing_run", p.forcing_run!);
  const n = keep.length;
  return {
    time: Float64Array.from(keep, (i) => o.time[i]),
    value: Float64Array.from(keep, (i) => o.value[i] as number),
    name: o.name,
    skipped: o.time.length - n,
    initial: [0, 0],
    ensemble: e
      ? {
        members: Float64Array.from(
          { length: e.realizations * n },
          (_, k) => e.members[Math.floor(k / n)][keep[k % n]] ?? NaN,
        ),
        realizations: e.realizations,
        seed: e.seed,
      }
      : null,
    band: run?.band ?? null,
  };
}

/** The surface response to every member of the forcing's ensemble, and its band. */
function memberResponses(
  p: EnergyBalanceParams,
  params: TwoBoxParameters,
  f: Forcing,
  central: Float64Array,
  ctx: RunContext,
) {
  const e = f.ensemble!, n = f.time.length;
  const members = new Float64Array(e.realizations * n);
  withInputPointers({ "*": "/forcing_run" }, () => {
    for (let m = 0; m < e.realizations; m++) {
      if (ctx.cancelled()) throw new CancelledError();
      const fm = e.members.subarray(m * n, (m + 1) * n);
      const t = p.model === "one_box"
        ? oneBoxResponse(f.time, fm, params, 0)
        : twoBoxResponse(f.time, fm, params, [0, 0]).surface;
      members.set(t, m * n);
    }
  });
  if (!members.every(Number.isFinite)) {
    throw new InputProblem("/forcing_run", "a member's response is not finite");
  }
  const b = memberBand(central, members, e.realizations, 0.95, "responses to forcing members", {
    shouldStop: ctx.cancelled,
  });
  return {
    members,
    uncertainty: b.sd,
    lower: b.lower,
    upper: b.upper,
    interval: b.interval,
    method: b.method,
  };
}

/** Amplitude and lag of the response, fitted over the whole periods at the end of the run. */
function measuredSinusoid(
  sn: NonNullable<EnergyBalanceParams["sinusoid"]>,
  time: Float64Array,
  surface: Float64Array,
  analytic: SinusoidResponse,
): EnergyBalanceResultIn["sinusoid_numerical"] {
  const per = Math.floor(sn.years / sn.period_years);
  const k = Math.max(
    0,
    per >= 1 ? time.length - Math.round(per * sn.period_years * sn.steps_per_year) - 1 : 0,
  );
  const f = fitSinusoid(time.subarray(k), surface.subarray(k), sn.period_years);
  if (!Number.isFinite(f.amplitude) || !Number.isFinite(f.lagYears)) return null;
  const aAmp = analytic.gain * sn.amplitude;
  return {
    amplitude_k: f.amplitude,
    peak_to_peak_k: 2 * f.amplitude,
    lag_years: f.lagYears,
    relative_difference_amplitude: (f.amplitude - aAmp) / aAmp,
    relative_difference_lag: (f.lagYears - analytic.lagYears) / analytic.lagYears,
    fitted_over_years: time[time.length - 1] - time[k],
  };
}

/** The model's parameters: the request's, else the defaults of the model. */
function modelParameters(p: EnergyBalanceParams): TwoBoxParameters {
  const base = p.model === "one_box" ? ONE_BOX_DEFAULTS : TWO_BOX_DEFAULTS;
  const params: TwoBoxParameters = {
    heatCapacity: p.heat_capacity ?? base.heatCapacity,
    feedback: p.feedback ?? base.feedback,
    deepHeatCapacity: p.deep_heat_capacity ?? TWO_BOX_DEFAULTS.deepHeatCapacity,
    exchange: p.exchange ?? TWO_BOX_DEFAULTS.exchange,
  };
  if (p.model === "one_box" && (p.deep_heat_capacity !== undefined || p.exchange !== undefined)) {
    throw new InputProblem("/model", "deep_heat_capacity and exchange belong to the two_box model");
  }
  return params;
}

/** Surface (and, two-box, deep) temperatures through the forcing. */
function response(p: EnergyBalanceParams, params: TwoBoxParameters, forcing: Forcing) {
  const where = p.forcing_run ? "/forcing_run" : p.sinusoid ? "/sinusoid" : "/forcing";
  const [surface, deep] = withInputPointers({ "*": where }, () => {
    if (p.model === "one_box") {
      return [oneBoxResponse(forcing.time, forcing.value, params, forcing.initial[0]), null];
    }
    const r = twoBoxResponse(forcing.time, forcing.value, params, forcing.initial);
    return [r.surface, r.deep];
  });
  if (!surface.every(Number.isFinite) || (deep && !deep.every(Number.isFinite))) {
    throw new InputProblem("/forcing", "the model response is not finite for these inputs");
  }
  return { surface, deep };
}

/** Integrate the energy-balance model through the forcing. */
export function computeEnergyBalance(
  p: EnergyBalanceParams,
  ctx: RunContext,
): EnergyBalanceResultIn {
  const given = [p.forcing, p.forcing_run, p.sinusoid].filter((v) => v !== undefined).length;
  if (given !== 1) {
    throw new InputProblem(
      "/forcing",
      given === 0
        ? "give forcing, forcing_run or sinusoid"
        : "give only one of forcing, forcing_run and sinusoid",
    );
  }
  const params = modelParameters(p);
  const period = p.sinusoid?.period_years ?? 11;
  const analytic = p.model === "one_box"
    ? oneBoxSinusoidResponse(params, period)
    : twoBoxSinusoidResponse(params, period);
  const forcing = p.sinusoid ? sinusoidForcing(p, p.sinusoid, params) : forcingInput(p, ctx);
  const { time } = forcing;
  ctx.progress(0.1); // inputs checked; the integration follows
  const { surface, deep } = response(p, params, forcing);
  const amp0 = p.sinusoid?.amplitude ?? null;
  const timeAxis = p.sinusoid ? { time_axis: "model_years" as const } : {};
  const spread = forcing.ensemble ? memberResponses(p, params, forcing, surface, ctx) : null;
  const band = spread && forcing.band ? { ...forcing.band, method: spread.method } : null;
  const outputs: { temperature: OutputSeries; deep_temperature?: OutputSeries } = {
    temperature: {
      name: `${p.model === "one_box" ? "one-box" : "two-box"} response to ${forcing.name}`,
      quantity: "temperature_anomaly",
      units: "K",
      time: Array.from(time),
      ...timeAxis,
      value: Array.from(surface),
      ...(spread
        ? {
          uncertainty: Array.from(spread.uncertainty),
          lower: Array.from(spread.lower),
          upper: Array.from(spread.upper),
          interval: spread.interval,
        }
        : {}),
      description: "Mixed-layer temperature response, K, relative to the initial state",
    },
  };
  if (deep) {
    outputs.deep_temperature = {
      name: `two-box deep-ocean response to ${forcing.name}`,
      quantity: "temperature_anomaly",
      units: "K",
      time: Array.from(time),
      ...timeAxis,
      value: Array.from(deep),
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
        ? "defaults λ = 1.3 (Held et al. 2010, J. Climate 23, 2418, from memory) and C = 8.0 " +
          "(a mixed layer of about 60 m of sea water, common practice)"
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
    sinusoid_numerical: p.sinusoid ? measuredSinusoid(p.sinusoid, time, surface, analytic) : null,
    outputs,
    // present only with a forcing ensemble, so results without one keep their shape
    ...(spread && band
      ? {
        band,
        ensemble: {
          output: "temperature",
          realizations: forcing.ensemble!.realizations,
          seed: forcing.ensemble!.seed,
          units: "K",
          rounding: 1e-6,
          members: membersJson(spread.members, forcing.ensemble!.realizations, 1e-6),
        },
      }
      : {}),
    warnings: forcing.skipped > 0
      ? [
        `${forcing.skipped} forcing value(s) missing: the forcing is taken as linear across the gaps`,
      ]
      : [],
    cautions: [
      "An energy-balance model is a deliberately simple description of the climate system; " +
      "its response depends on the assumed heat capacity and feedback.",
      CAUTION_REVIEW,
      ...(band
        ? [
          bandCaution(band, "The response's uncertainty band") +
          " The heat capacity and feedback are taken as exact.",
        ]
        : []),
    ],
  };
}
