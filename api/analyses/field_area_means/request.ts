/**
 * Request of the "field-area-means" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { DEMO_FIELD } from "../../schemas/examples.ts";
import { fieldRef } from "../common/field_ref.ts";

const lat = (what: string) => z.number().min(-90).max(90).openapi({ description: what });
const lon = (what: string) => z.number().min(-360).max(720).openapi({ description: what });

/** The region averaged over. */
export const AreaRegionRequest = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("globe") }),
  z.object({
    kind: z.literal("band"),
    south: lat("Southern edge, degrees north (cell centres on the edge are inside)"),
    north: lat("Northern edge, degrees north"),
  }),
  z.object({
    kind: z.literal("box"),
    south: lat("Southern edge, degrees north"),
    north: lat("Northern edge, degrees north"),
    west: lon("Western edge, degrees east; the box runs eastward to `east` (350 → 10 crosses 0°)"),
    east: lon("Eastern edge, degrees east"),
  }),
  z.object({
    kind: z.literal("mask"),
    mask_field: fieldRef(
      "A stored field on the same grid whose first time step gives each cell's share in [0, 1] " +
        "(e.g. a land fraction); missing values count as 0",
    ),
  }),
]).openapi("AreaRegion");

export const FieldAreaMeanRequest = z.object({
  field: fieldRef("The gridded field (POST /v1/fields)"),
  region: AreaRegionRequest.default({ kind: "globe" }),
  weights: z.enum(["auto", "cos_latitude"]).default("auto").openapi({
    description: "`auto`: cell areas from the latitude and longitude bounds when the field has " +
      "both, else cos(latitude); `cos_latitude`: always cos(latitude)",
  }),
  min_coverage: z.number().min(0).max(1).default(0.5).openapi({
    description: "Smallest share of the region's area with a value for a time step to get a " +
      "mean (missing cells are skipped and the weights renormalised); below it the mean is " +
      "missing (null)",
  }),
  name: z.string().min(1).max(200).optional().openapi({
    description: "Name of the stored mean series (default: the field's name and the region)",
  }),
}).openapi("FieldAreaMeanRequest", {
  example: { field: DEMO_FIELD, region: { kind: "globe" } },
});

export type FieldAreaMeanParams = z.output<typeof FieldAreaMeanRequest>;
