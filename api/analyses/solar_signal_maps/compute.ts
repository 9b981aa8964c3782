/**
 * Adapter of the "solar-signal-maps" analysis: the field and the solar series (and controls)
 * on one calendar axis, the per-cell map from core (core/field/solar_signal_map.ts, blocks of
 * cells on the workers), field
 * significance by the false discovery rate (false_discovery_rate.ts) and by Monte Carlo with
 * the same phase surrogate of the solar series against every cell, chunked over the workers
 * (field_significance_monte_carlo.ts), and the result with its map part.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  assembleSolarSignalMap,
  CELL_ANALYSED,
  CELL_CONSTANT,
  CELL_MISSING,
  combineFieldMonteCarlo,
  type FieldAnalysisInputs,
  fieldAreaWeights,
  type FieldChunkTally,
  fieldFalseDiscoveryRate,
  type FieldMonteCarloResult,
  type FieldSignificanceChunkInput,
  fieldSignificanceTasks,
  type GriddedField,
  mapPredictorPart,
  planFieldSignificance,
  prepareFieldAnalysis,
  sliceFieldAnalysisInputs,
  type SolarSignalMap,
  type SolarSignalMapCells,
} from "../../../core/field/mod.ts";
import type { PreprocessOptions } from "../../../core/climate/mod.ts";
import { solarCautions } from "../common/cautions.ts";
import { parallelInRounds } from "../common/parallel_rounds.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { solarSeriesFromRun } from "../common/solar_series_from_run.ts";
import { fieldOnAxis } from "../common/field_axis.ts";
import { fdrPart, nullPart } from "../common/field_significance.ts";
import { CAUTION_MANY_CELLS, mapGrid, type MapPart, mapVariable } from "../common/map_result.ts";
import type { SolarSignalMapParams } from "./request.ts";
import type { SolarSignalMapResultIn } from "./result.ts";
import { FIELD_MAP_CELLS, FIELD_SIGNIFICANCE_CHUNK } from "./tasks.ts";

/** The predictor series of the request. */
export function predictorOf(p: SolarSignalMapParams, ctx: RunContext): StoredSeries {
  if ((p.solar === undefined) === (p.solar_run === undefined)) {
    throw new InputProblem(
      "/solar",
      "give exactly one of solar (a series) or solar_run (a run id)",
    );
  }
  return p.solar_run
    ? solarSeriesFromRun(ctx, p.solar_run, "/solar_run")
    : ctx.series(refId(p.solar!));
}

/** The units of a slope: field units per predictor unit (UDUNITS). */
export function slopeUnits(fieldUnits: string, predictorUnits: string): string {
  const pu = predictorUnits.trim();
  if (pu === "1" || pu === "") return fieldUnits;
  return `${fieldUnits}/(${pu})`;
}

/** The lag window on the common axis. */
function lagWindow(p: SolarSignalMapParams, n: number, resolution: "monthly" | "annual") {
  const maxLag = p.max_lag ?? (resolution === "monthly" ? 24 : 2);
  const minLag = p.min_lag;
  if (minLag > maxLag) {
    throw new InputProblem("/min_lag", `min_lag ${minLag} is larger than max_lag ${maxLag}`);
  }
  const big = Math.max(Math.abs(minLag), Math.abs(maxLag));
  if (3 * big > n) {
    throw new InputProblem(
      p.max_lag === undefined ? "/min_lag" : "/max_lag",
      `the lag window reaches ${big} steps, more than a third of the ${n} common periods ` +
        `(at most ${Math.floor(n / 3)})`,
    );
  }
  return { minLag, maxLag };
}

