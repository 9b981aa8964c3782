/**
 * Adapter of the "spectral-irradiance-reconstructions" analysis: the target cells and the
 * proxies as a TSI reconstruction reads them (common/reconstruction_inputs.ts), every band's
 * reconstruction with prediction intervals (core/irradiance/proxy_reconstruction.ts), the
 * integrals over the covered range and the requested ranges with the cross-band correlation
 * (core/irradiance/spectral_band_models.ts), the TSI reconstruction of the same proxies and
 * the integral's difference from it (reconstruction_difference.ts), and the cycle variability
 * per band (band_cycle_variability.ts); with `realizations`, the members of every band drawn
 * jointly on the pool (./ensemble.ts, core/irradiance/spectral_band_ensemble.ts), the members of
 * each integral as weighted sums of the bands', and every band and integral's interval from its
 * members (common/ensemble_members.ts).
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import {
  type BandCorrelations,
  bandCycleVariability,
  bandIrradianceFactor,
  bandMembers,
  type BandValueKind,
  differenceModel,
  integrateBandMembers,
  integrateBandModels,
  type LeanReconstruction,
  predictionQuantile,
  reconstructFromProxies,
  reconstructFromProxiesMany,
  type Reconstruction,
  type ReconstructionCells,
  reconstructionCoverage,
  type ReconstructionModel,
  SOURCE_BACK_EXTENDED,
  summariseDifference,
  type WavelengthBand,
} from "../../../core/irradiance/mod.ts";
import {
  coverageJson,
  coverageWarnings,
  directProxies,
  extrapolationWarnings,
  micro,
  reconstructionCells,
  reconstructionModel,
  reconstructionOutputParts,
  type StoredProxyModel,
  type SunspotInput,
  sunspotInput,
  type TargetCells,
  targetCells,
} from "../common/reconstruction_inputs.ts";
import { rangeWeightsAt } from "../common/wavelength_bands.ts";
import { ASSESSMENT_CAUTION, PRE_SATELLITE_CAUTION } from "../common/irradiance_notes.ts";
import type { OutputSeries } from "../../runs/kind.ts";
import { spectralIrradianceModels } from "../spectral_irradiance_models/mod.ts";
import type { SpectralModelResultOut } from "../spectral_irradiance_models/result.ts";
import type { SpectralReconstructionParams } from "./request.ts";
import type { SpectralReconstructionResultIn } from "./result.ts";
import {
  checkEnsembleSize,
  type MemberBand,
  memberBand,
  MIN_MEMBERS_FOR_QUANTILES,
} from "../common/ensemble_members.ts";
import {
  bandCaution,
  proxyReconstructionBand,
  type UncertaintyBand,
} from "../common/uncertainty_band.ts";
import { normalQuantile } from "../../../core/stats/mod.ts";
import {
  type DrawnSpectralEnsemble,
  drawSpectralEnsemble,
  memberOffsets,
  type SpectralEnsembleJson,
} from "./ensemble.ts";

type Result = SpectralReconstructionResultIn;

/** Most band values (cells × bands) a reconstruction may hold. */
export const MAX_BAND_VALUES = 2_000_000;

/** The stored spectral model as this adapter reads it. */
interface SpectralModel {
  stored: SpectralModelResultOut;
  tsi: StoredProxyModel;
  bands: WavelengthBand[];
  kind: BandValueKind;
  models: ReconstructionModel[];
  /** The bands' residual correlations; null when the model has none. */
  correlations: BandCorrelations | null;
}

