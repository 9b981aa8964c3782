/**
 * Adapter of the "irradiance-darkening" analysis: the per-record areas and positions (or a
 * daily total-area series) to core's Photometric Sunspot Index
 * (core/irradiance/photometric_sunspot_index.ts, solar_disc_geometry.ts), and the result.
 *
 * @module
 */
import { max, mean } from "d3-array";
import type { RunContext } from "../../runs/kind.ts";
import { InputProblem } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import type { StoredSeries } from "../../store/types.ts";
import {
  type ContrastModel,
  dailyPsi,
  heliographicMu,
  julianDay,
  psiFromTotalArea,
  solarDiscGeometry,
  sunspotDarkening,
  trueAreaFromProjected,
} from "../../../core/irradiance/mod.ts";
import { periodKey, periodOfKey } from "../../../core/series/mod.ts";
import { timeBound } from "../common/time_period.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { requireQuantity } from "../common/sunspot_series.ts";
import { ASSESSMENT_CAUTION } from "../common/irradiance_notes.ts";
import type { DarkeningParams, SpotGroups } from "./request.ts";
import type { DarkeningResultIn } from "./result.ts";

/** μ at or above this below-the-limb value is taken as on the limb (μ = 0), below it refused. */
const LIMB_TOLERANCE_MU = -0.05;

/** Daily PSI with how it was formed. */
interface DailyDarkening {
  time: number[];
  psi: Float64Array;
  groups: number[] | null;
  positionFactor: string;
  warnings: string[];
}

/** The PSI and darkening per day, from group records or a total-area series. */
export function computeDarkening(params: DarkeningParams, ctx: RunContext): DarkeningResultIn {
  const contrast: ContrastModel = params.contrast.kind === "constant"
    ? { kind: "constant", value: params.contrast.value }
    : { kind: "area_dependent" };
  const d = params.total_area !== undefined
    ? fromTotalArea(ctx.series(refId(params.total_area)), contrast)
    : fromGroups(params.groups!, contrast);
  const sq = params.quiet_sun_tsi;
  const maxPsi = max(d.psi) ?? 0;
  return {
    method: "Photometric Sunspot Index, Hudson et al. 1982 / Fröhlich, Pap & Hudson 1994",
    position_factor: d.positionFactor,
    contrast: params.contrast,
    quiet_sun_tsi: sq,
    days: d.psi.length,
    groups_per_day: d.groups,
    summary: {
      mean_psi: mean(d.psi) ?? null,
      max_psi: maxPsi,
      max_darkening: sunspotDarkening(maxPsi, sq),
    },
    outputs: {
      psi: {
        name: "Photometric Sunspot Index",
        quantity: "other",
        units: "1",
        time: d.time,
        value: Array.from(d.psi),
        description: `PSI per day (fraction of quiet-Sun TSI); ${d.positionFactor}`,
      },
      darkening: {
        name: "Sunspot darkening",
        quantity: "other",
        units: "W m-2",
        time: d.time,
        value: Array.from(d.psi, (v) => sunspotDarkening(v, sq)),
        description: `ΔS = −S_Q·PSI with S_Q = ${sq} W m-2`,
      },
    },
    warnings: d.warnings,
    cautions: [ASSESSMENT_CAUTION],
  };
}

/** PSI = C·A with the disc-average position factor 1, from a daily total-area series. */
function fromTotalArea(s: StoredSeries, contrast: ContrastModel): DailyDarkening {
  requireQuantity(s, "sunspot_area", "/total_area");
  const keep: number[] = [];
  for (let i = 0; i < s.value.length; i++) {
    const v = s.value[i];
    if (!Number.isFinite(v)) continue;
    if (v < 0) {
      throw new InputProblem("/total_area", `series ${s.id} has a negative area at index ${i}`, {
        index: i,
        value: v,
      });
    }
    keep.push(i);
  }
  const psi = withInputPointers(
    { contrast: "/contrast", "*": "/total_area" },
    () => Float64Array.from(keep, (i) => psiFromTotalArea(s.value[i], contrast)),
  );
  return {
    time: keep.map((i) => s.time[i]),
    psi,
    groups: null,
    positionFactor: "disc average: only the total area is known, so the position factor " +
      "μ(3μ + 2)/2 is replaced by its mean over the disc, exactly 1",
    warnings: contrast.kind === "area_dependent"
      ? [
        "The area-dependent contrast was applied to total daily areas, not to single groups; it is meant for groups.",
      ]
      : [],
  };
}

