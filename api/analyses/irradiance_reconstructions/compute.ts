/**
 * Adapter of the "irradiance-reconstructions" analysis: the target cells of the period
 * (core/series), the proxies and sunspot numbers averaged into them, the back-extension
 * mappings, the reconstruction with prediction intervals
 * (core/irradiance/proxy_reconstruction.ts), the optional background scenario
 * (secular_background.ts), the plausibility checks, and the result.
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import { InputProblem } from "../../runs/kind.ts";
import {
  ERROR_SOURCES,
  type ErrorSource,
  predictionQuantile,
  reconstructedValues,
  reconstructFromProxies,
  type Reconstruction,
  reconstructionCoverage,
  secularBackground,
  SOURCE_BACK_EXTENDED,
  SOURCE_NONE,
  tsiCycleAmplitude,
  varianceByPeriod,
  withSecularBackground,
} from "../../../core/irradiance/mod.ts";
import { normalQuantile } from "../../../core/stats/distributions.ts";
import { parsePeriod } from "../common/time_period.ts";
import { withInputPointers } from "../common/input_problem.ts";
import {
  ASSESSMENT_CAUTION,
  PRE_SATELLITE_CAUTION,
  quietSunWarning,
} from "../common/irradiance_notes.ts";
import {
  cellMeans,
  coverageJson,
  coverageWarnings,
  directProxies,
  extrapolationWarnings,
  reconstructionCells,
  reconstructionModel,
  reconstructionOutputParts,
  type SunspotInput,
  sunspotInput,
  type TargetCells,
  targetCells,
} from "../common/reconstruction_inputs.ts";
import { cycleAmplitudeCheck } from "./amplitude_check.ts";
import { irradianceModels } from "../irradiance_models/mod.ts";
import type { ModelResultOut } from "../irradiance_models/result.ts";
import { cycleAmplitudeJson } from "../common/tsi_cycle_amplitude.ts";
import type { ReconstructionParams } from "./request.ts";
import type { ReconstructionResultIn } from "./result.ts";
import {
  checkEnsembleSize,
  type MemberBand,
  memberBand,
  membersJson,
  MIN_MEMBERS_FOR_QUANTILES,
} from "../common/ensemble_members.ts";
import {
  bandCaution,
  proxyReconstructionBand,
  type UncertaintyBand,
} from "../common/uncertainty_band.ts";
import { drawEnsemble } from "./ensemble.ts";

/** Most cells a reconstruction may have. */
const MAX_CELLS = 400_000;

