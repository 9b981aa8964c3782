/**
 * The seasonal cycle in the solar–climate analyses (lag correlations, attributions,
 * composites): the `deseasonalise` request field, removing each calendar month's mean over the
 * analysed overlap (core/series/anomalies_from_base_period.ts), measuring how strong the annual
 * cycle of every input is (core/series/annual_cycle_share.ts), and what the result says about
 * both.
 *
 * An annual cycle left in a monthly climate series is a known confounder: it dominates the
 * correlations, and phase surrogates of a solar series (which has no annual cycle) test against
 * a null that ignores it, so a Monte Carlo p-value can come out tiny for an r near zero.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputError } from "../../../core/errors.ts";
import {
  annualCycleShare,
  anomaliesFromBasePeriod,
  STRONG_ANNUAL_CYCLE_SHARE,
} from "../../../core/series/mod.ts";
import { InputProblem } from "../../runs/kind.ts";

/** Quantities that are absolute values with a seasonal cycle: deseasonalised by default. */
export const SEASONAL_QUANTITIES: readonly string[] = ["temperature"];

/** Calendar-month values a climatology needs in the analysed overlap. */
export const MIN_YEARS_PER_MONTH = 2;

/** The `deseasonalise` request field. */
export const DeseasonaliseField = z.boolean().optional().openapi({
  description: "Monthly axis only: subtract from every input the mean of each calendar month " +
    "over the analysed overlap (its monthly climatology) before anything else. Default: on " +
    "when an input is an absolute quantity with a seasonal cycle (`temperature`, not " +
    "`temperature_anomaly`), else off. A calendar month's mean uses the values present for it " +
    `(a month missing in some years is averaged over the others) and needs at least ` +
    `${MIN_YEARS_PER_MONTH} of them. Ignored on an annual axis.`,
  example: true,
});

/** What the result says about the seasonal cycle. */
export const SeasonalCycleSchema = z.object({
  deseasonalise: z.boolean().openapi({
    description: "Whether each calendar month's mean over the overlap was removed",
  }),
  reason: z.string().openapi({ description: "Why (requested, or the default rule)" }),
  rule: z.string().openapi({ description: "How the annual cycle was measured and removed" }),
  strong_share: z.number().openapi({
    description: "Share of variance at or above which an annual cycle counts as strong (it " +
      "must also exceed what chance gives: see `rule`)",
  }),
  series: z.array(z.object({
    input: z.string().openapi({ description: "Which input (`solar`, `climate`, a name)" }),
    name: z.string(),
    quantity: z.string(),
    share: z.number().nullable().openapi({
      description: "η²: share of the input's variance on the axis explained by its 12 " +
        "calendar-month means, before removal; null on an annual axis",
    }),
    threshold: z.number().nullable().openapi({
      description: "The share that counts as strong for this many values; null on an " +
        "annual axis",
    }),
    strong: z.boolean(),
    removed: z.boolean().openapi({ description: "Whether its monthly climatology was removed" }),
    climatology: z.array(z.number()).nullable().openapi({
      description: "The 12 calendar-month means removed (January first), in the input's " +
        "units; null when not removed",
    }),
  })),
}).openapi("SeasonalCycle");

export type SeasonalCycleJson = z.input<typeof SeasonalCycleSchema>;

/** One input of the analysis on the axis. */
export interface SeasonalInput {
  /** `solar`, `climate`, or a regressor's name. */
  input: string;
  name: string;
  quantity: string;
}

/** The inputs after the seasonal step, and what the result says about it. */
export interface SeasonalAdjustment {
  /** Values on the axis, deseasonalised when `json.deseasonalise`. */
  values: Float64Array[];
  json: SeasonalCycleJson;
  warnings: string[];
}

const RULE = "η² = the share of a series' variance explained by its 12 calendar-month means " +
  "(one-way analysis of variance); an annual cycle is strong when η² ≥ " +
  `${STRONG_ANNUAL_CYCLE_SHARE} and above the mean + 3 SD of η² for independent values ` +
  "without one (Beta((k − 1)/2, (n − k)/2)). Removal subtracts each calendar month's mean " +
  `over the analysed overlap, from the values present (at least ${MIN_YEARS_PER_MONTH} per ` +
  "month).";

const pct = (x: number) => `${(100 * x).toFixed(x < 0.1 ? 1 : 0)} %`;

/**
 * Measure the annual cycle of every input on a monthly axis and, when requested or by default,
 * remove each input's monthly climatology over the axis.
 *
 * @param resolution the axis' resolution (nothing is done on an annual axis)
 * @param time period middles of the axis, decimal years
 * @param values one array per input on the axis (NaN for a gap)
 * @param inputs what each array is
 * @param requested the request's `deseasonalise` (undefined: the default rule)
 * @param pointer the field's JSON Pointer, for problems
 * @throws {InputProblem} at `pointer` when a calendar month has too few values for its mean
 */