/** Reconstruct every band, the integrals and the comparison with TSI over the period. */
export async function computeSpectralReconstruction(
  params: SpectralReconstructionParams,
  ctx: RunContext,
): Promise<Result> {
  const model = spectralModel(ctx.resultOf(spectralIrradianceModels, params.model, "/model"));
  const maxCells = Math.floor(MAX_BAND_VALUES / model.bands.length);
  const cells = targetCells(params, maxCells);
  if (params.realizations > 0) {
    // every band's members and each integral's (the covered range and the requested ranges)
    const series = model.bands.length + (model.stored.correlation ? 1 + params.ranges.length : 0);
    checkEnsembleSize(params.realizations, cells.keys.length * series, [
      "/realizations",
      "/period",
      "/resolution",
    ]);
  }
  const direct = directProxies(params, ctx, model.tsi, cells);
  const sunspot = params.sunspot_number === undefined ? null : sunspotInput(
    params,
    ctx,
    model.tsi,
    cells,
    `the TSI model of spectral model run ${params.model}`,
  );
  const input = reconstructionCells(model.tsi, cells, direct, sunspot);
  const bands = reconstructFromProxiesMany(
    model.models,
    input,
    model.stored.bands.map((b) => predictionQuantile(params.level, b.df_residual)),
    // the bands' values and intervals only: their error models are not read here
    { errorModel: false },
  );
  const tsi = reconstructFromProxies(
    reconstructionModel(model.tsi),
    input,
    predictionQuantile(params.level, model.tsi.model.df_residual),
  );
  const integral = integrals(params, model, input);
  const reference = integral?.covered.rec ?? bands[0];
  const coverage = reconstructionCoverage(reference, cells.time);
  if (coverage.direct.cells + coverage.backExtended.cells === 0) {
    throw new InputProblem(
      "/period",
      "no cell of the period has every model proxy (directly or mapped from sunspot number)",
      { reason: "no_overlap" },
    );
  }
  const chart = chartBands(params, model.bands);
  ctx.progress(0.1);
  const ens = params.realizations > 0
    ? await drawSpectralEnsemble(ctx, model.models, input, model.correlations, params)
    : null;
  const bandBands = ens
    ? bands.map((r, b) =>
      memberBand(r.value, bandMembers(ens.members, ens.bands, b), ens.realizations, params.level)
    )
    : null;
  const integralMembers = (weights: ArrayLike<number>) =>
    ens ? integrateBandMembers(ens.members, ens.bands, weights) : null;
  const outputs: Record<string, OutputSeries> = { tsi: tsiOutput(params, cells, tsi) };
  const integralBands: Record<string, { members: Float64Array; band: MemberBand }> = {};
  if (integral) {
    for (const r of [integral.covered, ...integral.ranges]) {
      const m = integralMembers(r.weights);
      const band = m
        ? memberBand(r.rec.value, m, ens!.realizations, params.level, "ensemble members")
        : null;
      if (m && band) integralBands[r.name] = { members: m, band };
      outputs[r.name] = r.output(cells, band);
    }
    outputs.integral_minus_tsi = integral.difference(cells, tsi);
  }
  const spectrum = spectrumBlock(params, model, cells, bands, bandBands);
  const band = spectralBand(params, reference, sunspot);
  return {
    model: params.model,
    tsi_model: model.stored.tsi_model.run,
    resolution: cells.resolution,
    period: cells.span,
    level: params.level,
    sunspot_conversion: sunspot?.conversion ?? null,
    sunspot_uncertainty: sunspot?.errors.json ?? null,
    coverage: coverageJson(coverage),
    source_segments: coverage.segments,
    spectrum,
    ranges: integral?.ranges.map((r) => r.json) ?? [],
    consistency: integral ? integral.consistency(cells, tsi) : null,
    variability: variability(model, cells, bands, tsi),
    chart_bands: chart,
    outputs,
    band,
    ensemble: ens ? ensembleJson(params, ens, spectrum, bandBands!, outputs, integralBands) : null,
    warnings: [
      ...ensembleWarnings(params, ens),
      ...(sunspot?.warnings ?? []),
      ...coverageWarnings(coverage.missing, cells, sunspot),
      ...extrapolationWarnings(model.tsi, direct, sunspot, reference),
      ...backExtensionWarning(model, sunspot),
      ...(integral?.warnings(cells) ?? [
        "The spectral model has no cross-band error correlation (its bands share fewer than 10 cells): no integral over bands, no integrated range and no comparison with TSI.",
      ]),
    ],
    cautions: [
      PRE_SATELLITE_CAUTION,
      "A sum over bands is not TSI unless they cover the whole spectrum; nothing outside the bands is invented.",
      "Band sensitivities come from a short spectral record, so bands are more model-dependent back in time than TSI; integrals include the bands' error correlation (analytically, or through members drawn jointly across bands).",
      bandCaution(band),
      ASSESSMENT_CAUTION,
    ],
  };
}