/** Everything prepared for the map: the aligned inputs and the core inputs. */
function prepare(p: SolarSignalMapParams, ctx: RunContext) {
  const solar = predictorOf(p, ctx);
  const controls = p.controls.map((c) => ctx.series(refId(c.series)));
  const on = fieldOnAxis(
    ctx.field(p.field),
    "/field",
    [solar, ...controls],
    [p.solar_run ? "/solar_run" : "/solar", ...p.controls.map((_, k) => `/controls/${k}/series`)],
    p,
    24,
  );
  const { axis } = on;
  const window = lagWindow(p, axis.time.length, axis.resolution);
  if (p.preprocess === "high_pass" && p.high_pass_cutoff_years === undefined) {
    throw new InputProblem("/high_pass_cutoff_years", "preprocess high_pass needs a cutoff");
  }
  const x = axis.values[0];
  if (x.every((v) => v === x[0])) {
    throw new InputProblem(
      p.solar_run ? "/solar_run" : "/solar",
      "the solar series is constant over the common period",
    );
  }
  const preprocess: PreprocessOptions = {
    method: p.preprocess,
    cutoffSamples: p.high_pass_cutoff_years === undefined
      ? undefined
      : p.high_pass_cutoff_years / axis.step,
  };
  const seasonal = p.deseasonalise && axis.resolution === "monthly";
  const inputs = withInputPointers(
    { "*": "/field", cutoffSamples: "/high_pass_cutoff_years" },
    () =>
      prepareFieldAnalysis(on.field, x, {
        ...window,
        preprocess,
        seasonalPeriod: seasonal ? 12 : 0,
        controls: p.controls.map((c, k) => ({ name: c.name, values: axis.values[k + 1] })),
        trendControl: p.trend_control,
        shouldStop: ctx.cancelled,
      }),
  );
  return { solar, on, inputs, seasonal };
}

/**
 * The map, its cells in blocks on the workers (at most 8 blocks of at least 256 cells); the
 * numbers do not depend on the split (assembleSolarSignalMap).
 */
async function mapOnWorkers(ctx: RunContext, inputs: FieldAnalysisInputs): Promise<SolarSignalMap> {
  withInputPointers({ "*": "/field" }, () => mapPredictorPart(inputs));
  const nc = inputs.cells.length;
  const blocks = Math.max(1, Math.min(8, Math.floor(nc / 256)));
  const size = Math.ceil(nc / blocks);
  const slices: FieldAnalysisInputs[] = [];
  for (let i = 0; i < nc; i += size) {
    slices.push(sliceFieldAnalysisInputs(inputs, i, Math.min(nc, i + size)));
  }
  const parts = await parallelInRounds<FieldAnalysisInputs, SolarSignalMapCells>(
    ctx,
    FIELD_MAP_CELLS,
    slices,
    { progress: [0.05, 0.15] },
  );
  return assembleSolarSignalMap(inputs, parts);
}

/** The Monte Carlo field significance, as chunk tasks on the workers (order-independent). */
async function monteCarlo(
  p: SolarSignalMapParams,
  ctx: RunContext,
  inputs: FieldAnalysisInputs,
  map: SolarSignalMap,
  weights: Float64Array,
): Promise<FieldMonteCarloResult> {
  const plan = withInputPointers(
    { "*": "/surrogates" },
    () =>
      planFieldSignificance(inputs, map, weights, {
        seed: p.seed,
        surrogates: p.surrogates,
        alphaLocal: p.alpha_local,
      }),
  );
  // A fixed split for given parameters: about 16 surrogate blocks, and cell blocks of at most
  // 2 million field values each (what one task carries). The reducer adds integer tallies, so
  // the answer does not depend on the split or on the number of workers.
  const surrogatesPerTask = Math.min(250, Math.max(25, Math.ceil(p.surrogates / 16)));
  const cellsPerTask = Math.max(1, Math.floor(2_000_000 / inputs.n));
  const tasks = fieldSignificanceTasks(plan, { surrogatesPerTask, cellsPerTask });
  const tallies = await parallelInRounds<FieldSignificanceChunkInput, FieldChunkTally>(
    ctx,
    FIELD_SIGNIFICANCE_CHUNK,
    tasks,
    { round: 4, progress: [0.2, 0.95] },
  );
  return combineFieldMonteCarlo(plan, tallies);
}