export function seasonalAdjustment(
  resolution: "monthly" | "annual",
  time: Float64Array,
  values: Float64Array[],
  inputs: SeasonalInput[],
  requested: boolean | undefined,
  pointer = "/deseasonalise",
): SeasonalAdjustment {
  if (resolution === "annual") {
    return {
      values,
      json: {
        deseasonalise: false,
        reason: "annual axis: annual means carry no seasonal cycle",
        rule: RULE,
        strong_share: STRONG_ANNUAL_CYCLE_SHARE,
        series: inputs.map((s) => ({
          ...s,
          share: null,
          threshold: null,
          strong: false,
          removed: false,
          climatology: null,
        })),
      },
      warnings: [],
    };
  }
  const absolute = inputs.filter((s) => SEASONAL_QUANTITIES.includes(s.quantity));
  const on = requested ?? absolute.length > 0;
  const reason = requested !== undefined
    ? `requested (deseasonalise: ${requested})`
    : on
    ? `default: ${absolute.map((s) => `${s.input} is ${s.quantity}`).join(", ")}, an ` +
      "absolute quantity with a seasonal cycle, on a monthly axis"
    : "default: no input is an absolute quantity with a seasonal cycle (" +
      SEASONAL_QUANTITIES.join(", ") + ")";
  const warnings: string[] = [];
  const series: SeasonalCycleJson["series"] = [];
  const out = values.map((v, k) => {
    const share = shareOf(time, v);
    const removed = on ? removeClimatology(time, v, pointer, inputs[k].name) : null;
    series.push({
      ...inputs[k],
      share: share?.share ?? null,
      threshold: share?.threshold ?? null,
      strong: share?.strong ?? false,
      removed: removed !== null,
      climatology: removed ? Array.from(removed.climatology) : null,
    });
    if (share?.strong) {
      const what = `${inputs[k].input} series "${inputs[k].name}" has a strong annual cycle: ` +
        `its 12 calendar-month means explain ${pct(share.share)} of its variance (strong from ` +
        `${pct(share.threshold)})`;
      warnings.push(
        removed
          ? `${what}; each calendar month's mean over the overlap was removed before the analysis.`
          : `${what} and it was NOT removed (deseasonalise false): it dominates the ` +
            "analysis, and no p-value of this result can be trusted (the tests' null " +
            "distributions leave the annual cycle out). Set deseasonalise to true.",
      );
    }
    return removed ? removed.value : v;
  });
  return {
    values: out,
    json: {
      deseasonalise: on,
      reason,
      rule: RULE,
      strong_share: STRONG_ANNUAL_CYCLE_SHARE,
      series,
    },
    warnings,
  };
}

/**
 * {@link seasonalAdjustment} on a common analysis axis: the same axis with the adjusted values.
 *
 * @param axis the axis (its resolution, period middles and one value array per input)
 * @param inputs what each value array is
 * @param requested the request's `deseasonalise`
 */
export function seasonalAxis<
  A extends { resolution: "monthly" | "annual"; time: Float64Array; values: Float64Array[] },
>(axis: A, inputs: SeasonalInput[], requested: boolean | undefined) {
  const seasonal = seasonalAdjustment(axis.resolution, axis.time, axis.values, inputs, requested);
  return { axis: { ...axis, values: seasonal.values } as A, seasonal };
}

/**
 * The inputs that still carry a strong annual cycle as analysed (after the seasonal step and
 * any preprocessing), by their `input` label; empty on an annual axis.
 */
export function annualCycleLeft(
  resolution: "monthly" | "annual",
  time: Float64Array,
  values: Float64Array[],
  inputs: SeasonalInput[],
): string[] {
  if (resolution === "annual") return [];
  return inputs.flatMap((s, k) => (shareOf(time, values[k])?.strong ? [s.input] : []));
}

/** The quantity of a deseasonalised series: an absolute temperature becomes an anomaly. */
export function deseasonalisedQuantity(quantity: string, deseasonalised: boolean): string {
  return deseasonalised && quantity === "temperature" ? "temperature_anomaly" : quantity;
}

function shareOf(time: Float64Array, v: Float64Array) {
  try {
    return annualCycleShare({ time, value: v });
  } catch (e) {
    // too few values to say anything about an annual cycle: nothing to report
    if (e instanceof InputError && e.reason === "too_few_points") return null;
    throw e;
  }
}

/** v minus its monthly climatology over the axis (NaN gaps kept), and the climatology. */
function removeClimatology(time: Float64Array, v: Float64Array, pointer: string, name: string) {
  const keep: number[] = [];
  for (let i = 0; i < v.length; i++) if (Number.isFinite(v[i])) keep.push(i);
  const t = keep.map((i) => time[i]);
  let a;
  try {
    a = anomaliesFromBasePeriod(
      { time: t, value: keep.map((i) => v[i]) },
      { start: time[0] - 1, end: time[time.length - 1] + 1 },
      { climatology: "monthly", minCount: MIN_YEARS_PER_MONTH },
    );
  } catch (e) {
    if (!(e instanceof InputError) || e.field !== "base") throw e;
    throw new InputProblem(
      pointer,
      `cannot remove the monthly climatology of "${name}": each calendar month needs at ` +
        `least ${MIN_YEARS_PER_MONTH} values in the analysed overlap (${e.message}); use a ` +
        "longer overlap or set deseasonalise to false",
      { reason: e.reason, months: e.value },
    );
  }
  const value = new Float64Array(v.length).fill(NaN);
  keep.forEach((i, j) => (value[i] = a.value[j]));
  return { value, climatology: a.baseMeans };
}
