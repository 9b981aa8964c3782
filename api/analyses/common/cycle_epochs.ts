/**
 * Epoch dates from a cycle table: the maxima or the starts (minima) of the cycles of a cycles
 * run, read through the cycles result schema, for the superposed-epoch analyses of a series and
 * of a field. Provisional maxima are left out.
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import { cyclesKind } from "../cycles/mod.ts";

/**
 * Decimal years of the cycle maxima (or starts, the minima) of a cycles run.
 *
 * @param ctx the run context (the run must be among the analysis' runRefs)
 * @param id the run id
 * @param which maxima or minima
 * @param pointer where the request names the run
 * @throws {InputProblem} at `pointer` when the run is not a cycles run of the current shape
 */
export function cycleEpochs(
  ctx: RunContext,
  id: string,
  which: "maximum" | "minimum",
  pointer: string,
): number[] {
  const table = ctx.resultOf(cyclesKind, id, pointer);
  const out: number[] = [];
  for (const c of table.cycles) {
    if (which === "minimum") out.push(c.start.decimal_year);
    else if (c.maximum && !c.maximum.provisional) out.push(c.maximum.decimal_year);
  }
  return out;
}