/** Area-weighted share of analysed cells with p ≤ α at each lag. */
function localFractions(
  map: SolarSignalMap,
  weights: Float64Array,
  alpha: number,
): number[] {
  const G = map.gridCells;
  return map.lags.map((_, j) => {
    let hit = 0, all = 0;
    for (let c = 0; c < G; c++) {
      if (map.status[c] !== CELL_ANALYSED) continue;
      all += weights[c];
      const pv = map.perLag.p[j * G + c];
      if (pv <= alpha) hit += weights[c];
    }
    return all > 0 ? hit / all : 0;
  });
}

/** The map part: best-lag statistics, FDR mask, Monte Carlo cell p, cell status. */
function mapPart(
  ctx: RunContext,
  p: SolarSignalMapParams,
  map: SolarSignalMap,
  fdrMask: Uint8Array,
  mc: FieldMonteCarloResult | null,
  units: { field: string; slope: string; lag: string },
): MapPart {
  const f = ctx.field(p.field);
  const b = map.best;
  const analysed = (v: number, c: number) => (map.status[c] === CELL_ANALYSED ? v : NaN);
  const sig = Float64Array.from(fdrMask, (v, c) => analysed(v, c));
  const status = Float64Array.from(map.status);
  const variables = [
    mapVariable("r", "Correlation with the solar series at the best lag", "1", b.r),
    mapVariable(
      "slope",
      "Regression slope on the solar series at the best lag",
      units.slope,
      b.slope,
    ),
    mapVariable("slope_se", "Standard error of the slope (OLS)", units.slope, b.slopeSe),
    mapVariable(
      "slope_se_effective",
      "Standard error of the slope with N_eff (consistent with p)",
      units.slope,
      b.slopeSeEffective,
    ),
    mapVariable("t", "t statistic with N_eff − 2 − q degrees of freedom", "1", b.t),
    mapVariable("p", "Two-sided analytic p at the best lag", "1", b.p),
    mapVariable(
      "p_bonferroni",
      "min(1, L·p): p with the lag search paid for",
      "1",
      b.pBestBonferroni,
    ),
    mapVariable("n_eff", "Effective sample size (Bretherton et al. 1999)", "1", b.nEff),
    mapVariable("r1_field", "Lag-1 autocorrelation of the cell's series", "1", b.r1Field),
    mapVariable(
      "best_lag",
      "Lag of the largest |r| (k > 0: the field follows)",
      units.lag,
      b.lag,
      "int",
    ),
    mapVariable(
      "significant",
      `Significant by the false discovery rate (Benjamini–Hochberg at α_FDR = ${
        p.fdr_factor * p.alpha_global
      } on p_bonferroni)`,
      "1",
      sig,
      "flag",
    ),
    ...(mc
      ? [mapVariable(
        "p_monte_carlo",
        "Monte Carlo p of the cell's best-lag |r| (lag search paid for)",
        "1",
        mc.cellP,
      )]
      : []),
    mapVariable(
      "cell_status",
      "0 analysed, 1 missing values in the period, 2 constant after preprocessing",
      "1",
      status,
      "int",
    ),
  ];
  return {
    grid: mapGrid(f),
    variables,
    primary: "slope",
    significant: "significant",
    significance_label: `significant: false discovery rate ≤ ${
      p.fdr_factor * p.alpha_global
    } (Benjamini–Hochberg)`,
  };
}

/** Which significance to read, in words. */
function trustText(p: SolarSignalMapParams, mc: FieldMonteCarloResult | null): string {
  return "Read the map through its field significance, not cell by cell. The false discovery " +
    `rate mask (α_FDR = ${p.fdr_factor} × ${p.alpha_global}, after Wilks 2016) keeps the ` +
    "expected share of false discoveries among the marked cells at most α_FDR, using each " +
    "cell's p with the lag search paid for (Bonferroni over the lags); its analytic p rests on " +
    "AR(1)-like series, which is optimistic for a quasi-periodic solar series. " +
    (mc
      ? "The Monte Carlo test (Livezey & Chen 1983) keeps the solar series' whole spectrum and " +
        "the field's spatial correlation, and pays for the lag search: its p_field is the " +
        "answer to 'is the map as a whole more than chance?'."
      : "No Monte Carlo test was run (surrogates: 0): the analytic tests alone can overstate " +
        "significance for a quasi-periodic predictor.");
}

