/**
 * The ensemble of a spectral reconstruction in the service: members of every band drawn
 * jointly in chunks on the worker pool (core/irradiance/spectral_band_ensemble.ts; member m
 * always from the stream (seed, m), so the chunking and the number of workers do not change a
 * bit), and their compact form in a result: per band and member, the offsets from the band's
 * central value in integer steps.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { RunContext } from "../../runs/kind.ts";
import {
  type BandCorrelations,
  type ReconstructionCells,
  type ReconstructionModel,
  type SpectralBandEnsembleChunk,
  spectralBandEnsemblePlan,
} from "../../../core/irradiance/mod.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { drawMembersOnPool } from "../common/ensemble_members.ts";
import { SPECTRAL_ENSEMBLE_CHUNK } from "./tasks.ts";

/** Members of a drawn spectral ensemble. */
export interface DrawnSpectralEnsemble {
  /** realizations × cells × bands (member, cell, band), band units; NaN where no value. */
  members: Float64Array;
  realizations: number;
  bands: number;
  /** What the draw had to adjust in the model's correlations (empty when nothing). */
  adjusted: string[];
}

/**
 * Draw the members of every band on the pool (common/ensemble_members.ts `drawMembersOnPool`).
 *
 * @param ctx the run context (its pool, progress and cancel flag)
 * @param models per band, its model
 * @param cells the cells as the reconstruction used them
 * @param correlations the bands' residual correlations (null: independent bands)
 * @param options realizations and seed
 */
export async function drawSpectralEnsemble(
  ctx: RunContext,
  models: ReconstructionModel[],
  cells: ReconstructionCells,
  correlations: BandCorrelations | null,
  options: { realizations: number; seed: number },
): Promise<DrawnSpectralEnsemble> {
  const plan = withInputPointers(
    { "*": "/model" },
    () => spectralBandEnsemblePlan(models, cells, correlations),
  );
  const members = await drawMembersOnPool<SpectralBandEnsembleChunk>(
    ctx,
    SPECTRAL_ENSEMBLE_CHUNK,
    options.realizations,
    plan.cells * plan.bands,
    (first, count) => ({ plan, seed: options.seed, first, count }),
  );
  return {
    members,
    realizations: options.realizations,
    bands: plan.bands,
    adjusted: plan.adjusted,
  };
}

const Offsets = z.array(z.array(z.number().int().nullable()));

/** The members of one series stored as integer offsets from its central value. */
export const MemberOffsets = z.object({
  step: z.number().openapi({
    description: "Size of one offset step, in the series' units (a power of ten at least a " +
      "thousand times below the members' typical SD)",
  }),
  offsets: Offsets.openapi({
    description: "offsets[m][i]: member m at time i is central[i] + offsets[m][i] × step; " +
      "null where the central value is null",
  }),
}).openapi("MemberOffsets");

/** The ensemble part of a spectral reconstruction's result. */
export const SpectralEnsembleSchema = z.object({
  realizations: z.number().int().openapi({ description: "Number of members" }),
  seed: z.number().int().openapi({
    description: "Seed of the draws: member m uses the random stream (seed, m)",
  }),
  bands: z.array(MemberOffsets).openapi({
    description: "Per band of `spectrum` (same order), its members around `spectrum.value`",
  }),
  outputs: z.record(z.string(), MemberOffsets).openapi({
    description: "Per integral output (`integral`, `range_<lower>_<upper>`), its members " +
      "around `outputs[name].value` (W m-2): each member is the weighted sum of that member's " +
      "bands",
  }),
  adjusted: z.array(z.string()).openapi({
    description: "What the draw adjusted in the model's cross-band correlations to make them " +
      "usable (empty when nothing)",
  }),
}).openapi("SpectralEnsembleMembers");

/** The ensemble part as `compute` builds it. */
export type SpectralEnsembleJson = z.input<typeof SpectralEnsembleSchema>;
/** The stored members of one series. */
export type MemberOffsetsJson = z.input<typeof MemberOffsets>;

/**
 * Members (count × n, member-major) as integer offsets from the central series in steps of a
 * power of ten at least 1,000 times below the members' median SD (so a member is exact to
 * 0.1 % of the spread, in a few digits of JSON).
 *
 * @param central the central series as stored (null where missing)
 * @param members count × n, member-major
 * @param count members
 * @param sd the members' SD per point
 */
export function memberOffsets(
  central: readonly (number | null)[],
  members: Float64Array,
  count: number,
  sd: ArrayLike<number>,
): MemberOffsetsJson {
  const n = central.length;
  const spread = Array.from(sd).filter((v) => v > 0 && Number.isFinite(v)).sort((a, b) => a - b);
  const typical = spread.length ? spread[Math.floor(spread.length / 2)] : 1;
  const step = Number(`1e${Math.floor(Math.log10(typical)) - 3}`);
  const offsets: (number | null)[][] = [];
  for (let m = 0; m < count; m++) {
    const row = new Array<number | null>(n);
    for (let i = 0; i < n; i++) {
      const c = central[i], v = members[m * n + i];
      row[i] = c === null || !Number.isFinite(v) ? null : Math.round((v - c) / step);
    }
    offsets.push(row);
  }
  return { step, offsets };
}

/**
 * The members of one stored series back as values (null → NaN), one member at a time.
 *
 * @param central the central series as stored
 * @param m the stored offsets
 * @param k the member (0-based)
 */
export function memberValues(
  central: readonly (number | null)[],
  m: MemberOffsetsJson,
  k: number,
): Float64Array {
  const row = m.offsets[k];
  return Float64Array.from(central, (c, i) => {
    const o = row[i];
    return c === null || o === null ? NaN : c + o * m.step;
  });
}

/**
 * The members of a stored spectral result, as the NetCDF writer streams them (one member at a
 * time, every band, null → NaN); undefined when the result has none or they do not match its
 * spectrum.
 *
 * @param result a stored run result
 * @param spectrum its spectrum block (central values per band)
 */
export function spectrumEnsembleSourceOf(
  result: unknown,
  spectrum: { value: readonly (readonly (number | null)[])[] },
): { members: number; member(k: number): Float64Array[] } | undefined {
  // checked by shape rather than parsed with the schema: a stored result was validated when it
  // was made, and parsing millions of member values again would dominate a download
  const e = (result as { ensemble?: unknown } | null)?.ensemble as
    | { realizations?: unknown; bands?: unknown }
    | null
    | undefined;
  if (!e || !Array.isArray(e.bands) || e.bands.length !== spectrum.value.length) return undefined;
  const bands = e.bands as MemberOffsetsJson[];
  const N = e.realizations;
  if (typeof N !== "number" || !bands.every((b) => b.offsets?.length === N)) return undefined;
  return {
    members: N,
    member: (k) => bands.map((b, j) => memberValues(spectrum.value[j] as (number | null)[], b, k)),
  };
}
