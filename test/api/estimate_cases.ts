/**
 * Representative requests of every analysis at a few sizes (the demo data, slices of it, and
 * longer invented series), for checking the cost models of the estimates against measured
 * computing times (test/api/estimate_accuracy_test.ts, test/bench/estimate_calibration.ts).
 *
 * @module
 */
import type { TestService } from "./helpers.ts";
import { DEMO } from "./demo_inputs.ts";
import { gridNetcdf } from "./fields/grid_file.ts";
import { randomStream } from "../../core/random/mod.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import type { RunKind } from "../../api/runs/kind.ts";
import type { StoredSeries } from "../../api/store/types.ts";
import {
  estimateRunSeconds,
  measureMachineSpeedFactor,
  threadCpuSeconds,
} from "../../api/runs/estimate.ts";

const { SSN, AREA, MG, TSI, TSIM, TEMP, ENSO, AOD, FIELD } = DEMO;

/** The demo's 32-band monthly spectral record (fixtures/demo/spectral_bands.json). */
const SPECTRAL_BANDS: { lower: number; upper: number; series: string }[] = JSON.parse(
  await Deno.readTextFile(new URL("../../fixtures/demo/spectral_bands.json", import.meta.url)),
);

/** One request: the analysis' path, a label, and its body (from the ids of earlier runs). */
export interface EstimateCase {
  path: string;
  label: string;
  body: (runs: Record<string, string>) => Record<string, unknown>;
  /** Store the run's id under this name for later cases (a model, a reconstruction). */
  saveAs?: string;
  /** Part of the small set the test measures (the others: the calibration script only). */
  ci?: boolean;
}

/** A stored series as an inline one (decimal-year times), optionally a slice of it. */
function inline(s: StoredSeries, from = 0, to = s.n) {
  return {
    name: `${s.name} [${from}, ${to})`,
    quantity: s.quantity,
    units: s.units,
    ...(s.version ? { version: s.version } : {}),
    time: Array.from(s.time.subarray(from, to)),
    value: Array.from(s.value.subarray(from, to), (v) => (Number.isFinite(v) ? v : null)),
  };
}

/** An invented daily series of `n` days from 1900: an 11-year cycle, noise and a few gaps. */
export function inventedDaily(n: number, quantity = "tsi", units = "W m-2", seed = 5) {
  const st = randomStream(seed, 0);
  const time: number[] = [], value: (number | null)[] = [];
  for (let i = 0; i < n; i++) {
    time.push(1900 + (i + 0.5) / 365.25);
    value.push(
      i % 97 === 13 ? null : 1361 + 0.5 * Math.sin((2 * Math.PI * i) / 4018) + 0.1 * st.normal(),
    );
  }
  return { name: `invented daily ${n}`, quantity, units, time, value };
}

/** An invented monthly sunspot-number-like series of `n` months from 1000-01. */
export function inventedMonthly(n: number, seed = 6) {
  const st = randomStream(seed, 0);
  const time: number[] = [], value: number[] = [];
  for (let i = 0; i < n; i++) {
    time.push(1000 + (i + 0.5) / 12);
    const c = Math.sin((Math.PI * (i % 132)) / 132);
    value.push(Math.max(0, 150 * c * c + 10 * st.normal()));
  }
  return {
    name: `invented monthly ${n}`,
    quantity: "sunspot_number",
    units: "1",
    version: "2",
    time,
    value,
  };
}

/**
 * An invented monthly field from 1960 on a grid of `step` degrees (cell centres), stored
 * through `POST /v1/fields`: a planted 11-year cycle, a trend and noise; with `land`, only
 * the cells of a band of longitudes have values (the rest missing, as a land-only field).
 * Returns its id.
 */
export async function inventedField(
  svc: TestService,
  step: number,
  months: number,
  land = false,
): Promise<string> {
  const lat = Array.from({ length: 180 / step }, (_, i) => -90 + step / 2 + i * step);
  const lon = Array.from({ length: 360 / step }, (_, i) => step / 2 + i * step);
  const st = randomStream(17, step);
  const cells = lat.length * lon.length;
  const values = new Float32Array(months * cells);
  for (let t = 0; t < months; t++) {
    const cycle = Math.sin((2 * Math.PI * t) / 132);
    for (let c = 0; c < cells; c++) {
      const inLand = lon[c % lon.length] < 120;
      values[t * cells + c] = land && !inLand
        ? NaN
        : 288 + 0.1 * cycle * Math.cos((c % 37) / 6) + 0.001 * t + 0.5 * st.normal();
    }
  }
  const res = await svc.app.request("/v1/fields?quantity=temperature", {
    method: "POST",
    headers: { "content-type": "application/x-netcdf" },
    body: gridNetcdf({ startYear: 1960, nTime: months, lat, lon, values }),
  });
  const body = await res.json();
  if (res.status !== 201) throw new Error(`invented field: ${JSON.stringify(body)}`);
  return body.field.id as string;
}