/** The stored spectral model, with each band's model as core reads it. */
function spectralModel(stored: SpectralModelResultOut): SpectralModel {
  const tsi: StoredProxyModel = {
    model: stored.tsi_model.model,
    mappings: stored.tsi_model.mappings,
  };
  const terms = stored.tsi_model.model.terms.map((t) => ({
    role: t.role,
    quietLevel: t.quiet_level,
  }));
  const corr = stored.correlation;
  return {
    stored,
    tsi,
    correlations: corr
      ? {
        residual: { lag0: corr.residual_lag0, lag1: corr.residual_lag1 },
        backExtension: corr.back_extension_lag0 && corr.back_extension_lag1
          ? { lag0: corr.back_extension_lag0, lag1: corr.back_extension_lag1 }
          : null,
      }
      : null,
    bands: stored.bands.map((b) => b.band),
    kind: stored.value_kind,
    models: stored.bands.map((b) => ({
      coefficients: b.coefficients,
      covariance: b.covariance,
      terms,
      psiReference: stored.tsi_model.model.psi_reference,
      residualSd: b.residual_sd,
      rho: b.rho,
      stepDays: stored.step_days,
      backExtension: b.back_extension
        ? {
          residualSd: b.back_extension.residual_sd,
          rho: b.back_extension.rho,
          stepDays: b.back_extension.step_days,
        }
        : null,
    })),
  };
}

/** The output name of a range: range_<lower>_<upper>, "p" for a decimal point. */
function rangeName(r: WavelengthBand): string {
  const s = (x: number) => String(x).replace(".", "p").replace(/[^0-9p]/g, "");
  return `range_${s(r.lower)}_${s(r.upper)}`;
}

/**
 * The integral over the covered range and each requested range as models (null without the
 * model's cross-band correlation), with their output series, the difference from TSI and its
 * summary.
 */