/** Reconstruct TSI over the period from the model run and the proxies. */
export async function computeReconstruction(
  params: ReconstructionParams,
  ctx: RunContext,
): Promise<ReconstructionResultIn> {
  const stored = ctx.resultOf(irradianceModels, params.model, "/model");
  const cells = targetCells(params, MAX_CELLS);
  if (params.realizations > 0) {
    checkEnsembleSize(params.realizations, cells.keys.length, [
      "/realizations",
      "/period",
      "/resolution",
    ]);
  }
  const direct = directProxies(params, ctx, stored, cells);
  const sunspot = params.sunspot_number === undefined
    ? null
    : sunspotInput(params, ctx, stored, cells, `model run ${params.model}`);
  if (!direct.some((d) => d.some(Number.isFinite)) && !sunspot?.atCells.some(Number.isFinite)) {
    throw new InputProblem(
      "/period",
      `the period [${cells.span.start.toFixed(3)}, ${
        cells.span.end.toFixed(3)
      }) is outside the coverage of every proxy and of the sunspot series`,
      { reason: "no_overlap" },
    );
  }
  const z = predictionQuantile(params.level, stored.model.df_residual);
  const model = reconstructionModel(stored);
  const coreCells = reconstructionCells(stored, cells, direct, sunspot);
  const proxyOnly = withInputPointers(
    { mapping: "/model", covariance: "/model", "*": "/model" },
    () => reconstructFromProxies(model, coreCells, z),
  );
  const { rec, scenario, atCells } = background(params, stored, sunspot, cells, proxyOnly);
  const coverage = reconstructionCoverage(rec, cells.time);
  if (coverage.direct.cells + coverage.backExtended.cells === 0) {
    throw new InputProblem(
      "/period",
      "no cell of the period has every model proxy (directly or mapped from sunspot number)",
      { reason: "no_overlap" },
    );
  }
  ctx.progress(0.1);
  const ens = params.realizations > 0
    ? await drawEnsemble(ctx, model, coreCells, {
      realizations: params.realizations,
      seed: params.seed,
      background: atCells,
    })
    : null;
  const members = ens
    ? memberBand(rec.value, ens.members, ens.realizations, params.level, undefined, {
      shouldStop: ctx.cancelled,
    })
    : null;
  const band = reconstructionBand(params, rec, sunspot, scenario.kind !== "none");
  const amp = tsiCycleAmplitude(cells.time, rec.value);
  const check = cycleAmplitudeCheck(
    cells.time,
    proxyOnly.value,
    proxyOnly.source,
    amp,
    sunspot && {
      // values only: the yardstick's intervals are never used
      value: reconstructedValues(model, {
        days: cells.days,
        direct: direct.map(() => new Float64Array(cells.keys.length).fill(NaN)),
        mappings: coreCells.mappings,
        sunspot: sunspot.reference.atCells,
      }),
      conversion: sunspot.reference.conversion,
    },
    rec === proxyOnly,
  );
  const warnings = [
    ...(sunspot?.warnings ?? []),
    ...coverageWarnings(coverage.missing, cells, sunspot),
    ...extrapolationWarnings(stored, direct, sunspot, rec),
    ...check.warnings,
    ...quietSunWarning(stored.model.quiet_sun.value),
    ...(ens && ens.realizations < MIN_MEMBERS_FOR_QUANTILES
      ? [
        `The band rests on ${ens.realizations} members: it is ŷ ± ${
          normalQuantile(1 - (1 - params.level) / 2).toFixed(3)
        } × the members' SD; ask for 100 or more realizations for quantiles of the members.`,
      ]
      : []),
  ];
  return {
    model: params.model,
    resolution: cells.resolution,
    period: cells.span,
    level: params.level,
    interval_quantile: z,
    normal_quantile: normalQuantile(1 - (1 - params.level) / 2),
    scenario,
    sunspot_conversion: sunspot?.conversion ?? null,
    coverage: coverageJson(coverage),
    source_segments: coverage.segments,
    cycle_amplitude: cycleAmplitudeJson(amp),
    cycle_amplitude_check: check.json,
    outputs: { tsi: tsiOutput(params, cells, rec, scenario.label, members) },
    band,
    sunspot_uncertainty: sunspot?.errors.json ?? null,
    variance_by_period: varianceBlocks(params, cells, rec, members),
    error_model: errorModelJson(rec),
    ensemble: ens
      ? {
        output: "tsi",
        realizations: ens.realizations,
        seed: params.seed,
        units: "W m-2",
        rounding: MEMBER_ROUNDING,
        members: membersJson(ens.members, ens.realizations, MEMBER_ROUNDING),
      }
      : null,
    warnings,
    cautions: [
      ...RECONSTRUCTION_CAUTIONS,
      bandCaution(band),
      `Background scenario: ${scenario.label}`,
    ],
  };
}

/** Members are rounded to 0.1 mW m-2, far below any band width. */
const MEMBER_ROUNDING = 1e-4;

/** What the band is made of and what it leaves out. */
function reconstructionBand(
  params: ReconstructionParams,
  rec: Reconstruction,
  sunspot: SunspotInput | null,
  withScenario: boolean,
): UncertaintyBand {
  const back = rec.source.includes(SOURCE_BACK_EXTENDED);
  return proxyReconstructionBand(
    params.realizations,
    back,
    Boolean(sunspot?.errors.cells),
    MIN_MEMBERS_FOR_QUANTILES,
    [
      ...(back ? sunspot?.errors.notIncluded ?? [] : []),
      ...(withScenario
        ? ["the uncertainty of the secular background scenario (a labelled choice)"]
        : []),
    ],
  );
}

/** Mean variance by source over blocks of years, with the ensemble's beside it. */
function varianceBlocks(
  params: ReconstructionParams,
  cells: TargetCells,
  rec: Reconstruction,
  members: MemberBand | null,
): ReconstructionResultIn["variance_by_period"] {
  const src = rec.source;
  // plain loops: a typed array's map with a closure is several times slower on 10^5 cells
  const mask = (a: Float64Array, square: boolean) => {
    const out = new Float64Array(a.length);
    for (let i = 0; i < a.length; i++) {
      out[i] = src[i] === SOURCE_NONE ? NaN : square ? a[i] * a[i] : a[i];
    }
    return out;
  };
  const masked = Object.fromEntries(
    ERROR_SOURCES.map((s) => [s, mask(rec.components[s], false)]),
  ) as Record<ErrorSource, Float64Array>;
  const ensVar = members ? mask(members.sd, true) : null;
  return varianceByPeriod(cells.time, masked, params.variance_block_years, ensVar).map((b) => ({
    start: b.start,
    end: b.end,
    cells: b.cells,
    variance: b.variance,
    share: b.share,
    total: b.total,
    dominant: b.dominant,
    ensemble_variance: b.ensembleVariance,
  }));
}

