/**
 * Inherited context: a run carries the warnings and cautions of every run it is built on, so
 * that what held for a reconstruction ("model-dependent before 1978", "no secular background",
 * an amplitude warning) still reaches the forcing file a climate model reads, and the response
 * computed from it.
 *
 * The runs a run is built on are its input runs and the runs that made its input series (a
 * series saved from a run output names that run in `derived_from`), recursively. Their texts
 * are gathered once, by the run machinery, after `compute` (no analysis does it itself), and
 * stored in the result as `inherited`: which run, which kind, which level, which text. Each
 * text appears once (attributed to the nearest run that carries it, in breadth-first order of
 * the lineage), and a text the run states itself is not repeated. A run built on nothing, or
 * on runs without warnings or cautions, has no `inherited` part, so its result and digest are
 * those of a run made before this part existed.
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import { runLabel } from "./label.ts";

/** One warning or caution of a run this run is built on. */
export interface InheritedNote {
  /** Id of the run the text comes from. */
  run: string;
  /** Its analysis (run kind). */
  kind: string;
  level: "warning" | "caution";
  text: string;
}

/** Where the lineage of a run is looked up (the store, or the runs and series of a bundle). */
export interface Lineage {
  /** A run by id, or null when it is not available. */
  run(id: string): Promise<RunRecord | null>;
  /** The run a series was derived from (its `derived_from`), or null. */
  seriesOrigin(id: string): Promise<string | null>;
}

/** The strings of an array field (warnings, cautions), ignoring anything else. */
function strings(v: unknown): string[] {
  return Array.isArray(v) ? v.filter((x): x is string => typeof x === "string") : [];
}

/** At most this many runs of a lineage are visited (a guard, far above real lineages). */
const MAX_RUNS = 500;

/** The inherited notes stored in a result, read defensively (anything malformed is skipped). */
export function inheritedOf(result: unknown): InheritedNote[] {
  const list = (result as { inherited?: unknown } | null)?.inherited;
  if (!Array.isArray(list)) return [];
  return list.filter((n): n is InheritedNote =>
    n !== null && typeof n === "object" && typeof n.run === "string" &&
    typeof n.kind === "string" && (n.level === "warning" || n.level === "caution") &&
    typeof n.text === "string"
  );
}

/** "irradiance-reconstructions run 7e8f9a0b": where an inherited text comes from, in words. */
export function inheritedSource(n: InheritedNote): string {
  return `${n.kind} run ${runLabel(n.run)}`;
}

/**
 * A result's warnings and cautions as lines for metadata (CSV `#` lines, NetCDF attributes):
 * its own, then the inherited ones, each prefixed with the run it comes from.
 */
export function noteLinesOf(result: unknown): { warnings: string[]; cautions: string[] } {
  const r = (result ?? {}) as Record<string, unknown>;
  const inherited = inheritedOf(r);
  const from = (level: InheritedNote["level"]) =>
    inherited.filter((n) => n.level === level).map((n) =>
      `(from ${inheritedSource(n)}, ${n.run}) ${n.text}`
    );
  return {
    warnings: [...strings(r.warnings), ...from("warning")],
    cautions: [...strings(r.cautions), ...from("caution")],
  };
}

/**
 * The warnings and cautions of the runs a run is built on.
 *
 * @param inputs the run's loaded input runs (by id) and input series (by id, with lineage)
 * @param lineage where runs further up the lineage are found
 * @returns the notes, nearest runs first, each text once
 */
export async function gatherInherited(
  inputs: {
    runs: Record<string, RunRecord>;
    series: Record<string, { derived_from: string | null }>;
  },
  lineage: Lineage,
): Promise<InheritedNote[]> {
  const queue: string[] = Object.keys(inputs.runs).sort();
  for (const id of Object.keys(inputs.series).sort()) {
    const from = inputs.series[id].derived_from;
    if (from) queue.push(from);
  }
  const visited = new Set<string>();
  const out: InheritedNote[] = [];
  while (queue.length && visited.size < MAX_RUNS) {
    const id = queue.shift()!;
    if (visited.has(id)) continue;
    visited.add(id);
    const r = inputs.runs[id] ?? await lineage.run(id);
    if (!r || !r.result) continue;
    const own = (level: InheritedNote["level"], texts: string[]) =>
      texts.map((text) => ({ run: r.id, kind: r.kind, level, text }));
    out.push(
      ...own("warning", strings(r.result.warnings)),
      ...own("caution", strings(r.result.cautions)),
      ...inheritedOf(r.result),
    );
    queue.push(...r.input_runs);
    for (const sid of r.input_series) {
      const from = await lineage.seriesOrigin(sid);
      if (from) queue.push(from);
    }
  }
  return out;
}

/**
 * The result with its `inherited` part: the notes minus those whose text the result states
 * itself, each text once. Without any note left the result is returned unchanged.
 */
export function withInherited<T extends Record<string, unknown>>(
  result: T,
  notes: InheritedNote[],
): T & { inherited?: InheritedNote[] } {
  const seen = new Set([...strings(result.warnings), ...strings(result.cautions)]);
  const kept: InheritedNote[] = [];
  for (const n of notes) {
    if (seen.has(n.text)) continue;
    seen.add(n.text);
    kept.push({ run: n.run, kind: n.kind, level: n.level, text: n.text });
  }
  return kept.length ? { ...result, inherited: kept } : result;
}
