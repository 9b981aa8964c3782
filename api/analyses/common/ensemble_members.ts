/**
 * Ensemble members in results: the schema (members × points, rounded, null where the central
 * series has no value), the size limit that keeps JSON results bounded, and the conversions
 * from and to core's member-major Float64Array.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { CancelledError, InputProblem, type RunContext } from "../../runs/kind.ts";
import { inputProblem } from "./input_problem.ts";
import { ensembleSummary, normalQuantile } from "../../../core/stats/mod.ts";
import type { StopOptions } from "../../../core/stop_signal.ts";

/**
 * Most member values (members × points) a JSON result may hold: 1,000 members of an annual
 * 1700–2025 reconstruction (326,000) or of a monthly one (3.9 million, about 30 MB of JSON);
 * a daily 1700–2025 ensemble of 1,000 members would be 119 million values (950 MB as doubles)
 * and is refused: use monthly or annual cells, or fewer members.
 */
export const MAX_ENSEMBLE_VALUES = 4_000_000;

/** The ensemble part of a result. */
export const EnsembleSchema = z.object({
  output: z.string().openapi({
    description: "The output whose time axis the members share (its NetCDF download carries " +
      "them on a `realization` dimension)",
  }),
  realizations: z.number().int().openapi({ description: "Number of members" }),
  seed: z.number().int().openapi({
    description: "Seed of the draws: member m uses the random stream (seed, m)",
  }),
  units: z.string(),
  rounding: z.number().openapi({ description: "Member values are rounded to this step" }),
  members: z.array(z.array(z.number().nullable())).openapi({
    description: "members[m][i]: member m at point i of the output's time axis; null where " +
      "the central value is null",
  }),
}).openapi("EnsembleMembers");

/** The ensemble part as `compute` builds it. */
export type EnsembleJson = z.input<typeof EnsembleSchema>;

/**
 * Refuse an ensemble whose JSON would exceed {@link MAX_ENSEMBLE_VALUES}, naming the fields
 * that set its size.
 *
 * @param realizations requested members
 * @param points points per member
 * @param fields JSON Pointers of the fields that set the size, the first one reported
 * @throws {InputProblem} at `fields[0]` when realizations × points is above the limit
 */
export function checkEnsembleSize(realizations: number, points: number, fields: string[]): void {
  const values = realizations * points;
  if (values <= MAX_ENSEMBLE_VALUES) return;
  throw new InputProblem(
    fields[0],
    `${realizations} realizations × ${points} points = ${values} member values, more than the ` +
      `${MAX_ENSEMBLE_VALUES} a JSON result holds; ask for fewer realizations, a shorter ` +
      `period or coarser (monthly or annual) cells (set by ${fields.join(", ")})`,
    { reason: "ensemble_too_large", values, limit: MAX_ENSEMBLE_VALUES, fields },
  );
}

/** Members (count × n, member-major) as rounded JSON rows, null where not finite. */
export function membersJson(
  members: Float64Array,
  count: number,
  step: number,
): (number | null)[][] {
  const n = members.length / count, inv = 1 / step;
  const rows: (number | null)[][] = [];
  for (let m = 0; m < count; m++) {
    const row = new Array<number | null>(n);
    for (let i = 0; i < n; i++) {
      const v = members[m * n + i];
      row[i] = Number.isFinite(v) ? Math.round(v * inv) / inv : null;
    }
    rows.push(row);
  }
  return rows;
}

/** JSON rows back to a member-major Float64Array (null → NaN). */
export function membersFromJson(rows: readonly (readonly (number | null)[])[]): Float64Array {
  const count = rows.length, n = count ? rows[0].length : 0;
  const out = new Float64Array(count * n);
  rows.forEach((row, m) => {
    for (let i = 0; i < n; i++) out[m * n + i] = row[i] ?? NaN;
  });
  return out;
}

/**
 * The members of a stored result for output `name`, as the NetCDF writer streams them (one
 * member at a time, null → NaN); undefined when the result has no ensemble for that output.
 *
 * @param result a stored run result
 * @param name the output asked for
 */
export function ensembleSourceOf(
  result: unknown,
  name: string,
): { members: number; member(k: number): ArrayLike<number> } | undefined {
  // checked by shape rather than parsed with the schema: a stored result was validated when it
  // was made, and parsing millions of member values again would dominate a download
  const e = (result as { ensemble?: unknown } | null)?.ensemble as
    | { output?: unknown; realizations?: unknown; members?: unknown; outputs?: unknown }
    | null
    | undefined;
  if (e && e.outputs && typeof e.outputs === "object") return offsetSourceOf(result, name);
  if (!e || e.output !== name || !Array.isArray(e.members)) return undefined;
  const rows = e.members as unknown[];
  if (rows.length !== e.realizations || !rows.every(Array.isArray)) return undefined;
  return {
    members: rows.length,
    member: (k) => Float64Array.from(rows[k] as (number | null)[], (v) => v ?? NaN),
  };
}

/**
 * Members stored as integer offsets from an output's central values (`ensemble.outputs[name]`
 * = { step, offsets }, as a spectral reconstruction stores its integrals): member k at point i
 * is value[i] + offsets[k][i] × step.
 */