/** The error model as stored: loadings rounded to 1e-9 W m-2, zero where a cell has no value. */
function errorModelJson(rec: Reconstruction): ReconstructionResultIn["error_model"] {
  const src = rec.source;
  const r9 = (a: Float64Array) => {
    const out = new Array<number>(a.length);
    for (let i = 0; i < a.length; i++) {
      out[i] = src[i] === SOURCE_NONE ? 0 : Math.round(a[i] * 1e9) / 1e9;
    }
    return out;
  };
  return {
    description: "e(t) = Σ_j loading_j(t)·z_j + Σ_p loading_p(t)·u_p(t): z_j independent " +
      "standard normals shared by all cells, u_p unit-variance processes with corr(u_p(t), " +
      "u_p(t − 1)) = lag1_p(t). Var(t) = Σ loading²; Cov(s, t) = Σ_j loading_j(s)loading_j(t) " +
      "+ Σ_p loading_p(s)loading_p(t)·Π lag1_p between s and t. First order (delta method).",
    factors: rec.errorModel.factors.map((f) => ({
      source: f.source,
      label: f.label,
      loading: r9(f.loading),
    })),
    processes: rec.errorModel.processes.map((p) => ({
      source: p.source,
      label: p.label,
      loading: r9(p.loading),
      lag1: Array.from(p.lag1),
    })),
  };
}

/** Cautions every reconstruction carries, before its background label. */
const RECONSTRUCTION_CAUTIONS = [
  PRE_SATELLITE_CAUTION,
  ASSESSMENT_CAUTION,
  "Intervals of monthly and annual means assume AR(1) residuals; residuals with longer memory (instrument drifts, slow facular changes) would make them wider.",
];

/** The reconstructed TSI as a series-like output, rounded to 1e-6 W m-2. */
function tsiOutput(
  params: ReconstructionParams,
  cells: TargetCells,
  rec: Reconstruction,
  scenarioLabel: string,
  members: MemberBand | null,
): ReconstructionResultIn["outputs"]["tsi"] {
  return {
    name: "Reconstructed TSI",
    quantity: "tsi",
    units: "W m-2",
    ...reconstructionOutputParts(cells, rec, params.level, members),
    description:
      `Model run ${params.model}, ${cells.resolution} means, values rounded to 1e-6 W m-2; ${scenarioLabel}`,
  };
}

type Scenario = ReconstructionResultIn["scenario"];

/** The optional secular background scenario, added to the reconstruction and labelled. */
function background(
  params: ReconstructionParams,
  stored: ModelResultOut,
  sunspot: SunspotInput | null,
  cells: TargetCells,
  rec: Reconstruction,
): { rec: Reconstruction; scenario: Scenario; atCells: Float64Array | null } {
  const bg = params.background;
  if (bg.kind === "none") {
    return {
      rec,
      atCells: null,
      scenario: {
        kind: "none",
        label:
          "No secular background: the reconstruction contains only the proxy-driven variability.",
      },
    };
  }
  if (!sunspot) {
    throw new InputProblem(
      "/background",
      "the sunspot_running_mean background needs a sunspot_number series",
      { reason: "needs_sunspot_number" },
    );
  }
  const referenceMinimum = parsePeriod(bg.reference_minimum, "/background/reference_minimum");
  const laterPeriod = parsePeriod(bg.later_period, "/background/later_period");
  const b = withInputPointers({
    referenceMinimum: "/background/reference_minimum",
    laterPeriod: "/background/later_period",
    windowYears: "/background/window_years",
    "*": "/background",
  }, () =>
    secularBackground(sunspot.series.time, sunspot.series.value, {
      windowYears: bg.window_years,
      referenceMinimum,
      laterPeriod,
      deltaTsi: bg.delta_tsi,
      calibrationPeriod: stored.model.calibration_period,
    }));
  const atCells = cellMeans(
    { time: sunspot.series.time, value: b.value },
    sunspot.resolution,
    cells,
  );
  return {
    rec: withSecularBackground(rec, atCells),
    atCells,
    scenario: {
      kind: "sunspot_running_mean",
      label:
        `SCENARIO: secular background proportional to the ${bg.window_years}-year running mean of sunspot number, ΔTSI = ${bg.delta_tsi} W m-2 from the reference minimum to the later period; the band does not include the (large) uncertainty of this choice`,
      scale: b.scale,
      reference_mean: b.referenceMean,
      later_mean: b.laterMean,
      calibration_mean: b.calibrationMean,
    },
  };
}
