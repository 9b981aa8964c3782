/**
 * Epoch dates from a cycle table: the maxima or the starts (minima) of the cycles of a run
 * that holds one (the cycles analysis), for the superposed-epoch analyses of a series and of
 * a field. Provisional extrema are left out.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem, type RunContext } from "../../runs/kind.ts";

/** A point of a cycle table (a cycle's start or maximum); anything else reads as absent. */
const CyclePoint = z.object({ decimal_year: z.number(), provisional: z.boolean().optional() })
  .nullish().catch(null);

/** The part of a result holding a cycle table, as the cycles analysis stores it. */
const CycleTable = z.object({
  cycles: z.array(z.object({ start: CyclePoint, maximum: CyclePoint }).catch({})),
});

/**
 * Decimal years of the cycle maxima (or starts, the minima) of a run with a cycle table.
 *
 * @param ctx the run context (the run must be among the analysis' runRefs)
 * @param id the run id
 * @param which maxima or minima
 * @param pointer where the request names the run
 * @throws {InputProblem} at `pointer` when the run holds no cycle table
 */
export function cycleEpochs(
  ctx: RunContext,
  id: string,
  which: "maximum" | "minimum",
  pointer: string,
): number[] {
  // The cycles analysis does not publish its result schema yet: the table is read with the part
  // of it this analysis needs (ctx.resultOf replaces this once it does).
  const run = ctx.run(id);
  const table = CycleTable.safeParse(run.result);
  if (!table.success) {
    throw new InputProblem(pointer, `run ${run.id} (${run.kind}) has no cycle table`);
  }
  const out: number[] = [];
  for (const c of table.data.cycles) {
    const pt = which === "maximum" ? c.maximum : c.start;
    if (pt && !pt.provisional) out.push(pt.decimal_year);
  }
  return out;
}
