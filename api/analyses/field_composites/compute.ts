/**
 * Adapter of the "field-composites" analysis: the epochs (dates, or a cycle table's extrema)
 * as time steps of the field, the composite map and its local t test per cell, field
 * significance by the false discovery rate and by Monte Carlo with random epoch sets chunked
 * over the workers (core/field/field_composite.ts), and the result with its map part.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import {
  combineFieldMonteCarlo,
  fieldAreaWeights,
  type FieldChunkTally,
  type FieldCompositeChunkInput,
  type FieldCompositePlan,
  fieldFalseDiscoveryRate,
  type FieldMonteCarloResult,
  type GriddedField,
  planFieldComposite,
} from "../../../core/field/mod.ts";
import { formatIsoTime, parseIsoTime } from "../../../core/time/mod.ts";
import { CAUTION_CORRELATION, CAUTION_REVIEW } from "../common/cautions.ts";
import { parallelInRounds } from "../common/parallel_rounds.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { cycleEpochs } from "../common/cycle_epochs.ts";
import { fieldResolution, griddedFieldOf } from "../common/field_axis.ts";
import { fdrPart, nullPart } from "../common/field_significance.ts";
import { CAUTION_MANY_CELLS, mapGrid, mapVariable } from "../common/map_result.ts";
import type { FieldCompositeParams } from "./request.ts";
import type { FieldCompositeResultIn } from "./result.ts";
import { FIELD_COMPOSITE_CHUNK } from "./tasks.ts";

/** Decimal years of a list of dates from the request. */
function readDates(dates: (string | number)[], pointer: string): number[] {
  return dates.map((d, k) => {
    if (typeof d === "number") return d;
    try {
      return parseIsoTime(d).decimalYear;
    } catch (e) {
      throw new InputProblem(`${pointer}/${k}`, (e as Error).message);
    }
  });
}

/** The two epoch sets of the request as decimal years (the second may be empty). */
function epochSets(p: FieldCompositeParams, ctx: RunContext): [number[], number[] | null] {
  if (p.cycle_run) {
    if (p.epoch_dates || p.contrast_dates) {
      throw new InputProblem("/cycle_run", "give epoch_dates (and contrast_dates) or cycle_run");
    }
    const other = p.cycle_epoch === "maximum" ? "minimum" : "maximum";
    return [
      cycleEpochs(ctx, p.cycle_run, p.cycle_epoch, "/cycle_run"),
      p.contrast ? cycleEpochs(ctx, p.cycle_run, other, "/cycle_run") : null,
    ];
  }
  if (!p.epoch_dates) throw new InputProblem("/epoch_dates", "give epoch_dates or a cycle_run");
  return [
    readDates(p.epoch_dates, "/epoch_dates"),
    p.contrast_dates ? readDates(p.contrast_dates, "/contrast_dates") : null,
  ];
}

/** Time steps of dates on the field's axis (nearest step); dates off the axis are returned. */
function stepsOf(dates: number[], time: Float64Array, step: number) {
  const inside: number[] = [], outside: number[] = [];
  for (const d of dates) {
    const k = Math.round((d - time[0]) / step);
    if (k < 0 || k >= time.length || Math.abs(time[k] - d) > step) outside.push(d);
    else inside.push(k);
  }
  return { inside: [...new Set(inside)], outside };
}

/** The random-epoch Monte Carlo test, as chunk tasks on the workers. */
async function monteCarlo(
  p: FieldCompositeParams,
  ctx: RunContext,
  plan: FieldCompositePlan,
): Promise<FieldMonteCarloResult> {
  // a fixed split for given parameters (the reducer adds integer tallies in a fixed order)
  const per = Math.min(500, Math.max(50, Math.ceil(p.random_sets / 8)));
  const tasks: FieldCompositeChunkInput[] = [];
  for (let r = 0; r < p.random_sets; r += per) {
    tasks.push({
      plan,
      replicateStart: r,
      replicateEnd: Math.min(p.random_sets, r + per),
      cellStart: 0,
      cellEnd: plan.cellCount,
    });
  }
  const tallies = await parallelInRounds<FieldCompositeChunkInput, FieldChunkTally>(
    ctx,
    FIELD_COMPOSITE_CHUNK,
    tasks,
    { round: 4, progress: [0.2, 0.95] },
  );
  return combineFieldMonteCarlo(plan, tallies);
}

