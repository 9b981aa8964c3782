/**
 * The input series as the solar-cycle results name it: id, name, quantity, version and length.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { StoredSeries } from "../../store/types.ts";

export const SunspotInput = z.object({
  id: z.string(),
  name: z.string(),
  quantity: z.string(),
  version: z.string().nullable().openapi({
    description: 'Declared version of the index (e.g. "2" for sunspot number version 2)',
  }),
  n: z.number().int().openapi({ description: "Points in the stored series" }),
});

/** The series' summary for a result. */
export function sunspotInput(s: StoredSeries): z.input<typeof SunspotInput> {
  return { id: s.id, name: s.name, quantity: s.quantity, version: s.version, n: s.n };
}
