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
  predictionQuantile,
  reconstructFromProxies,
  type Reconstruction,
  reconstructionCoverage,
  secularBackground,
  tsiCycleAmplitude,
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
  mappedProxies,
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

/** Most cells a reconstruction may have. */
const MAX_CELLS = 400_000;

/** Reconstruct TSI over the period from the model run and the proxies. */
export function computeReconstruction(
  params: ReconstructionParams,
  ctx: RunContext,
): ReconstructionResultIn {
  const stored = ctx.resultOf(irradianceModels, params.model, "/model");
  const cells = targetCells(params, MAX_CELLS);
  const direct = directProxies(params, ctx, stored, cells);
  const sunspot = params.sunspot_number === undefined
    ? null
    : sunspotInput(params, ctx, stored, cells, `model run ${params.model}`);
  const mapped = mappedProxies(stored, sunspot?.atCells ?? null, cells.keys.length);
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
  const proxyOnly = reconstructFromProxies(
    reconstructionModel(stored),
    { days: cells.days, direct, mapped },
    z,
  );
  const { rec, scenario } = background(params, stored, sunspot, cells, proxyOnly);
  const coverage = reconstructionCoverage(rec, cells.time);
  if (coverage.direct.cells + coverage.backExtended.cells === 0) {
    throw new InputProblem(
      "/period",
      "no cell of the period has every model proxy (directly or mapped from sunspot number)",
      { reason: "no_overlap" },
    );
  }
  const amp = tsiCycleAmplitude(cells.time, rec.value);
  const check = cycleAmplitudeCheck(
    cells.time,
    proxyOnly.value,
    proxyOnly.source,
    amp,
    sunspot && {
      value: reconstructFromProxies(reconstructionModel(stored), {
        days: cells.days,
        direct: direct.map(() => new Float64Array(cells.keys.length).fill(NaN)),
        mapped: mappedProxies(stored, sunspot.reference.atCells, cells.keys.length),
      }, z).value,
      conversion: sunspot.reference.conversion,
    },
  );
  const warnings = [
    ...(sunspot?.warnings ?? []),
    ...coverageWarnings(coverage.missing, cells, sunspot),
    ...extrapolationWarnings(stored, direct, sunspot, rec),
    ...check.warnings,
    ...quietSunWarning(stored.model.quiet_sun.value),
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
    outputs: { tsi: tsiOutput(params, cells, rec, scenario.label) },
    warnings,
    cautions: [...RECONSTRUCTION_CAUTIONS, `Background scenario: ${scenario.label}`],
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
): ReconstructionResultIn["outputs"]["tsi"] {
  return {
    name: "Reconstructed TSI",
    quantity: "tsi",
    units: "W m-2",
    ...reconstructionOutputParts(cells, rec, params.level),
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
): { rec: Reconstruction; scenario: Scenario } {
  const bg = params.background;
  if (bg.kind === "none") {
    return {
      rec,
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
