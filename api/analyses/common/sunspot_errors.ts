/**
 * The sunspot number's own error in a reconstruction: which source the request and the
 * series give (its own uncertainties, the documented model of
 * core/irradiance/sunspot_number_uncertainty.ts, or none), its values, its cell means, and the
 * part of the result that states it.
 *
 * @module
 */
import { InputProblem } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { z } from "@hono/zod-openapi";
import {
  modelledSunspotUncertainty,
  SUNSPOT_SCALE_CORRELATION_YEARS,
  SUNSPOT_UNCERTAINTY_ERAS,
  type SunspotCellUncertainty,
  sunspotUncertaintyAtCells,
  type SunspotValueUncertainty,
} from "../../../core/irradiance/mod.ts";
import { MEAN_YEAR_DAYS, meanPeriodDays } from "../../../core/series/mod.ts";
import type { CalendarResolution } from "../../../core/time/mod.ts";
import { withInputPointers } from "./input_problem.ts";

/** How the request asks for the sunspot number's own error. */
export const SunspotUncertaintyRequest = z.object({
  source: z.enum(["auto", "series", "model", "none"]).default("auto").openapi({
    description: "The sunspot number's own error, propagated where proxies are mapped from it: " +
      "`series` its own one-sigma uncertainties (taken as independent between values), " +
      "`model` the documented model that grows back in time (a scale error correlated over " +
      "decades, 5 % since 1981 to 40 % before 1749, and Poisson-like counting noise; see the " +
      "result's `sunspot_uncertainty`), `auto` the series' own when it has them, else the " +
      "model, `none` taken as exact",
  }),
  multiplier: z.number().min(0).max(10).default(1).openapi({
    description: "Scale both parts of the sunspot number's error by this factor",
  }),
  correlation_years: z.number().gt(0).max(1000).default(SUNSPOT_SCALE_CORRELATION_YEARS).openapi({
    description: "Correlation time τ (years) of the model's scale error: e^{−Δt/τ} between " +
      "cells Δt apart",
  }),
}).openapi("SunspotUncertaintyRequest");

/** The sunspot number's error as a result states it. */
export const SunspotUncertaintySchema = z.object({
  source: z.enum(["series", "model", "none"]).openapi({
    description: "Where the sunspot number's error came from (`none`: taken as exact)",
  }),
  multiplier: z.number(),
  correlation_years: z.number().nullable().openapi({
    description: "τ of the correlated (scale) part; null when there is none",
  }),
  description: z.string(),
  eras: z.array(z.object({
    from: z.number().nullable().openapi({ description: "First year of the era; null: open" }),
    relative_scale_sd: z.number(),
    poisson_coefficient: z.number(),
    basis: z.string(),
  })).nullable().openapi({ description: "The model's eras (source `model`), else null" }),
  references: z.array(z.string()),
}).nullable().openapi({
  description: "The sunspot number's error as propagated; null without a sunspot series",
});

/** The sunspot error as propagated, and its statement in the result. */
export interface SunspotErrors {
  cells: SunspotCellUncertainty | null;
  json: NonNullable<z.input<typeof SunspotUncertaintySchema>>;
  /** What the band leaves out because of this choice. */
  notIncluded: string[];
}

const REFERENCES = [
  "Dudok de Wit, Lefèvre & Clette 2016, Sol. Phys. 291, 2709 (Poisson-like errors with a " +
  "time-dependent coefficient)",
  "Clette et al. 2014, Space Sci. Rev. 186, 35; Clette & Lefèvre 2016, Sol. Phys. 291, 2629 " +
  "(the eras of the series and its recalibration)",
  "Usoskin et al. 2016, Sol. Phys. 291, 2685 (a recalibrated group-number series; the spread " +
  "between series sets the scale of the relative SDs, from memory)",
];

/** Days each value of a series averages (the median spacing for an irregular series). */
function daysPerValue(s: StoredSeries): number {
  if (s.resolution !== "irregular") return meanPeriodDays(s.resolution);
  const d = Array.from(
    { length: Math.max(0, s.time.length - 1) },
    (_, i) => s.time[i + 1] - s.time[i],
  ).sort((a, b) => a - b);
  return d.length ? Math.max(1, d[d.length >> 1] * MEAN_YEAR_DAYS) : 1;
}

