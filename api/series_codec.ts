/**
 * Turning normalised series (from uploads, inline requests and run outputs) into stored series
 * with their content id.
 *
 * @module
 */
import type { StoredSeries } from "./store/types.ts";
import type { OutputSeries } from "./runs/kind.ts";
import type { SeriesCodec } from "./runs/service.ts";
import { contentId, ingestJson, type NormalisedSeries } from "./ingest/mod.ts";
import { ProblemError } from "./problems.ts";
import { inferResolution } from "../core/time/mod.ts";
import { canonicalUnits, QUANTITIES, type Quantity } from "../core/series/quantities.ts";

/** A stored series (id, counts, span, creation time) from a normalised one. */
export async function storedFromNormalised(
  n: NormalisedSeries,
  derivedFrom: string | null,
): Promise<StoredSeries> {
  return {
    id: await contentId(n),
    name: n.name,
    quantity: n.quantity,
    units: n.units,
    description: n.description ?? null,
    source: n.source ?? null,
    version: n.version ?? null,
    resolution: n.resolution,
    n: n.time.length,
    start: n.time[0],
    end: n.time[n.time.length - 1],
    derived_from: derivedFrom,
    created_at: new Date().toISOString(),
    time: n.time,
    value: n.value,
    uncertainty: n.uncertainty ?? null,
  };
}

export const seriesCodec: SeriesCodec = {
  async fromInline(obj, pointer) {
    const outcome = ingestJson(obj);
    if (!outcome.ok) {
      throw new ProblemError(
        "validation",
        `The inline series at ${pointer || "/"} is not usable: ${outcome.errors[0].message}`,
        { errors: outcome.errors.map((e) => ({ ...e, pointer: pointer + e.pointer })) },
      );
    }
    return await storedFromNormalised(outcome.series, null);
  },

  async fromOutput(o: OutputSeries, runId: string) {
    if (o.time_axis && o.time_axis !== "decimal_year") {
      throw new ProblemError(
        "conflict",
        `Output "${o.name}" of run ${runId} has a ${
          o.time_axis.replace(/_/g, " ")
        } axis, not calendar time, and cannot be stored as a series`,
      );
    }
    const keep: number[] = [];
    for (let i = 0; i < o.time.length; i++) {
      const v = o.value[i];
      if (v !== null && v !== undefined && Number.isFinite(v)) keep.push(i);
    }
    if (keep.length < 2) {
      throw new ProblemError(
        "conflict",
        `Output "${o.name}" of run ${runId} has fewer than 2 defined points and cannot be stored as a series`,
      );
    }
    const time = Float64Array.from(keep, (i) => o.time[i]);
    const value = Float64Array.from(keep, (i) => o.value[i] as number);
    const unc = o.uncertainty && keep.every((i) => typeof o.uncertainty![i] === "number")
      ? Float64Array.from(keep, (i) => o.uncertainty![i] as number)
      : null;
    const quantity: Quantity = (QUANTITIES as readonly string[]).includes(o.quantity)
      ? o.quantity as Quantity
      : "other";
    const u = canonicalUnits(quantity, o.units);
    const n: NormalisedSeries = {
      name: o.name,
      quantity,
      units: u.ok ? u.units : o.units,
      description: (o.description ? o.description + " " : "") + `Derived from run ${runId}.`,
      source: `sunlag run ${runId}`,
      version: null,
      resolution: inferResolution(time),
      time,
      value,
      uncertainty: unc,
    };
    return await storedFromNormalised(n, runId);
  },
};
