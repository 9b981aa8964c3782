/**
 * One spectral band's proxy model against statsmodels: the 300–320 nm band of the SYNTHETIC
 * demo record on the monthly means of the demo proxies, fitted by calibrateBandModels and by
 * statsmodels OLS and iterated GLS (fixtures/reference/spectral_band_statsmodels.py; library
 * versions in the JSON).
 */
import assert from "node:assert/strict";
import { calibrateBandModels } from "../../../core/irradiance/mod.ts";

const ref = JSON.parse(
  await Deno.readTextFile(
    new URL("../../../fixtures/reference/spectral_band_statsmodels.json", import.meta.url),
  ),
);

const terms = [
  {
    name: "mg",
    role: "facular" as const,
    values: Float64Array.from(ref.facular as number[]),
    quietLevel: ref.quiet_level,
  },
  {
    name: "psi",
    role: "sunspot_darkening" as const,
    values: Float64Array.from(ref.psi as number[]),
  },
];
const y = Float64Array.from(ref.y as number[]);
const close = (a: number, b: number, rel: number, what: string) =>
  assert.ok(Math.abs(a - b) <= rel * Math.abs(b), `${what}: ${a} vs ${b}`);

Deno.test("calibrateBandModels() OLS on a demo band equals statsmodels OLS", () => {
  const m = calibrateBandModels([y], terms, {
    method: "ols",
    folds: 0,
    psiReference: ref.psi_reference,
  });
  const f = m.fits[0];
  ref.ols.params.forEach((p: number, k: number) => close(f.coefficients[k], p, 1e-9, `β${k}`));
  ref.ols.bse.forEach((p: number, k: number) => close(f.standardErrors[k], p, 1e-8, `se${k}`));
  close(f.rSquared, ref.ols.rsquared, 1e-10, "R²");
  close(f.adjRSquared, ref.ols.rsquared_adj, 1e-10, "adjusted R²");
  close(f.residualSd, ref.ols.sigma, 1e-9, "σ");
  // statsmodels' AIC counts the p coefficients; ours counts σ too (R's AIC(lm)): 2 more
  close(f.aic, ref.ols.aic + 2, 1e-9, "AIC");
});

Deno.test("calibrateBandModels() Prais–Winsten on a demo band equals iterated statsmodels GLS", () => {
  const m = calibrateBandModels([y], terms, {
    method: "prais_winsten",
    folds: 0,
    psiReference: ref.psi_reference,
  });
  const f = m.fits[0];
  close(f.rho, ref.prais_winsten.rho, 1e-7, "ρ");
  ref.prais_winsten.params.forEach((p: number, k: number) =>
    close(f.coefficients[k], p, 1e-7, `β${k}`)
  );
  ref.prais_winsten.bse.forEach((p: number, k: number) =>
    close(f.standardErrors[k], p, 1e-6, `se${k}`)
  );
});
