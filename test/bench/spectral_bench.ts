/**
 * Spectral benchmarks (deno bench): the workload of spectral_case.ts. The same work in numpy:
 * test/bench/spectral_numpy.py; side by side: test/bench/spectral_medians.ts.
 */
import { spectralCase } from "./spectral_case.ts";
import { drawSpectralBandMembers } from "../../core/irradiance/mod.ts";

const work = spectralCase();

Deno.bench("calibrate 100 bands × 17,000 days, OLS (one QR) + 5-fold CV + correlation", () => {
  work.calibrateOls();
});
Deno.bench("calibrate 100 bands × 17,000 days, Prais–Winsten + 5-fold CV + correlation", () => {
  work.calibratePraisWinsten();
});
Deno.bench("reconstruct 100 bands × 119,000 days + integral, 95 % intervals", () => {
  work.reconstruct();
});

const plan = work.plan();
Deno.bench("one ensemble member of 100 bands × 119,000 days (correlated across bands)", () => {
  drawSpectralBandMembers(plan, 1, 0, 1);
});