function integrals(
  params: SpectralReconstructionParams,
  model: SpectralModel,
  input: ReconstructionCells,
) {
  const correlations = model.correlations;
  if (!correlations) {
    if (params.ranges.length) {
      throw new InputProblem(
        "/ranges",
        `spectral model run ${params.model} has no cross-band error correlation (its bands share fewer than 10 cells), so it cannot integrate over bands`,
        { reason: "no_correlation" },
      );
    }
    return null;
  }
  const minDf = Math.min(...model.stored.bands.map((b) => b.df_residual));
  const z = predictionQuantile(params.level, minDf);
  const of = (range: WavelengthBand, pointer: string, name: string, title: string) => {
    const w = rangeWeightsAt(model.bands, range, model.kind, pointer);
    const m = integrateBandModels(model.models, w.weights, correlations);
    const rec = reconstructFromProxies(m, input, z);
    return {
      name,
      model: m,
      rec,
      weights: w.weights,
      json: { output: name, range, covered_nm: w.coveredWidth, missing: w.missing },
      output: (cells: TargetCells, band: MemberBand | null): OutputSeries =>
        irradianceOutput(params, cells, rec, title, w.missing, band),
    };
  };
  const cover = model.stored.integral_check?.coverage ??
    { lower: model.bands[0].lower, upper: model.bands[model.bands.length - 1].upper };
  const covered = of(
    { lower: cover.lower, upper: cover.upper },
    "/model",
    "integral",
    `Irradiance integrated over the bands (${cover.lower}–${cover.upper} nm)`,
  );
  const ranges = params.ranges.map((r, i) =>
    of(r, `/ranges/${i}`, rangeName(r), `Irradiance integrated over ${r.lower}–${r.upper} nm`)
  );
  const diffModel = differenceModel(covered.model, reconstructionModel(model.tsi));
  const d = reconstructFromProxies(diffModel, input, 1.96);
  const check = model.stored.integral_check;
  return {
    covered,
    ranges,
    difference: (cells: TargetCells, tsi: Reconstruction): OutputSeries => {
      return {
        name: "Integral over the bands minus TSI",
        quantity: "band_irradiance",
        units: "W m-2",
        time: Array.from(cells.time),
        value: micro(maskWhere(d.value, tsi.value)),
        uncertainty: micro(maskWhere(d.sd, tsi.value)),
        description: "The integral over the covered bands minus the TSI reconstruction of the " +
          "same proxies; uncertainty from the two models' coefficients and the mapped proxies " +
          "(not measurement noise). With partial spectral coverage it includes the irradiance " +
          "outside the bands.",
      };
    },
    consistency: (cells: TargetCells, tsi: Reconstruction): NonNullable<Result["consistency"]> => {
      const s = summariseDifference(d, cells.time, 1.96);
      let inside = 0, both = 0;
      for (let i = 0; i < cells.time.length; i++) {
        const v = covered.rec.value[i];
        if (!Number.isFinite(v) || !Number.isFinite(tsi.value[i])) continue;
        both++;
        if (v >= tsi.lower[i] && v <= tsi.upper[i]) inside++;
      }
      const full = check?.full_coverage ?? false;
      return {
        spectral_coverage: check!.coverage,
        full_coverage: full,
        compared_cells: s.cells,
        within: s.within,
        fraction_within: s.fractionWithin,
        inside_tsi_interval: both ? inside / both : null,
        mean_difference: s.meanDifference,
        rms_difference: s.rmsDifference,
        max_abs_z: s.maxAbsZ,
        outside: s.outside.map((o) => ({
          start: o.start,
          end: o.end,
          cells: o.cells,
          max_abs_difference: o.maxAbsDifference,
        })),
        verdict: consistencyVerdict(full, check!.coverage, s),
      };
    },
    warnings: (cells: TargetCells): string[] => {
      const out: string[] = [];
      const s = summariseDifference(d, cells.time, 1.96);
      if ((check?.full_coverage ?? false) && s.fractionWithin !== null && s.fractionWithin < 0.95) {
        out.push(consistencyVerdict(true, check!.coverage, s));
      }
      for (const r of ranges) {
        if (r.json.missing.length) {
          out.push(
            `Range ${r.json.range.lower}–${r.json.range.upper} nm: no band covers ${
              r.json.missing.map(([a, b]) => `${a}–${b} nm`).join(", ")
            }; the integral leaves these wavelengths out.`,
          );
        }
      }
      return out;
    },
  };
}

/** NaN where the reference has no value. */
function maskWhere(x: Float64Array, ref: Float64Array): Float64Array {
  return x.map((v, i) => (Number.isFinite(ref[i]) ? v : NaN));
}

/** The comparison with TSI in words. */
function consistencyVerdict(
  full: boolean,
  cover: { lower: number; upper: number; blackbody_fraction: number; quiet_level_ratio: number },
  s: ReturnType<typeof summariseDifference>,
): string {
  const pct = (x: number | null) => (x === null ? "—" : `${(100 * x).toFixed(1)} %`);
  const where =
    s.outside.slice(0, 5).map((o) =>
      `${o.start.toFixed(2)}–${o.end.toFixed(2)} (up to ${o.maxAbsDifference.toPrecision(3)} W m-2)`
    ).join(", ") + (s.outside.length > 5 ? ` and ${s.outside.length - 5} more` : "");
  if (!full) {
    return `The bands cover ${cover.lower}–${cover.upper} nm (${
      pct(cover.blackbody_fraction)
    } of a 5772 K blackbody, ${
      pct(cover.quiet_level_ratio)
    } of the TSI model's quiet level), so their integral is not TSI: it differs from the TSI reconstruction by ${
      s.meanDifference?.toPrecision(4) ?? "—"
    } W m-2 on average (RMS ${
      s.rmsDifference?.toPrecision(4) ?? "—"
    }), the irradiance outside the bands plus error; nothing outside the bands is invented.`;
  }
  if (s.fractionWithin !== null && s.fractionWithin >= 0.95) {
    return `The integral over the bands agrees with the TSI reconstruction of the same proxies within the uncertainty of their difference in ${
      pct(s.fractionWithin)
    } of ${s.cells} cells (largest |z| ${s.maxAbsZ?.toFixed(2)}).`;
  }
  return `The integral over the bands differs from the TSI reconstruction of the same proxies by more than the uncertainty of their difference in ${
    s.cells - s.within
  } of ${s.cells} cells (mean difference ${s.meanDifference?.toPrecision(3)} W m-2, largest |z| ${
    s.maxAbsZ?.toFixed(2)
  }); where: ${where}.`;
}