/** PSI = Σ C·A·μ(3μ + 2)/2 per day, from group records. */
function fromGroups(g: SpotGroups, contrast: ContrastModel): DailyDarkening {
  const day = g.time.map((v, i) => periodKey(timeBound(v, "middle", `/groups/time/${i}`), "daily"));
  const { mu, atLimb } = recordMu(g, day);
  const area = g.area.map((a, i) => g.area_kind === "projected" ? trueArea(a, mu[i], i) : a);
  const position = g.position.kind;
  const d = withInputPointers({
    areaMsh: ({ index: i }) => i === undefined ? "/groups/area" : `/groups/area/${i}`,
    mu: ({ index: i }) =>
      position === "mu" && i !== undefined ? `/groups/position/mu/${i}` : "/groups/position",
    day: ({ index: i }) => i === undefined ? "/groups/time" : `/groups/time/${i}`,
    contrast: "/contrast",
    "*": "/groups",
  }, () => dailyPsi(day, area, mu, { contrast }));
  const warnings: string[] = [];
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
  return {
    time: Array.from(d.days, (k) => periodOfKey(k, "daily").middle),
    psi: d.psi,
    groups: Array.from(d.groups),
    positionFactor: g.position.kind === "heliographic"
      ? `per group μ(3μ + 2)/2, μ from heliographic coordinates (${g.position.longitude_from} longitude; B0, L0 from Meeus 1998 ch. 29)`
      : "per group μ(3μ + 2)/2",
    warnings,
  };
}

/**
 * μ of each record: given, from the heliocentric angle, or from heliographic coordinates with
 * the disc geometry at noon of its day. Records just behind the limb are put on it.
 */
function recordMu(g: SpotGroups, day: number[]): { mu: number[]; atLimb: number } {
  const p = g.position;
  let atLimb = 0;
  const mu = day.map((k, i) => {
    if (p.kind === "mu") return p.mu[i];
    if (p.kind === "heliocentric_angle") return Math.cos((p.degrees[i] * Math.PI) / 180);
    const geo = solarDiscGeometry(julianDay(periodOfKey(k, "daily").middle));
    const dl = p.longitude_from === "central_meridian"
      ? p.longitude[i]
      : p.longitude[i] - geo.l0Deg;
    const m = heliographicMu(p.latitude[i], dl, geo.b0Deg);
    if (m < LIMB_TOLERANCE_MU) {
      throw new InputProblem(
        `/groups/position/longitude/${i}`,
        `record ${i} lies behind the limb on its date (μ = ${m.toFixed(4)}); check the coordinates`,
        { index: i, mu: m },
      );
    }
    if (m <= 0) atLimb++;
    return m;
  }).map((m) => Math.min(1, Math.max(0, m)));
  return { mu, atLimb };
}

/** True area of a projected record (a 422 at the limb, where it cannot be deprojected). */
function trueArea(projected: number, mu: number, i: number): number {
  if (!(mu > 0)) {
    throw new InputProblem(
      "/groups/position",
      `record ${i} is at the limb (μ = 0), where a projected area cannot be deprojected`,
      { index: i },
    );
  }
  return withInputPointers(
    { projectedMsd: `/groups/area/${i}`, mu: "/groups/position", "*": `/groups/area/${i}` },
    () => trueAreaFromProjected(projected, mu),
  );
}
