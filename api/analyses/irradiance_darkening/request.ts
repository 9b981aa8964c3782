/**
 * Request of the "irradiance-darkening" analysis: sunspot group records (areas and positions)
 * or a daily total-area series, the contrast model and the quiet-Sun level.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { TimeInput } from "../common/time_period.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";
import { oneOfFields } from "../common/alternatives.ts";

export const SpotContrast = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("constant"),
    value: z.number().gt(0).max(1).default(0.32).openapi({
      description: "Bolometric contrast 1 − residual intensity (Hudson et al. 1982: 0.32)",
    }),
  }),
  z.object({ kind: z.literal("area_dependent") }).openapi({
    description: "C = 0.2231 + 0.0244·log10(A[MSH]) (Brandt, Stix & Weinhardt 1994)",
  }),
]).openapi("SpotContrast");

const SpotPosition = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("heliocentric_angle"),
    degrees: z.array(z.number().min(0).max(90)).openapi({ description: "θ per record, degrees" }),
  }),
  z.object({
    kind: z.literal("mu"),
    mu: z.array(z.number().min(0).max(1)).openapi({ description: "μ = cos θ per record" }),
  }),
  z.object({
    kind: z.literal("heliographic"),
    latitude: z.array(z.number().min(-90).max(90)).openapi({ description: "degrees" }),
    longitude: z.array(z.number().min(-360).max(360)).openapi({ description: "degrees" }),
    longitude_from: z.enum(["central_meridian", "carrington"]).default("central_meridian")
      .openapi({
        description: "central_meridian: longitude from the central meridian; carrington: " +
          "Carrington longitude, with the date's L0 and B0 from Meeus (1998) ch. 29",
      }),
  }),
]).openapi("SpotPosition");

const SpotGroupRecords = z.object({
  time: z.array(TimeInput).min(1).max(2_000_000).openapi({
    description: "Observation date of each record (ISO day or decimal year); grouped per day",
  }),
  area: z.array(z.number().min(0)).openapi({ description: "Area of each record" }),
  area_kind: z.enum(["true", "projected"]).default("true").openapi({
    description: "true: foreshortening-corrected, millionths of the hemisphere (MSH); " +
      "projected: millionths of the disc, converted with A_true = A_proj/(2μ)",
  }),
  position: SpotPosition,
  source: z.array(z.string().max(100)).optional().openapi({
    description: "Observatory or catalogue of each record; mixing sources gives a warning",
  }),
}).openapi("SpotGroupRecords");

export const DarkeningRequest = z.object({
  groups: SpotGroupRecords.optional(),
  total_area: SeriesRef.optional().openapi({
    description: "Instead of groups: a sunspot_area series (total true area, MSH); the position " +
      "factor is replaced by its disc average, exactly 1",
  }),
  contrast: SpotContrast.default({ kind: "constant", value: 0.32 }),
  quiet_sun_tsi: z.number().min(1300).max(1400).default(1360.8).openapi({
    description: "S_Q for the darkening ΔS = −S_Q·PSI, W m-2 (Kopp & Lean 2011: 1360.8)",
  }),
}).superRefine((v, ctx) => {
  if ((v.groups === undefined) === (v.total_area === undefined)) {
    ctx.addIssue({
      code: "custom",
      path: ["groups"],
      message: "give exactly one of groups (records) or total_area (a series)",
    });
  }
  const g = v.groups;
  if (!g) return;
  const n = g.time.length;
  const same = (arr: unknown[] | undefined, path: string[]) => {
    if (arr && arr.length !== n) {
      ctx.addIssue({
        code: "custom",
        path,
        message: `has ${arr.length} entries but groups.time has ${n}`,
      });
    }
  };
  same(g.area, ["groups", "area"]);
  same(g.source, ["groups", "source"]);
  const p = g.position;
  if (p.kind === "heliocentric_angle") same(p.degrees, ["groups", "position", "degrees"]);
  if (p.kind === "mu") same(p.mu, ["groups", "position", "mu"]);
  if (p.kind === "heliographic") {
    same(p.latitude, ["groups", "position", "latitude"]);
    same(p.longitude, ["groups", "position", "longitude"]);
  }
}).openapi("DarkeningRequest", {
  ...oneOfFields("groups", "total_area"),
  example: { total_area: DEMO_SERIES.AREA, contrast: { kind: "constant", value: 0.32 } },
});

export type DarkeningParams = z.output<typeof DarkeningRequest>;
export type SpotGroups = NonNullable<DarkeningParams["groups"]>;