/** The TSI reconstruction of the same proxies as an output. */
function tsiOutput(
  params: SpectralReconstructionParams,
  cells: TargetCells,
  rec: Reconstruction,
): OutputSeries {
  return {
    ...irradianceOutput(params, cells, rec, "TSI reconstructed from the same proxies", []),
    quantity: "tsi",
    description:
      `The TSI model the spectral model builds on, applied to the same proxies; ${cells.resolution} means, values rounded to 1e-6 W m-2`,
  };
}

/** An irradiance series (W m-2) with its interval, rounded to 1e-6. */
function irradianceOutput(
  params: SpectralReconstructionParams,
  cells: TargetCells,
  rec: Reconstruction,
  name: string,
  missing: [number, number][],
  band: MemberBand | null = null,
): OutputSeries {
  return {
    name,
    quantity: "band_irradiance",
    units: "W m-2",
    ...reconstructionOutputParts(cells, rec, params.level, band),
    description:
      `Spectral model run ${params.model}, ${cells.resolution} means, values rounded to 1e-6 W m-2${
        missing.length
          ? `; no band covers ${missing.map(([a, b]) => `${a}–${b} nm`).join(", ")} (left out)`
          : ""
      }`,
  };
}

/** Every band's values and uncertainties over the period. */
function spectrumBlock(
  params: SpectralReconstructionParams,
  model: SpectralModel,
  cells: TargetCells,
  bands: LeanReconstruction[],
  members: MemberBand[] | null,
): Result["spectrum"] {
  const units = model.stored.units;
  const digits = (x: ArrayLike<number>) => significant(x, 9);
  // an ensemble's band where the central value exists
  const gap = (x: Float64Array, b: number) =>
    x.map((v, i) => (Number.isFinite(bands[b].value[i]) ? v : NaN));
  if (members) {
    return {
      name: "Reconstructed spectral irradiance",
      quantity: model.stored.quantity,
      units,
      bands: model.bands,
      time: Array.from(cells.time),
      value: bands.map((r) => digits(r.value)),
      uncertainty: members.map((m, b) => digits(gap(m.sd, b))),
      interval: members[0].interval,
      interval_quantiles: members.map(() => normalQuantile(1 - (1 - params.level) / 2)),
      lower: members.map((m, b) => digits(gap(m.lower, b))),
      upper: members.map((m, b) => digits(gap(m.upper, b))),
      description:
        `Spectral model run ${params.model}, ${cells.resolution} means, ${units} per band, 9 significant digits; uncertainty = the members' SD, lower/upper = the ${
          members[0].interval
        }`,
    };
  }
  return {
    name: "Reconstructed spectral irradiance",
    quantity: model.stored.quantity,
    units,
    bands: model.bands,
    time: Array.from(cells.time),
    value: bands.map((r) => digits(r.value)),
    uncertainty: bands.map((r) => digits(r.sd)),
    interval: `${
      (params.level * 100).toFixed(params.level === 0.95 ? 0 : 1)
    } % prediction interval`,
    interval_quantiles: model.stored.bands.map((b) =>
      predictionQuantile(params.level, b.df_residual)
    ),
    description:
      `Spectral model run ${params.model}, ${cells.resolution} means, ${units} per band, 9 significant digits; bounds = value ± interval_quantile × uncertainty`,
  };
}

/** Values to n significant digits (bands span orders of magnitude); null where missing. */
function significant(x: ArrayLike<number>, n: number): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) {
    out[i] = Number.isFinite(x[i]) ? Number(x[i].toPrecision(n)) : null;
  }
  return out;
}

