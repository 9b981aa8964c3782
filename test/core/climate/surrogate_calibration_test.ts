/**
 * Calibration of the phase-randomisation test (Ebisuzaki 1997, J. Climate 10, 2147, §3 makes
 * the same check): on pairs of independent series the test must reject a true null at about
 * its nominal rate, where the naive t test without N_eff rejects far more.
 */
import assert from "node:assert/strict";
import { randomStream } from "../../../core/random/random_stream.ts";
import { ar1Surrogate } from "../../../core/climate/surrogates.ts";
import { preprocessSeries } from "../../../core/climate/preprocess_series.ts";
import {
  combineSurrogateChunks,
  planSurrogateLagTest,
  surrogateLagChunk,
} from "../../../core/climate/surrogate_lag_test.ts";
import { laggedCorrelationTable } from "../../../core/climate/lagged_correlation.ts";

const PAIRS = 300, N = 256, M = 199, ALPHA = 0.05;
// binomial Monte Carlo margin of a rejection rate over 300 pairs: 3σ = 3√(0.05·0.95/300)
const MARGIN = 3 * Math.sqrt((ALPHA * (1 - ALPHA)) / PAIRS);

function trial(phi: number, k: number, method: "phase" | "ar1" = "phase") {
  const x = preprocessSeries(ar1Surrogate(N, phi, 1, randomStream(1000, 2 * k)), {
    method: "mean",
  });
  const y = preprocessSeries(ar1Surrogate(N, phi, 1, randomStream(1000, 2 * k + 1)), {
    method: "mean",
  });
  const window = { minLag: -12, maxLag: 12 };
  const plan = planSurrogateLagTest(x, y, { ...window, seed: k, method });
  const mc = combineSurrogateChunks(plan, [surrogateLagChunk({ plan, start: 0, end: M })]);
  const row = laggedCorrelationTable(x, y, window)[12]; // lag 0
  return {
    pLag0: mc.pPerLag[12],
    pFamily: mc.pFamilyWise,
    naive: row.p_naive!,
    neff: row.p_analytic!,
  };
}

Deno.test("phase-randomisation test rejects about 5 % of independent AR(1) 0.9 pairs", () => {
  let mcRej = 0, famRej = 0, naiveRej = 0;
  for (let k = 0; k < PAIRS; k++) {
    const t = trial(0.9, k);
    if (t.pLag0 <= ALPHA) mcRej++;
    if (t.pFamily <= ALPHA) famRej++;
    if (t.naive <= ALPHA) naiveRej++;
  }
  const rate = mcRej / PAIRS, fam = famRej / PAIRS, naive = naiveRej / PAIRS;
  assert.ok(Math.abs(rate - ALPHA) <= MARGIN, `lag-0 rejection ${rate} (±${MARGIN.toFixed(3)})`);
  assert.ok(Math.abs(fam - ALPHA) <= MARGIN, `family-wise rejection ${fam}`);
  // naive t test with n − 2 df: N_eff/N ≈ (1 − 0.81)/(1 + 0.81) ≈ 0.1, so it rejects far more
  assert.ok(naive > 0.3, `naive rejection ${naive}`);
});

Deno.test("AR(1)-surrogate test rejects about 5 % of independent AR(1) 0.9 pairs", () => {
  // the null model is the true one here, so the test should hold its level
  let rej = 0;
  for (let k = 0; k < PAIRS; k++) if (trial(0.9, 2 * PAIRS + k, "ar1").pLag0 <= ALPHA) rej++;
  assert.ok(Math.abs(rej / PAIRS - ALPHA) <= MARGIN, `AR(1) surrogate rejection ${rej / PAIRS}`);
});

Deno.test("phase-randomisation p-values are near uniform on white noise", () => {
  const p: number[] = [];
  for (let k = 0; k < PAIRS; k++) p.push(trial(0, PAIRS + k).pLag0);
  p.sort((a, b) => a - b);
  // Kolmogorov–Smirnov distance to U(0, 1); 1.63/√n is the 1 % critical value (Massey 1951),
  // plus 1/(M + 1) for the granularity of Monte Carlo p-values
  let d = 0;
  p.forEach((v, i) => (d = Math.max(d, Math.abs(v - (i + 1) / PAIRS), Math.abs(v - i / PAIRS))));
  assert.ok(d < 1.63 / Math.sqrt(PAIRS) + 1 / (M + 1), `KS distance ${d}`);
});

Deno.test("N_eff from lag-1 autocorrelations is optimistic for two quasi-periodic series; surrogates are not", async () => {
  // R's sunspot.year (R 4.2.2 datasets, fixtures/datasets) against 200 independent AR(2)
  // series with a narrow spectral peak at 11 years (φ₁ = 2ρ cos(2π/11), φ₂ = −ρ², ρ = 0.95):
  // the null is true, yet the t test with Bretherton's N_eff rejects at lag 0 well above 5 %,
  // while the phase-randomisation test stays within its Monte Carlo margin of 5 %
  const text = await Deno.readTextFile(
    new URL("../../../fixtures/datasets/sunspot_year.csv", import.meta.url),
  );
  const rows = text.split("\n").filter((l) => l && !l.startsWith("#")).slice(1);
  const x = preprocessSeries(Float64Array.from(rows, (l) => Number(l.split(",")[3])), {
    method: "mean",
  });
  const rho = 0.95, phi1 = 2 * rho * Math.cos((2 * Math.PI) / 11), phi2 = -rho * rho;
  const K = 200;
  let analytic = 0, mc = 0;
  for (let k = 0; k < K; k++) {
    const st = randomStream(600, k);
    let a = 0, b = 0;
    const y0 = new Float64Array(x.length + 100);
    for (let i = 0; i < y0.length; i++) {
      const v = phi1 * a + phi2 * b + st.normal();
      b = a;
      a = v;
      y0[i] = v;
    }
    const y = preprocessSeries(y0.slice(100), { method: "mean" });
    const window = { minLag: -10, maxLag: 10 };
    const row = laggedCorrelationTable(x, y, window)[10];
    const plan = planSurrogateLagTest(x, y, { ...window, seed: k });
    const res = combineSurrogateChunks(plan, [surrogateLagChunk({ plan, start: 0, end: M })]);
    if (row.p_analytic! <= ALPHA) analytic++;
    if (res.pPerLag[10] <= ALPHA) mc++;
  }
  const margin = 3 * Math.sqrt((ALPHA * (1 - ALPHA)) / K);
  assert.ok(analytic / K >= 0.1, `analytic rejection ${analytic / K}`);
  assert.ok(mc / K <= ALPHA + margin && mc < analytic, `Monte Carlo rejection ${mc / K}`);
});