/** The cases, in dependency order (a model before the reconstructions that use it). */
export async function estimateCases(svc: TestService): Promise<EstimateCase[]> {
  const field5 = await inventedField(svc, 5, 600);
  const land4 = await inventedField(svc, 4, 480, true);
  const ssn = (await svc.store.getSeries(SSN))!;
  const half = Math.floor(ssn.n / 2);
  const attribution = (solarLags: [number, number], volcLags: [number, number]) => ({
    climate: TEMP,
    regressors: [
      { name: "solar", series: TSIM, role: "solar", min_lag: solarLags[0], max_lag: solarLags[1] },
      { name: "enso", series: ENSO, role: "enso", max_lag: 3 },
      { name: "volc", series: AOD, role: "volcanic", min_lag: volcLags[0], max_lag: volcLags[1] },
    ],
  });
  const reconstruction = (r: Record<string, string>, resolution: string, start: string) => ({
    model: r.model,
    sunspot_number: SSN,
    resolution,
    period: { start, end: "2025" },
    proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: r.psi }],
  });
  const spectralModel = (r: Record<string, string>, bands: typeof SPECTRAL_BANDS) => ({
    tsi_model: r.model,
    sunspot_number: SSN,
    proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: r.psi }],
    bands,
    ranges: [{ lower: 200, upper: 400 }],
  });
  return [
    // time-axis utilities
    {
      path: "/v1/resampling",
      label: "daily TSI → monthly",
      body: () => ({ series: TSI, to: "monthly" }),
      ci: true,
    },
    {
      path: "/v1/resampling",
      label: "60,000 days → annual",
      body: () => ({ series: inventedDaily(60_000), to: "annual" }),
    },
    {
      path: "/v1/anomalies",
      label: "daily TSI, base 2000–2009",
      body: () => ({ series: TSI, base: { start: "2000", end: "2009" } }),
      ci: true,
    },
    {
      path: "/v1/anomalies",
      label: "monthly temperature",
      body: () => ({ series: TEMP, base: { start: "1961", end: "1990" } }),
    },
    {
      path: "/v1/alignments",
      label: "daily TSI, facular index",
      body: () => ({ series: [TSI, MG], resolution: "daily" }),
      ci: true,
    },
    {
      path: "/v1/alignments",
      label: "4 monthly series",
      body: () => ({ series: [TEMP, ENSO, AOD, TSIM], resolution: "monthly" }),
    },
    // solar cycles
    { path: "/v1/smoothing", label: "monthly SSN, 13-month", body: () => ({ series: SSN }) },
    {
      path: "/v1/smoothing",
      label: "30,000 months, gaussian σ 60",
      body: () => ({ series: inventedMonthly(30_000), method: "gaussian", sigma: 60 }),
      ci: true,
    },
    {
      path: "/v1/smoothing",
      label: "30,000 months, running mean 121",
      body: () => ({ series: inventedMonthly(30_000), method: "running_mean", window: 121 }),
    },
    {
      path: "/v1/cycles",
      label: "monthly SSN (3,900 months)",
      body: () => ({ series: SSN }),
      ci: true,
      saveAs: "cycles",
    },
    { path: "/v1/cycles", label: "half the SSN", body: () => ({ series: inline(ssn, 0, half) }) },
    { path: "/v1/spectra", label: "SSN, default grid", body: () => ({ series: SSN }), ci: true },
    {
      path: "/v1/spectra",
      label: "SSN, period list 2,000",
      body: () => ({
        series: SSN,
        period_list: Array.from({ length: 2000 }, (_, k) => 2 + k * 0.05),
      }),
    },
    {
      path: "/v1/spectra",
      label: "SSN, 60 AR(1) replicates",
      body: () => ({ series: SSN, false_alarm: "both", replicates: 60 }),
    },
    {
      path: "/v1/spectra",
      label: "half the SSN, 2–40 yr, 20 AR(1) replicates",
      body: () => ({
        series: inline(ssn, 0, half),
        periods: { min: 2, max: 40 },
        false_alarm: "both",
        replicates: 20,
      }),
      ci: true,
    },
    {
      path: "/v1/spectra",
      label: "daily TSI, 20,000 periods",
      body: () => ({ series: TSI, periods: { min: 0.1, max: 40, count: 20_000 } }),
    },
    {
      path: "/v1/spectra",
      label: "daily TSI, 4,000 periods",
      body: () => ({ series: TSI, periods: { min: 0.1, max: 40, count: 4000 } }),
      ci: true,
    },
    { path: "/v1/spectra", label: "daily TSI, default grid", body: () => ({ series: TSI }) },
    { path: "/v1/spectra", label: "SSN, FFT", body: () => ({ series: SSN, method: "fft" }) },
    { path: "/v1/cycle-fits", label: "monthly SSN", body: () => ({ series: SSN }) },
    {
      path: "/v1/cycle-fits",
      label: "half the SSN",
      body: () => ({ series: inline(ssn, 0, half) }),
      ci: true,
    },
    {
      path: "/v1/cycle-forecasts",
      label: "40 / 20 replicates",
      body: () => ({ series: SSN, replicates: 40, hindcast_replicates: 20 }),
    },
    {
      path: "/v1/cycle-forecasts",
      label: "first half of the SSN, 20 / 20 replicates",
      body: () => ({ series: inline(ssn, 0, half + 20), replicates: 20, hindcast_replicates: 20 }),
      ci: true,
    },
    {
      path: "/v1/cycle-forecasts",
      label: "400 / 20 replicates",
      body: () => ({ series: SSN, replicates: 400, hindcast_replicates: 20 }),
    },
    { path: "/v1/cycle-forecasts", label: "defaults (200 / 100)", body: () => ({ series: SSN }) },
    // irradiance
    {
      path: "/v1/irradiance/darkening",
      label: "daily total area",
      body: () => ({ total_area: AREA }),
      ci: true,
      saveAs: "darkening",
    },
    {
      path: "/v1/irradiance/models",
      label: "facular + PSI",
      body: (r) => ({
        tsi: TSI,
        sunspot_number: SSN,
        terms: [{ name: "mg_ii", series: MG, role: "facular" }, {
          name: "psi",
          series: r.psi,
          role: "sunspot_darkening",
        }],
      }),
      ci: true,
      saveAs: "model",
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "annual 1700–2025",
      body: (r) => ({
        model: r.model,
        sunspot_number: SSN,
        resolution: "annual",
        period: { start: "1700", end: "2025" },
        proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: r.psi }],
      }),
      ci: true,
      saveAs: "reconstruction",
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "monthly 1700–2025",
      body: (r) => ({
        model: r.model,
        sunspot_number: SSN,
        resolution: "monthly",
        period: { start: "1700", end: "2025" },
        proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: r.psi }],
      }),
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "daily 1980–2025",
      body: (r) => ({
        model: r.model,
        sunspot_number: SSN,
        resolution: "daily",
        period: { start: "1980", end: "2025" },
        proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: r.psi }],
      }),
    },
    {
      path: "/v1/forcing",
      label: "annual reconstruction",
      body: (r) => ({
        reconstruction: r.reconstruction,
        reference: { kind: "period", period: { start: "1986", end: "1996" } },
      }),
      ci: true,
      saveAs: "forcing",
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "annual 1700–2025, 200 members",
      body: (r) => ({ ...reconstruction(r, "annual", "1700"), realizations: 200 }),
      ci: true,
      saveAs: "reconstruction_ensemble",
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "monthly 1700–2025, 100 members",
      body: (r) => ({ ...reconstruction(r, "monthly", "1700"), realizations: 100 }),
      saveAs: "reconstruction_ensemble_monthly",
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "annual 1700–2025, 1,000 members",
      body: (r) => ({ ...reconstruction(r, "annual", "1700"), realizations: 1000 }),
    },
    {
      path: "/v1/irradiance/reconstructions",
      label: "monthly 1900–2025, 500 members",
      body: (r) => ({ ...reconstruction(r, "monthly", "1900"), realizations: 500 }),
    },
    {
      path: "/v1/forcing",
      label: "annual, 200 members",
      body: (r) => ({
        reconstruction: r.reconstruction_ensemble,
        reference: { kind: "period", period: { start: "1986", end: "1996" } },
      }),
      ci: true,
      saveAs: "forcing_ensemble",
    },
    {
      path: "/v1/forcing",
      label: "monthly, 100 members",
      body: (r) => ({
        reconstruction: r.reconstruction_ensemble_monthly,
        reference: { kind: "period", period: { start: "1986", end: "1996" } },
      }),
      saveAs: "forcing_ensemble_monthly",
    },
    {
      path: "/v1/energy-balance",
      label: "forcing run, 200 members",
      body: (r) => ({ forcing_run: r.forcing_ensemble }),
      ci: true,
    },
    {
      path: "/v1/energy-balance",
      label: "two-box, monthly forcing, 100 members",
      body: (r) => ({ model: "two_box", forcing_run: r.forcing_ensemble_monthly }),
    },
    // spectral irradiance
    {
      path: "/v1/irradiance/spectral-models",
      label: "32 demo bands",
      body: (r) => spectralModel(r, SPECTRAL_BANDS),
      ci: true,
      saveAs: "spectral",
    },
    {
      path: "/v1/irradiance/spectral-models",
      label: "32 demo bands, OLS",
      body: (r) => ({ ...spectralModel(r, SPECTRAL_BANDS), method: "ols" }),
    },
    {
      path: "/v1/irradiance/spectral-models",
      label: "8 bands, no cross-validation",
      body: (r) => ({ ...spectralModel(r, SPECTRAL_BANDS.slice(0, 8)), folds: 0 }),
    },
    {
      path: "/v1/irradiance/spectral-models",
      label: "16 bands, 10 folds, no sunspots",
      body: (r) => {
        const { sunspot_number: _, ...rest } = spectralModel(r, SPECTRAL_BANDS.slice(8, 24));
        return { ...rest, folds: 10 };
      },
    },
    {
      path: "/v1/irradiance/spectral-reconstructions",
      label: "annual 1700–2025",
      body: (r) => ({ ...reconstruction(r, "annual", "1700"), model: r.spectral }),
      ci: true,
    },
    {
      path: "/v1/irradiance/spectral-reconstructions",
      label: "monthly 1700–2025",
      body: (r) => ({ ...reconstruction(r, "monthly", "1700"), model: r.spectral }),
    },
    {
      path: "/v1/irradiance/spectral-reconstructions",
      label: "daily 1980–2025",
      body: (r) => ({ ...reconstruction(r, "daily", "1980"), model: r.spectral }),
    },
    {
      path: "/v1/irradiance/spectral-reconstructions",
      label: "annual 1850–2025, 100 members",
      body: (r) => ({
        ...reconstruction(r, "annual", "1850"),
        model: r.spectral,
        ranges: [{ lower: 200, upper: 400 }],
        realizations: 100,
      }),
      ci: true,
      saveAs: "spectral_ensemble",
    },
    {
      path: "/v1/forcing",
      label: "spectral 200–400 nm, 100 members",
      body: (r) => ({
        spectral_reconstruction: { run: r.spectral_ensemble, output: "range_200_400" },
        reference: { kind: "period", period: { start: "1986", end: "1996" } },
      }),
      ci: true,
    },
    // climate
    {
      path: "/v1/energy-balance",
      label: "forcing run",
      body: (r) => ({ forcing_run: r.forcing }),
      ci: true,
    },
    {
      path: "/v1/energy-balance",
      label: "sinusoid, 1,000 years daily",
      body: () => ({ sinusoid: { years: 1000, steps_per_year: 365 } }),
    },
    {
      path: "/v1/lag-correlations",
      label: "200 phase surrogates",
      body: () => ({ solar: TSIM, climate: TEMP, surrogates: 200 }),
      ci: true,
    },
    {
      path: "/v1/lag-correlations",
      label: "1,000 phase surrogates",
      body: () => ({ solar: TSIM, climate: TEMP, surrogates: 1000 }),
    },
    {
      path: "/v1/lag-correlations",
      label: "300 surrogates, high-pass",
      body: () => ({
        solar: TSIM,
        climate: TEMP,
        surrogates: 300,
        preprocess: "high_pass",
        high_pass_cutoff_years: 30,
      }),
    },
    {
      path: "/v1/attributions",
      label: "exhaustive (180 lag combinations)",
      body: () => attribution([12, 16], [0, 8]),
      ci: true,
    },
    {
      path: "/v1/attributions",
      label: "coordinate search (25 × 4 × 13)",
      body: () => attribution([0, 24], [0, 12]),
    },
    {
      path: "/v1/composites",
      label: "200 / 200",
      body: (r) => ({ series: TEMP, cycle_run: r.cycles, bootstrap: 200, random_sets: 200 }),
    },
    {
      path: "/v1/composites",
      label: "2,000 / 2,000",
      body: (r) => ({ series: TEMP, cycle_run: r.cycles, bootstrap: 2000, random_sets: 2000 }),
      ci: true,
    },
    // gridded fields
    {
      path: "/v1/field-area-means",
      label: "demo field, globe",
      body: () => ({ field: FIELD }),
      ci: true,
    },
    {
      path: "/v1/field-area-means",
      label: "5° field, 600 months, band",
      body: () => ({ field: field5, region: { kind: "band", south: -30, north: 30 } }),
    },
    {
      path: "/v1/solar-signal-maps",
      label: "demo field, 200 surrogates",
      body: () => ({ field: FIELD, solar: TSIM, surrogates: 200 }),
      ci: true,
    },
    {
      path: "/v1/solar-signal-maps",
      label: "demo field, no surrogates",
      body: () => ({ field: FIELD, solar: TSIM, surrogates: 0 }),
    },
    {
      path: "/v1/solar-signal-maps",
      label: "5° field, 600 months, 100 surrogates",
      body: () => ({ field: field5, solar: TSIM, surrogates: 100 }),
    },
    {
      path: "/v1/field-composites",
      label: "demo field, 5 + 5 dates, 2,000 sets",
      body: () => ({
        field: FIELD,
        epoch_dates: ["1969-03", "1980-01", "1991-01", "2001-06", "2014-04"],
        contrast_dates: ["1964-10", "1976-03", "1986-09", "1996-08", "2008-12"],
        random_sets: 2000,
      }),
      ci: true,
    },
    {
      path: "/v1/field-composites",
      label: "5° field, cycle table, 1,000 sets",
      body: (r) => ({ field: field5, cycle_run: r.cycles, random_sets: 1000 }),
    },
    // further cases for the calibration script (sizes and options the models were not fitted on)
    {
      path: "/v1/spectra",
      label: "8,000 days, periods spaced in period",
      body: () => ({
        series: inventedDaily(8000),
        periods: { min: 0.05, max: 20, count: 3000, spacing: "period" },
      }),
    },
    {
      path: "/v1/spectra",
      label: "8,000 days, 30 permutations",
      body: () => ({
        series: inventedDaily(8000),
        false_alarm: "monte_carlo",
        monte_carlo_null: "permutation",
        replicates: 30,
      }),
    },
    {
      path: "/v1/lag-correlations",
      label: "annual, 3,000 surrogates",
      body: () => ({ solar: TSIM, climate: TEMP, resolution: "annual", surrogates: 3000 }),
    },
    {
      path: "/v1/lag-correlations",
      label: "500 AR(1) surrogates, lags ±120",
      body: () => ({
        solar: TSIM,
        climate: TEMP,
        significance: "ar1",
        surrogates: 500,
        max_lag: 120,
      }),
    },
    {
      path: "/v1/attributions",
      label: "OLS + HAC, 180 combinations",
      body: () => ({ ...attribution([12, 16], [0, 8]), errors: "ols_hac" }),
    },
    {
      path: "/v1/attributions",
      label: "annual, exhaustive 4 × 4 × 6",
      body: () => ({ ...attribution([0, 3], [0, 5]), resolution: "annual" }),
    },
    {
      path: "/v1/composites",
      label: "annual, 5,000 / 5,000",
      body: (r) => ({
        series: TEMP,
        cycle_run: r.cycles,
        resolution: "annual",
        bootstrap: 5000,
        random_sets: 5000,
      }),
    },
    {
      path: "/v1/cycle-forecasts",
      label: "half the SSN, defaults",
      body: () => ({ series: inline(ssn, 0, half + 20) }),
    },
    {
      path: "/v1/cycle-fits",
      label: "amplitude-dependent width",
      body: () => ({ series: SSN, width: "amplitude_dependent" }),
    },
    {
      path: "/v1/energy-balance",
      label: "two-box sinusoid, 500 years",
      body: () => ({ model: "two_box", sinusoid: { years: 500, steps_per_year: 365 } }),
    },
    {
      path: "/v1/irradiance/models",
      label: "no cross-validation",
      body: (r) => ({
        tsi: TSI,
        sunspot_number: SSN,
        folds: 0,
        terms: [{ name: "mg_ii", series: MG, role: "facular" }, {
          name: "psi",
          series: r.psi,
          role: "sunspot_darkening",
        }],
      }),
    },
    {
      path: "/v1/smoothing",
      label: "30,000 months, gaussian σ 300",
      body: () => ({ series: inventedMonthly(30_000), method: "gaussian", sigma: 300 }),
    },
    {
      path: "/v1/spectra",
      label: "50,000 days, default grid (125,000)",
      body: () => ({ series: inventedDaily(50_000) }),
    },
    {
      path: "/v1/resampling",
      label: "monthly SSN → annual",
      body: () => ({ series: SSN, to: "annual" }),
    },
    {
      path: "/v1/field-area-means",
      label: "4° land field, 480 months, box",
      body: () => ({
        field: land4,
        region: { kind: "box", south: 0, north: 60, west: 0, east: 90 },
      }),
    },
    {
      path: "/v1/solar-signal-maps",
      label: "4° land field, lags 0–12, ENSO control, 300",
      body: () => ({
        field: land4,
        solar: TSIM,
        max_lag: 12,
        controls: [{ name: "enso", series: ENSO }],
        surrogates: 300,
      }),
    },
    {
      path: "/v1/solar-signal-maps",
      label: "demo field, high-pass 30 yr, 200",
      body: () => ({
        field: FIELD,
        solar: TSIM,
        preprocess: "high_pass",
        high_pass_cutoff_years: 30,
        surrogates: 200,
      }),
    },
    {
      path: "/v1/field-composites",
      label: "4° land field, 4 dates, 5,000 sets",
      body: () => ({
        field: land4,
        epoch_dates: ["1969-03", "1980-01", "1991-01", "2001-06"],
        random_sets: 5000,
      }),
    },
  ];
}