function offsetSourceOf(
  result: unknown,
  name: string,
): { members: number; member(k: number): ArrayLike<number> } | undefined {
  const r = result as {
    ensemble: { realizations?: unknown; outputs: Record<string, unknown> };
    outputs?: Record<string, { value?: unknown }>;
  };
  const m = r.ensemble.outputs[name] as { step?: unknown; offsets?: unknown } | undefined;
  const central = r.outputs?.[name]?.value;
  if (!m || typeof m.step !== "number" || !Array.isArray(m.offsets) || !Array.isArray(central)) {
    return undefined;
  }
  const rows = m.offsets as (number | null)[][], step = m.step;
  if (rows.length !== r.ensemble.realizations) return undefined;
  const c = central as (number | null)[];
  return {
    members: rows.length,
    member: (k) =>
      Float64Array.from(c, (v, i) => {
        const o = rows[k][i];
        return v === null || o === null ? NaN : v + o * step;
      }),
  };
}

/** Members from which the band is the members' quantiles; below, ± z × their SD. */
export const MIN_MEMBERS_FOR_QUANTILES = 100;

/** The band an ensemble gives around a central series (result of {@link memberBand}). */
export interface MemberBand {
  sd: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  method: "ensemble_quantiles" | "ensemble_sd";
  /** E.g. "95 % interval of 200 ensemble members". */
  interval: string;
}

/**
 * The band of an ensemble at `level`: the members' SD per point and, with at least
 * {@link MIN_MEMBERS_FOR_QUANTILES} members, their quantiles (R's type 7); with fewer, the
 * central value ± the normal quantile × their SD (a 2.5 % quantile of a few dozen members rests
 * on one or two of them).
 *
 * @param central the central series (NaN where missing)
 * @param members count × n, member-major
 * @param count members
 * @param level central interval @default 0.95
 * @param what how the members are named in `interval` @default "ensemble members"
 * @param options `shouldStop` (the run's `ctx.cancelled`), polled every 64 points
 */
export function memberBand(
  central: ArrayLike<number>,
  members: Float64Array,
  count: number,
  level = 0.95,
  what = "ensemble members",
  options: StopOptions = {},
): MemberBand {
  const s = ensembleSummary(members, count, level, options);
  const pct = level === 0.95 ? "95 %" : `${(level * 100).toFixed(1)} %`;
  if (count >= MIN_MEMBERS_FOR_QUANTILES) {
    return {
      sd: s.sd,
      lower: s.lower,
      upper: s.upper,
      method: "ensemble_quantiles",
      interval: `${pct} interval of ${count} ${what}`,
    };
  }
  const z = normalQuantile(1 - (1 - level) / 2);
  return {
    sd: s.sd,
    lower: Float64Array.from(central, (v, i) => v - z * s.sd[i]),
    upper: Float64Array.from(central, (v, i) => v + z * s.sd[i]),
    method: "ensemble_sd",
    interval: `${pct} interval (±${z.toFixed(2)} SD of ${count} ${what})`,
  };
}

/**
 * Refuse a stored ensemble whose members do not have one value per point of its output.
 *
 * @param e the stored ensemble
 * @param points the output's length
 * @param pointer request field that named the run
 * @param runId the run
 * @throws {InputProblem} at `pointer`
 */
export function checkStoredMembers(
  e: { realizations: number; members: readonly (readonly unknown[])[] },
  points: number,
  pointer: string,
  runId: string,
): void {
  if (e.members.length !== e.realizations || e.members.some((m) => m.length !== points)) {
    throw new InputProblem(
      pointer,
      `run ${runId} holds an ensemble whose members do not match its output's time axis`,
    );
  }
}

/**
 * Members per chunk: up to 8 chunks, so the pool is busy and progress moves between rounds.
 *
 * @param realizations the members of the ensemble (≥ 1)
 * @returns [first member, count] of each chunk, in order
 */
export function chunkSizes(realizations: number): [number, number][] {
  const per = Math.ceil(realizations / Math.min(8, realizations));
  const out: [number, number][] = [];
  for (let a = 0; a < realizations; a += per) out.push([a, Math.min(per, realizations - a)]);
  return out;
}

/**
 * Draw an ensemble's members in chunks on the worker pool (`ctx.parallel` of `task`), in
 * rounds of 4 chunks so that a cancel is seen between rounds, progress moving from 0.1 to 0.9.
 * A member's values depend only on its index (core draws member m from the stream (seed, m)),
 * so neither the chunking nor the number of workers changes a bit.
 *
 * @param ctx the run context (its pool, progress and cancel flag)
 * @param task the worker task drawing one chunk (its output: count × perMember values)
 * @param realizations members
 * @param perMember values per member
 * @param chunk the task's input for members first .. first + count − 1
 * @returns realizations × perMember values, member-major
 * @throws {InputProblem} at /model when a chunk fails for an input reason (e.g. a saturating
 *   mapping without an admissible draw: a property of the model run); {CancelledError}
 */
export async function drawMembersOnPool<C extends { first: number; count: number }>(
  ctx: RunContext,
  task: string,
  realizations: number,
  perMember: number,
  chunk: (first: number, count: number) => C,
): Promise<Float64Array> {
  const chunks = chunkSizes(realizations).map(([first, count]) => chunk(first, count));
  const members = new Float64Array(realizations * perMember);
  let done = 0;
  for (let c = 0; c < chunks.length; c += 4) {
    const round = chunks.slice(c, c + 4);
    let outs: Float64Array[];
    try {
      outs = await ctx.parallel<C, Float64Array>(task, round);
    } catch (e) {
      throw inputProblem(e, { "*": "/model" });
    }
    outs.forEach((o, j) => members.set(o, round[j].first * perMember));
    done += round.reduce((s, r) => s + r.count, 0);
    if (ctx.cancelled()) throw new CancelledError();
    ctx.progress(0.1 + (0.8 * done) / realizations);
  }
  return members;
}
