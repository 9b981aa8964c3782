/**
 * Request of the "irradiance-models" analysis: the measured TSI record, the proxy terms and
 * their roles, an optional sunspot-number series for the back-extension mappings, and the
 * estimator.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { PeriodInput } from "../common/time_period.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

/** The roles a proxy term takes in the model. */
export const ProxyRoleSchema = z.enum(["facular", "sunspot_darkening", "other"]).openapi({
  description: "facular: a brightening index F entering as a·(F − F_Q); sunspot_darkening: " +
    "a PSI series entering as −b·S_ref·PSI; other: any further proxy, entering like a " +
    "facular term",
});

const ProxyTermRequest = z.object({
  name: z.string().regex(/^[a-z][a-z0-9_]{0,39}$/, "lower-case letters, digits and _").openapi({
    example: "mg_ii",
  }),
  series: SeriesRef,
  role: ProxyRoleSchema,
  quiet_level: z.number().optional().openapi({
    description: "Quiet-Sun level F_Q of the term (ignored for sunspot_darkening). Default: " +
      "the 1st percentile of the term over the calibration points",
  }),
}).openapi("ProxyTerm");

export const ModelRequest = z.object({
  tsi: SeriesRef.openapi({ description: "Measured TSI record (quantity tsi, W m-2)" }),
  terms: z.array(ProxyTermRequest).min(1).max(6),
  sunspot_number: SeriesRef.optional().openapi({
    description: "Sunspot-number series (with a declared version) for fitting the " +
      "sunspot → proxy mappings that back-extension needs",
  }),
  mapping_form: z.enum(["auto", "linear", "saturating"]).default("auto").openapi({
    description: "Form of the sunspot → proxy mappings; auto chooses by AIC",
  }),
  method: z.enum(["prais_winsten", "ols"]).default("prais_winsten").openapi({
    description: "prais_winsten: regression with AR(1) errors (honest intervals for serially " +
      "correlated residuals); ols: ordinary least squares",
  }),
  folds: z.number().int().min(0).max(20).default(5).openapi({
    description: "Folds of the time-blocked cross-validation (contiguous blocks); 0 = none",
  }),
  period: PeriodInput.optional().openapi({ description: "Restrict calibration to this period" }),
  psi_reference: z.number().min(1300).max(1400).default(1360.8).openapi({
    description: "S_ref in the darkening regressor −S_ref·PSI, W m-2",
  }),
}).superRefine((v, ctx) => {
  const names = new Set<string>();
  v.terms.forEach((t, i) => {
    if (names.has(t.name)) {
      ctx.addIssue({ code: "custom", path: ["terms", i, "name"], message: "duplicate term name" });
    }
    names.add(t.name);
  });
}).openapi("ModelRequest", {
  example: {
    tsi: DEMO_SERIES.TSI,
    sunspot_number: DEMO_SERIES.SSN,
    terms: [{ name: "mg_ii", series: DEMO_SERIES.MG, role: "facular" }],
  },
});

export type ModelParams = z.output<typeof ModelRequest>;