/** Cycle variability of every band between the TSI reconstruction's cycle extrema. */
function variability(
  model: SpectralModel,
  cells: TargetCells,
  bands: LeanReconstruction[],
  tsi: Reconstruction,
): Result["variability"] {
  const v = bandCycleVariability(cells.time, bands.map((r) => r.value), tsi.value);
  return {
    cycles: v.cycles.map((c) => ({ minimum_year: c.minimumYear, maximum_year: c.maximumYear })),
    bands: v.bands.map((b, i) => ({ band: model.bands[i], ...b })),
  };
}

/** Indices of the bands drawn over time: those holding the chosen wavelengths, else spread. */
function chartBands(params: SpectralReconstructionParams, bands: WavelengthBand[]): number[] {
  if (params.chart_bands.length) {
    return params.chart_bands.map((w, i) => {
      const b = bands.findIndex((x) => w >= x.lower && w < x.upper);
      if (b < 0) {
        throw new InputProblem(
          `/chart_bands/${i}`,
          `no band of the model holds ${w} nm (bands cover ${bands[0].lower}–${
            bands[bands.length - 1].upper
          } nm)`,
          { reason: "no_band" },
        );
      }
      return b;
    });
  }
  const n = bands.length, k = Math.min(4, n);
  return [
    ...new Set(Array.from({ length: k }, (_, j) => Math.round((j * (n - 1)) / Math.max(1, k - 1)))),
  ];
}

/** A model calibrated without back-extension cannot fill the sunspot-only era. */
function backExtensionWarning(model: SpectralModel, sunspot: SunspotInput | null): string[] {
  if (!sunspot || model.models.every((m) => m.backExtension)) return [];
  return [
    "The spectral model was calibrated without a sunspot series, so its bands have no back-extension residual process: cells where a proxy must be mapped from sunspot number have no value. Calibrate the spectral model with sunspot_number to back-extend.",
  ];
}

/** Band values to irradiance factors (exported for the spectrum route's integrals). */
export function bandFactors(bands: WavelengthBand[], kind: BandValueKind): number[] {
  return bands.map((b) => bandIrradianceFactor(b, kind));
}

/** What the bands' intervals are made of and what they leave out. */
function spectralBand(
  params: SpectralReconstructionParams,
  reference: LeanReconstruction,
  sunspot: SunspotInput | null,
): UncertaintyBand {
  const back = reference.source.includes(SOURCE_BACK_EXTENDED);
  return proxyReconstructionBand(
    params.realizations,
    back,
    Boolean(sunspot?.errors.cells),
    MIN_MEMBERS_FOR_QUANTILES,
    [
      ...(back ? sunspot?.errors.notIncluded ?? [] : []),
      "the uncertainty of the spectral record's own calibration (its absolute scale per band)",
    ],
  );
}

/** Warnings of a small ensemble, and what its draw had to adjust. */
function ensembleWarnings(
  params: SpectralReconstructionParams,
  ens: DrawnSpectralEnsemble | null,
): string[] {
  if (!ens) return [];
  return [
    ...(ens.realizations < MIN_MEMBERS_FOR_QUANTILES
      ? [
        `The bands rest on ${ens.realizations} members: each is the value ± ${
          normalQuantile(1 - (1 - params.level) / 2).toFixed(3)
        } × the members' SD; ask for 100 or more realizations for quantiles of the members.`,
      ]
      : []),
    ...ens.adjusted.map((a) => `Ensemble: ${a}.`),
  ];
}

/** The members in their compact stored form: offsets from each stored central value. */
function ensembleJson(
  params: SpectralReconstructionParams,
  ens: DrawnSpectralEnsemble,
  spectrum: Result["spectrum"],
  bandBands: MemberBand[],
  outputs: Record<string, OutputSeries>,
  integrals: Record<string, { members: Float64Array; band: MemberBand }>,
): SpectralEnsembleJson {
  const N = ens.realizations;
  return {
    realizations: N,
    seed: params.seed,
    bands: bandBands.map((b, k) =>
      memberOffsets(spectrum.value[k], bandMembers(ens.members, ens.bands, k), N, b.sd)
    ),
    outputs: Object.fromEntries(
      Object.entries(integrals).map(([name, x]) => [
        name,
        memberOffsets(outputs[name].value as (number | null)[], x.members, N, x.band.sd),
      ]),
    ),
    adjusted: ens.adjusted,
  };
}
