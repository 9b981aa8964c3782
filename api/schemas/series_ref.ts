/**
 * Zod schemas for referring to series in analysis requests: either a stored series id or a
 * series carried inline (stored first, then referenced by its id in the recorded run).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { QUANTITIES } from "../../core/series/quantities.ts";
import { DEMO_SERIES } from "./examples.ts";

export const SERIES_ID_PATTERN = /^sha256:[0-9a-f]{64}$/;

export const SeriesId = z.string().regex(SERIES_ID_PATTERN, "must be a series id: sha256:<64 hex>")
  .openapi({
    description: "Content id of a stored series",
    // the demo's monthly sunspot number, stored on every fresh instance
    example: DEMO_SERIES.SSN,
  });

/** Time values: ISO 8601 strings (YYYY, YYYY-MM, YYYY-MM-DD, date-times) or decimal years. */
export const TimeValue = z.union([z.string(), z.number()]);

export const InlineSeries = z.object({
  name: z.string().min(1).max(200),
  quantity: z.enum(QUANTITIES),
  units: z.string().max(60).openapi({
    description: 'UDUNITS units agreeing with the quantity (e.g. "W m-2" for tsi, "1" for ' +
      "indices); temperatures may be given in degC, °C, degF, °F (and other usual spellings) " +
      "and are converted to K, the conversion stated in the upload report and description",
  }),
  time: z.array(TimeValue).min(2).max(5_000_000).openapi({
    description: "ISO 8601 strings or decimal years. Monthly and annual values dated at the " +
      "start of each period (R's time(): 1749, 1749.0833…) or at its middle are recognised " +
      "and stored at the middle of each period; the upload report says which was read",
  }),
  description: z.string().max(4000).optional(),
  source: z.string().max(2000).optional(),
  version: z.string().max(40).optional().openapi({
    description: 'Version of the index, e.g. "1" or "2" for the sunspot number',
  }),
  value: z.array(z.number().nullable()),
  uncertainty: z.array(z.number().nullable()).optional(),
}).openapi("InlineSeries");

export type InlineSeries = z.infer<typeof InlineSeries>;

/** A reference to a series: a stored id, or the series itself inline. */
export const SeriesRef = z.union([SeriesId, InlineSeries]).openapi("SeriesRef", {
  description: "A stored series id, or a series inline (stored on use and recorded by id)",
});

export type SeriesRef = z.infer<typeof SeriesRef>;

/** The id of a reference after the run machinery has stored inline series. */
export function refId(ref: SeriesRef): string {
  if (typeof ref !== "string") {
    throw new Error("refId: inline series must be stored before compute (internal error)");
  }
  return ref;
}