/** Map the solar signal over the field. */
export async function computeSolarSignalMap(
  p: SolarSignalMapParams,
  ctx: RunContext,
): Promise<SolarSignalMapResultIn> {
  const { solar, on, inputs, seasonal } = prepare(p, ctx);
  const f = ctx.field(p.field);
  ctx.progress(0.05);
  const map = await mapOnWorkers(ctx, inputs);
  ctx.progress(0.15);
  const field: GriddedField = on.field;
  const weights = fieldAreaWeights(field);
  const fdr = fieldFalseDiscoveryRate(map.best.pBestBonferroni, weights, {
    alphaGlobal: p.alpha_global,
    factor: p.fdr_factor,
  });
  const mc = p.surrogates > 0 ? await monteCarlo(p, ctx, inputs, map, weights) : null;
  ctx.progress(0.97);
  const { axis } = on;
  const units = {
    field: f.meta.units,
    slope: slopeUnits(f.meta.units, solar.units),
    lag: axis.lagUnit,
  };
  const count = (s: number) => map.status.reduce((n, v) => n + (v === s ? 1 : 0), 0);
  const fractions = localFractions(map, weights, p.alpha_local);
  const G = map.gridCells;
  const nulls = (a: Float64Array) => Array.from(a, (v) => (Number.isFinite(v) ? v : null));
  return {
    field: {
      id: f.meta.id,
      name: f.meta.name,
      variable: f.meta.variable,
      units: f.meta.units,
      quantity: f.meta.quantity,
      calendar: f.meta.info.calendar,
      steps: on.steps,
    },
    predictor: { id: solar.id, name: solar.name, quantity: solar.quantity, units: solar.units },
    controls: inputs.controlNames,
    resolution: axis.resolution,
    lag_unit: axis.lagUnit,
    sign_convention: `lag k > 0: the field follows (lags) the solar series by k ${axis.lagUnit}`,
    n: axis.time.length,
    start_period: axis.start_period,
    end_period: axis.end_period,
    preprocess: p.preprocess,
    high_pass_cutoff_years: p.high_pass_cutoff_years ?? null,
    deseasonalised: seasonal,
    slope_units: units.slope,
    cells: {
      grid: G,
      analysed: count(CELL_ANALYSED),
      missing: count(CELL_MISSING),
      constant: count(CELL_CONSTANT),
    },
    lags: map.lags.map((lag, j) => ({
      lag,
      n: map.n[j],
      r1_predictor: map.r1Predictor[j],
      area_fraction_local: fractions[j],
      p_monte_carlo: mc ? mc.pPerLag[j] : null,
    })),
    map: mapPart(ctx, p, map, fdr.rejected, mc, units),
    lag_maps: p.keep_lag_maps
      ? {
        lags: map.lags,
        r: map.lags.map((_, j) => nulls(map.perLag.r.subarray(j * G, (j + 1) * G))),
        p: map.lags.map((_, j) => nulls(map.perLag.p.subarray(j * G, (j + 1) * G))),
      }
      : null,
    field_significance: {
      fdr: fdrPart(
        fdr,
        "p_bonferroni: the best lag's analytic p times the number of lags (at most 1)",
      ),
      monte_carlo: mc
        ? {
          surrogates: mc.replicates,
          seed: p.seed,
          alpha_local: p.alpha_local,
          method: "Livezey & Chen (1983): the same phase-randomised surrogate of the solar " +
            "series (Ebisuzaki 1997) against every cell; statistic: area-weighted fraction of " +
            "cells with |t| at least the two-sided critical value at alpha_local",
          observed_fraction: mc.observedFraction,
          observed_best: mc.observedBest,
          best_lag: map.lags[mc.observedBestIndex],
          p_field: mc.pField,
          null_best: nullPart(mc.nullBest),
        }
        : null,
    },
    which_to_trust: trustText(p, mc),
    warnings: [...axis.warnings, ...map.warnings, ...(mc?.warnings ?? [])],
    cautions: [CAUTION_MANY_CELLS, ...solarCautions([solar])],
  };
}
