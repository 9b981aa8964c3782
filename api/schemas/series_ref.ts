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

/** Largest number of wrong entries of a long array that are reported one by one. */
const LISTED_BAD_ENTRIES = 19;

/**
 * A long array whose entries are checked in one loop before zod sees them: wrong entries give
 * at most 20 issues (19 entries and a count of the others), not one issue each, so an array of
 * two million strings costs one pass instead of two million issue objects. Short arrays go to
 * `schema` directly, and the OpenAPI document is the one of `schema`.
 */
function screenedArray<T extends z.ZodType>(
  schema: T,
  entryOk: (v: unknown) => boolean,
  expected: string,
  doc: Record<string, unknown>,
): T {
  const screen = z.unknown().superRefine((val, ctx) => {
    if (!Array.isArray(val) || val.length <= 1000) return;
    let bad = 0;
    for (let i = 0; i < val.length; i++) {
      if (entryOk(val[i])) continue;
      if (bad < LISTED_BAD_ENTRIES) {
        ctx.addIssue({ code: "custom", path: [i], message: `expected ${expected}`, input: val[i] });
      }
      bad++;
    }
    if (bad > LISTED_BAD_ENTRIES) {
      ctx.addIssue({
        code: "custom",
        message: `and ${bad - LISTED_BAD_ENTRIES} more entries that are not ${expected}`,
        input: val,
      });
    }
  });
  return screen.pipe(schema).openapi(doc) as unknown as T;
}

const isNumberOrNull = (v: unknown) => v === null || typeof v === "number";
const isTime = (v: unknown) => typeof v === "string" || typeof v === "number";

export const InlineSeries = z.object({
  name: z.string().min(1).max(200),
  quantity: z.enum(QUANTITIES),
  units: z.string().max(60).openapi({
    description: 'UDUNITS units agreeing with the quantity (e.g. "W m-2" for tsi, "1" for ' +
      "indices); temperatures may be given in degC, °C, degF, °F (and other usual spellings) " +
      "and are converted to K, the conversion stated in the upload report and description",
  }),
  description: z.string().max(4000).optional(),
  source: z.string().max(2000).optional(),
  version: z.string().max(40).optional().openapi({
    description: 'Version of the index, e.g. "1" or "2" for the sunspot number',
  }),
  time: screenedArray(
    z.array(TimeValue).min(2).max(5_000_000),
    isTime,
    "an ISO 8601 string or a decimal year",
    {
      type: "array",
      items: { anyOf: [{ type: "string" }, { type: "number" }] },
      minItems: 2,
      maxItems: 5_000_000,
      description: "ISO 8601 strings or decimal years. Monthly and annual values dated at the " +
        "start of each period (R's time(): 1749, 1749.0833…) or at its middle are recognised " +
        "and stored at the middle of each period; the upload report says which was read",
    },
  ),
  value: screenedArray(z.array(z.number().nullable()), isNumberOrNull, "a number or null", {
    type: "array",
    items: { type: ["number", "null"] },
  }),
  uncertainty: screenedArray(z.array(z.number().nullable()), isNumberOrNull, "a number or null", {
    type: "array",
    items: { type: ["number", "null"] },
  }).optional(),
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
