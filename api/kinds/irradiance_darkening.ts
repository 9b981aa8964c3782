/**
 * `POST /v1/irradiance/darkening`: sunspot group records (or a daily total spot area) in, the
 * daily Photometric Sunspot Index and sunspot darkening in W m-2 out, saved as series.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  cellBounds,
  cellKey,
  type ContrastModel,
  dailyPsi,
  heliographicMu,
  julianDay,
  psiFromTotalArea,
  solarDiscGeometry,
  trueAreaFromProjected,
} from "../../core/irradiance/mod.ts";
import { IRRADIANCE_CAUTIONS, nullable, timeBound, TimeInput } from "./irradiance_common.ts";

const Contrast = z.discriminatedUnion("kind", [
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

const Position = z.discriminatedUnion("kind", [
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

const GroupRecords = z.object({
  time: z.array(TimeInput).min(1).max(2_000_000).openapi({
    description: "Observation date of each record (ISO day or decimal year); grouped per day",
  }),
  area: z.array(z.number().min(0)).openapi({ description: "Area of each record" }),
  area_kind: z.enum(["true", "projected"]).default("true").openapi({
    description: "true: foreshortening-corrected, millionths of the hemisphere (MSH); " +
      "projected: millionths of the disc, converted with A_true = A_proj/(2μ)",
  }),
  position: Position,
  source: z.array(z.string().max(100)).optional().openapi({
    description: "Observatory or catalogue of each record; mixing sources gives a warning",
  }),
}).openapi("SpotGroupRecords");

const Request = z.object({
  groups: GroupRecords.optional(),
  total_area: SeriesRef.optional().openapi({
    description: "Instead of groups: a sunspot_area series (total true area, MSH); the position " +
      "factor is replaced by its disc average, exactly 1",
  }),
  contrast: Contrast.default({ kind: "constant", value: 0.32 }),
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
}).openapi("DarkeningRequest");

type Params = z.output<typeof Request>;

function contrastModel(c: Params["contrast"]): ContrastModel {
  return c.kind === "constant" ? { kind: "constant", value: c.value } : { kind: "area_dependent" };
}

export const irradianceDarkening: RunKind<typeof Request> = {
  kind: "irradiance-darkening",
  path: "/v1/irradiance/darkening",
  algorithmVersion: "2",
  tag: "Irradiance",
  summary: "Sunspot darkening: daily Photometric Sunspot Index and ΔS in W m-2",
  description: "PSI = Σ C·A·μ(3μ + 2)/2 per day (Hudson et al. 1982; Fröhlich, Pap & Hudson " +
    "1994), from group records with true or projected areas and positions as heliocentric " +
    "angle, μ or heliographic coordinates (disc geometry from Meeus 1998 ch. 29), with " +
    "constant or area-dependent contrast; or from a total daily area with the disc-average " +
    "factor 1. Darkening ΔS = −S_Q·PSI. Outputs `psi` and `darkening` are saved as series.",
  request: Request,
  result: LegacyResult,
  autoSave: ["psi", "darkening"],
  estimateSeconds: (p) => (p.groups?.time.length ?? 0) / 2e6,
  compute(params, ctx) {
    const contrast = contrastModel(params.contrast);
    const sq = params.quiet_sun_tsi;
    const warnings: string[] = [];
    let time: number[], psi: Float64Array, groups: number[] | null = null;
    let positionFactor: string;
    if (params.total_area !== undefined) {
      const s = ctx.series(refId(params.total_area));
      if (s.quantity !== "sunspot_area") {
        throw new InputProblem(
          "/total_area",
          `series ${s.id} has quantity ${s.quantity}; a sunspot_area series (MSH) is needed`,
        );
      }
      const keep: number[] = [];
      for (let i = 0; i < s.value.length; i++) if (Number.isFinite(s.value[i])) keep.push(i);
      for (const i of keep) {
        if (s.value[i] < 0) {
          throw new InputProblem("/total_area", `series ${s.id} has a negative area at index ${i}`);
        }
      }
      psi = Float64Array.from(keep, (i) => psiFromTotalArea(s.value[i], contrast));
      time = keep.map((i) => s.time[i]);
      positionFactor = "disc average: only the total area is known, so the position factor " +
        "μ(3μ + 2)/2 is replaced by its mean over the disc, exactly 1";
      if (contrast.kind === "area_dependent") {
        warnings.push(
          "The area-dependent contrast was applied to total daily areas, not to single groups; it is meant for groups.",
        );
      }
    } else {
      const g = params.groups!;
      const n = g.time.length;
      const day = new Array<number>(n), area = new Array<number>(n), mu = new Array<number>(n);
      let atLimb = 0;
      for (let i = 0; i < n; i++) {
        const t = timeBound(g.time[i], "middle", `/groups/time/${i}`);
        day[i] = cellKey(t, "daily");
        let m: number;
        const p = g.position;
        if (p.kind === "mu") m = p.mu[i];
        else if (p.kind === "heliocentric_angle") m = Math.cos((p.degrees[i] * Math.PI) / 180);
        else {
          const noon = cellBounds(day[i], "daily").middle;
          const geo = solarDiscGeometry(julianDay(noon));
          const dl = p.longitude_from === "central_meridian" ? p.longitude[i] : p.longitude[i] -
            geo.l0Deg;
          m = heliographicMu(p.latitude[i], dl, geo.b0Deg);
          if (m < -0.05) {
            throw new InputProblem(
              `/groups/position/longitude/${i}`,
              `record ${i} lies behind the limb on its date (μ = ${
                m.toFixed(4)
              }); check the coordinates`,
            );
          }
          if (m <= 0) atLimb++;
        }
        mu[i] = Math.min(1, Math.max(0, m));
        if (g.area_kind === "projected") {
          if (!(mu[i] > 0)) {
            throw new InputProblem(
              `/groups/position`,
              `record ${i} is at the limb (μ = 0), where a projected area cannot be deprojected`,
            );
          }
          area[i] = trueAreaFromProjected(g.area[i], mu[i]);
        } else area[i] = g.area[i];
      }
      let d;
      try {
        d = dailyPsi(day, area, mu, { contrast });
      } catch (e) {
        const idx = /record (\d+)/.exec((e as Error).message);
        throw new InputProblem(idx ? `/groups/area/${idx[1]}` : "/groups", (e as Error).message);
      }
      time = [...d.days].map((k) => cellBounds(k, "daily").middle);
      psi = d.psi;
      groups = [...d.groups];
      positionFactor = g.position.kind === "heliographic"
        ? `per group μ(3μ + 2)/2, μ from heliographic coordinates (${g.position.longitude_from} longitude; B0, L0 from Meeus 1998 ch. 29)`
        : "per group μ(3μ + 2)/2";
      if (atLimb > 0) {
        warnings.push(
          `${atLimb} records fall on or just behind the limb (−0.05 ≤ μ ≤ 0) with the date's disc geometry; they were set to μ = 0 and add no darkening.`,
        );
      }
      const sources = new Set(g.source ?? []);
      if (sources.size > 1) {
        warnings.push(
          `Records come from ${sources.size} sources (${
            [...sources].slice(0, 5).join(", ")
          }); sunspot-area records of different observatories differ by factors of 1.15–1.25 (Balmaceda et al. 2009), so the PSI may jump where sources change.`,
        );
      }
    }
    const dark = psi.map((v) => -sq * v);
    let maxPsi = 0, sum = 0;
    for (const v of psi) (maxPsi = Math.max(maxPsi, v)), (sum += v);
    return {
      method: "Photometric Sunspot Index, Hudson et al. 1982 / Fröhlich, Pap & Hudson 1994",
      position_factor: positionFactor,
      contrast: params.contrast,
      quiet_sun_tsi: sq,
      days: psi.length,
      groups_per_day: groups,
      summary: {
        mean_psi: psi.length ? sum / psi.length : null,
        max_psi: maxPsi,
        max_darkening: -sq * maxPsi,
      },
      outputs: {
        psi: {
          name: "Photometric Sunspot Index",
          quantity: "other",
          units: "1",
          time,
          value: nullable(psi),
          description: `PSI per day (fraction of quiet-Sun TSI); ${positionFactor}`,
        },
        darkening: {
          name: "Sunspot darkening",
          quantity: "other",
          units: "W m-2",
          time,
          value: nullable(dark),
          description: `ΔS = −S_Q·PSI with S_Q = ${sq} W m-2`,
        },
      },
      warnings,
      cautions: IRRADIANCE_CAUTIONS.slice(1),
    };
  },
};
