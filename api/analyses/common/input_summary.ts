/**
 * The short description of an input series that series operations put in their results.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";

/** Resolution of a stored series. */
export const SeriesResolution = z.enum(["daily", "monthly", "annual", "irregular"]);

/** An input series, briefly: id, name, resolution and number of points. */
export const InputSummary = z.object({
  id: z.string(),
  name: z.string(),
  resolution: SeriesResolution,
  n: z.number().int().openapi({ description: "Points" }),
});