/**
 * The sunspot number's error for the request.
 *
 * @param params the request (`sunspot_uncertainty`)
 * @param ss the stored sunspot series
 * @param value its values on the model's version
 * @param ownSd its own one-sigma uncertainties on the model's version, or null
 * @param resolution the cells' resolution
 * @param keys the cells' period keys
 * @throws {InputProblem} at `/sunspot_uncertainty/source` when `series` is asked of a series
 *   without uncertainties
 */
export function sunspotErrors(
  params: { sunspot_uncertainty: z.output<typeof SunspotUncertaintyRequest> },
  ss: StoredSeries,
  value: ArrayLike<number>,
  ownSd: ArrayLike<number> | null,
  resolution: CalendarResolution,
  keys: Int32Array,
): SunspotErrors {
  const req = params.sunspot_uncertainty;
  const own = ownSd && Array.prototype.some.call(ownSd, (v: number) => Number.isFinite(v))
    ? ownSd
    : null;
  if (req.source === "series" && !own) {
    throw new InputProblem(
      "/sunspot_uncertainty/source",
      "the sunspot series carries no uncertainties; use source model (the documented model " +
        "that grows back in time), auto or none",
      { reason: "no_uncertainty" },
    );
  }
  const source = req.source === "auto" ? (own ? "series" : "model") : req.source;
  const k = req.multiplier;
  const base = { multiplier: k, references: REFERENCES };
  if (source === "none") {
    return {
      cells: null,
      json: {
        ...base,
        source,
        correlation_years: null,
        description: "The sunspot number is taken as exact (requested): its own error is not " +
          "in the band.",
        eras: null,
      },
      notIncluded: ["the sunspot number's own error (turned off in the request)"],
    };
  }
  let u: SunspotValueUncertainty;
  if (source === "series") {
    const n = value.length;
    u = {
      correlated: new Float64Array(n),
      independent: Float64Array.from(own!, (s) => s * k),
    };
  } else {
    u = withInputPointers(
      { "*": "/sunspot_uncertainty" },
      () => modelledSunspotUncertainty(ss.time, value, daysPerValue(ss), k),
    );
  }
  const cells = withInputPointers(
    { correlationYears: "/sunspot_uncertainty/correlation_years", "*": "/sunspot_number" },
    () => sunspotUncertaintyAtCells(ss.time, value, u, resolution, keys, req.correlation_years),
  );
  if (source === "series") {
    return {
      cells,
      json: {
        ...base,
        source,
        correlation_years: null,
        description:
          `The series' own one-sigma uncertainties${
            k === 1 ? "" : ` × ${k}`
          }, taken as independent between values (a series states no error correlations); ` +
          "averaged into cells as √(Σσ²)/n.",
        eras: null,
      },
      notIncluded: [
        "errors of the sunspot series shared by many values (a calibration or scale error " +
        "does not average out; the series' uncertainties are taken as independent: ask for " +
        "sunspot_uncertainty source model to use the documented model instead)",
      ],
    };
  }
  return {
    cells,
    json: {
      ...base,
      source,
      correlation_years: req.correlation_years,
      description: "Documented model (the series has no uncertainties): a relative scale " +
        "error s(t)·R correlated over decades (e^{−Δt/τ}) and Poisson-like counting noise " +
        "α(t)·√(R/d) for a value averaging d days, independent between values; s and α grow " +
        `back in time by era${k === 1 ? "" : `, both × ${k}`}. The form follows the ` +
        "references; the numbers are a stated modelling choice (from memory), not a " +
        "published error budget.",
      eras: SUNSPOT_UNCERTAINTY_ERAS.map((e) => ({
        from: e.from,
        relative_scale_sd: e.relativeScaleSd,
        poisson_coefficient: e.poissonCoefficient,
        basis: e.basis,
      })),
    },
    notIncluded: [],
  };
}