/** One measured case: the estimate and the measured computing time, seconds. */
export interface Measured {
  kind: string;
  label: string;
  estimate: number;
  measured: number;
  factor: number;
}

/**
 * Compute a case in this thread (the fastest of `repeats`, after one warm-up run, in CPU time
 * of the thread) and its estimate on this machine, with a machine-speed factor measured in the
 * same way (by default just before), so that the comparison holds on a machine shared with
 * other work.
 */
export async function measureCase(
  svc: TestService,
  c: EstimateCase,
  runs: Record<string, string>,
  repeats: number,
  factor = measureMachineSpeedFactor(),
): Promise<Measured> {
  const kind = RUN_KINDS.find((k) => k.path === c.path) as RunKind;
  const params = kind.request.parse(c.body(runs)) as Record<string, unknown>;
  const prep = await svc.runs.prepare(kind, params);
  for (const s of prep.inline.values()) await svc.store.putSeries(s);
  const w0 = threadCpuSeconds();
  await svc.runs.computeResult(kind, prep.params, prep);
  // a long case once more is enough: its CPU time is long against the clock's steps
  const n = threadCpuSeconds() - w0 > 0.3 ? 1 : repeats;
  let best = Infinity;
  for (let r = 0; r < n; r++) {
    // batches of at least 0.1 s: a running thread's CPU time is updated every few ms only
    const w0 = performance.now(), t0 = threadCpuSeconds();
    let k = 0;
    do {
      await svc.runs.computeResult(kind, prep.params, prep);
      k++;
    } while (performance.now() - w0 < 100);
    best = Math.min(best, (threadCpuSeconds() - t0) / k);
  }
  const estimate = estimateRunSeconds(kind, prep.params, prep, () => factor);
  return { kind: kind.kind, label: c.label, estimate, measured: best, factor };
}

/** Store a case's run (for the cases after it) and return its id; the PSI output of a
 * darkening run is saved as a series under `psi`. */
export async function storeCase(
  svc: TestService,
  c: EstimateCase,
  runs: Record<string, string>,
): Promise<void> {
  if (!c.saveAs) return;
  const res = await svc.post(c.path, c.body(runs), { prefer: "respond-async" });
  const id = (await res.json()).id as string;
  await svc.runs.settle();
  runs[c.saveAs] = id;
  if (c.saveAs === "darkening") {
    const saved = await svc.post(`/v1/runs/${id}/outputs/psi/series`, {});
    runs.psi = (await saved.json()).id;
  }
}