/** Composite the field around the epochs, with field significance. */
export async function computeFieldComposite(
  p: FieldCompositeParams,
  ctx: RunContext,
): Promise<FieldCompositeResultIn> {
  const f = ctx.field(p.field);
  const resolution = fieldResolution(f, "/field");
  const step = resolution === "monthly" ? 1 / 12 : 1;
  const [first, second] = epochSets(p, ctx);
  const s1 = stepsOf(first, f.time, step);
  const s2 = second ? stepsOf(second, f.time, step) : null;
  const from = Math.round(p.from_years / step), to = Math.round(p.to_years / step) - 1;
  if (to < from) {
    throw new InputProblem("/to_years", "the window must end at least one step after from_years");
  }
  const field: GriddedField = griddedFieldOf(f);
  const weights = fieldAreaWeights(field);
  const seasonal = p.deseasonalise && resolution === "monthly";
  const epochsPointer = p.cycle_run ? "/cycle_run" : "/epoch_dates";
  const plan = withInputPointers({ "*": epochsPointer }, () =>
    planFieldComposite(field, weights, {
      epochs: s1.inside,
      ...(s2 ? { contrastEpochs: s2.inside } : {}),
      from,
      to,
      preprocess: { method: p.preprocess },
      seasonalPeriod: seasonal ? 12 : 0,
      seed: p.seed,
      replicates: Math.max(1, p.random_sets),
      alphaLocal: p.alpha_local,
      shouldStop: ctx.cancelled,
    }));
  ctx.progress(0.15);
  const obs = plan.observed;
  const fdr = fieldFalseDiscoveryRate(obs.p, weights, {
    alphaGlobal: p.alpha_global,
    factor: p.fdr_factor,
  });
  const mc = p.random_sets > 0 ? await monteCarlo(p, ctx, plan) : null;
  const iso = (t: number) => formatIsoTime(t, resolution);
  const offDates = [...s1.outside, ...(s2?.outside ?? [])].map(iso);
  const dropped = [...offDates, ...obs.dropped.map((k) => iso(f.time[k]))];
  const warnings = [...obs.warnings];
  if (offDates.length) {
    warnings.push(
      `${offDates.length} epoch(s) fall outside the field's time axis and are left out`,
    );
  }
  if (obs.used.length < 5) warnings.push(`only ${obs.used.length} epochs: the composite is noisy`);
  const analysed = obs.status.reduce((n, v) => n + (v === 0 ? 1 : 0), 0);
  const analysedOnly = (v: number, c: number) => (obs.status[c] === 0 ? v : NaN);
  const two = s2 !== null;
  return {
    field: {
      id: f.meta.id,
      name: f.meta.name,
      variable: f.meta.variable,
      units: f.meta.units,
      quantity: f.meta.quantity,
      calendar: f.meta.info.calendar,
      steps: [f.stepStart, f.stepStart + f.time.length],
    },
    resolution,
    offset_unit: resolution === "monthly" ? "months" : "years",
    window: { from, to },
    epochs_used: obs.used.map((k) => iso(f.time[k])),
    contrast_used: obs.contrastUsed.map((k) => iso(f.time[k])),
    epochs_dropped: dropped,
    statistic: two
      ? "difference of the window means of the two sets; Student's pooled two-sample t"
      : "mean of the window means; Student's one-sample t",
    df: obs.df,
    preprocess: p.preprocess,
    deseasonalised: seasonal,
    cells: { grid: obs.status.length, analysed, missing: obs.status.length - analysed },
    map: {
      grid: mapGrid(f),
      variables: [
        mapVariable(
          "composite",
          two ? "Composite difference (first set − second set)" : "Composite mean",
          f.meta.units,
          obs.composite,
        ),
        mapVariable("t", `t statistic with ${obs.df} degrees of freedom`, "1", obs.t),
        mapVariable("p", "Two-sided p of the local t test", "1", obs.p),
        mapVariable(
          "significant",
          `Significant by the false discovery rate (Benjamini–Hochberg at α_FDR = ${fdr.alphaFdr})`,
          "1",
          Float64Array.from(fdr.rejected, analysedOnly),
          "flag",
        ),
        ...(mc
          ? [
            mapVariable(
              "p_monte_carlo",
              "Monte Carlo p of the cell's |t| (random epochs)",
              "1",
              mc.cellP,
            ),
          ]
          : []),
        mapVariable(
          "cell_status",
          "0 analysed, 1 missing values",
          "1",
          Float64Array.from(obs.status),
          "int",
        ),
      ],
      primary: "composite",
      significant: "significant",
      significance_label:
        `significant: false discovery rate ≤ ${fdr.alphaFdr} (Benjamini–Hochberg)`,
    },
    field_significance: {
      fdr: fdrPart(
        fdr,
        "p of the local t test",
      ),
      monte_carlo: mc
        ? {
          random_sets: mc.replicates,
          seed: p.seed,
          alpha_local: p.alpha_local,
          method: "Livezey & Chen (1983) with random epoch sets (same counts, the observed " +
            "smallest spacing kept; Haurwitz & Brier 1981), the same set for every cell; " +
            "statistic: area-weighted fraction of cells with |t| at least the critical value",
          observed_fraction: mc.observedFraction[0],
          p_field: mc.pField,
          null: nullPart(mc.nullBest),
        }
        : null,
    },
    warnings: [...warnings, ...(mc?.warnings ?? [])],
    cautions: [CAUTION_MANY_CELLS, CAUTION_CORRELATION, CAUTION_REVIEW],
  };
}
