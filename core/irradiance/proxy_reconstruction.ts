/**
 * TSI reconstruction from a calibrated proxy model, with prediction intervals.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { ar1MeanVarianceFactor } from "./ar1_mean_variance.ts";
import { proxyRegressor, proxyRegressorScale, type ProxyRole } from "./proxy_model_evaluation.ts";

/** The parts of a calibrated model a reconstruction needs. */
export interface ReconstructionModel {
  coefficients: number[];
  covariance: number[][];
  terms: { role: ProxyRole; quietLevel: number }[];
  psiReference: number;
  /** Marginal SD and lag-1 autocorrelation of the model residuals, and their spacing (days). */
  residualSd: number;
  rho: number;
  stepDays: number;
  /**
   * Residual process of the sunspot-number-only model (TSI minus the model fed with mapped
   * proxies), estimated in the overlap era at the sunspot series' spacing; null when no
   * mapping was fitted.
   */
  backExtension: { residualSd: number; rho: number; stepDays: number } | null;
}

/** Proxy values per target cell. */
export interface ReconstructionCells {
  /** Length of each cell in days. */
  days: Float64Array;
  /** Direct proxy values per term (cell means), NaN where the proxy has no value. */
  direct: Float64Array[];
  /** Values mapped from sunspot number per term, with parameter variance; null = no mapping. */
  mapped: ({ value: Float64Array; paramVariance: Float64Array } | null)[];
}

/** Source of a reconstructed value. */
export const SOURCE_NONE = 0, SOURCE_DIRECT = 1, SOURCE_BACK_EXTENDED = 2;

/** Result of {@link reconstructFromProxies}. */
export interface Reconstruction {
  value: Float64Array;
  /** One-sigma predictive SD, W m-2. */
  sd: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** 0 = no value, 1 = all proxies direct, 2 = some proxy mapped from sunspot number. */
  source: Uint8Array;
}

/**
 * Reconstruct TSI per cell: ŷ = xᵀβ with x the cell's regressors (intercept, F_k − F_k,Q,
 * −S_ref·PSI; core/irradiance/proxy_model_evaluation.ts), and the predictive variance
 *
 *   Var = xᵀΣ_β x + Σ_k (β_k² + Σ_β,kk)·s_k²·v_k + σ_e²·f(m, ρ)/m
 *
 * where v_k is the parameter variance of a mapped proxy (0 for direct values), s_k its
 * regressor scale (1, or S_ref for PSI), σ_e and ρ the residual SD and lag-1 autocorrelation
 * (of the direct model, or of the sunspot-only model where any proxy is mapped), m the number
 * of residual time steps in the cell and f the AR(1) variance factor of a mean of m values
 * (see {@link ar1MeanVarianceFactor}). The interval is ŷ ± z·√Var with z the two-sided
 * quantile given (e.g. t(0.975, df)). Mapped and direct parameter uncertainties are treated as
 * independent; the residual terms are estimated directly, so they carry the correlation
 * between the proxies' mapping errors.
 *
 * @param model {@link ReconstructionModel}
 * @param cells {@link ReconstructionCells}
 * @param z quantile for the interval (1.96 for 95 % normal)
 * @returns {@link Reconstruction}; cells without proxies get NaN
 * @throws {InputError} (field `cells`) when the cells do not match the model's terms, (field
 *   `model`) when the coefficients do not
 * @example
 * ```ts
 * import { reconstructFromProxies } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const r = reconstructFromProxies({
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1, backExtension: null,
 * }, { days: Float64Array.of(1, 31), direct: [Float64Array.of(0.16, 0.16)], mapped: [null] }, 1.96);
 * assert.ok(Math.abs(r.value[0] - (1360.8 + 1.35)) < 1e-9);
 * assert.ok(r.sd[1] < r.sd[0]); // a monthly mean is less uncertain than a day
 * ```
 */
export function reconstructFromProxies(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  z: number,
): Reconstruction {
  return reconstructFromProxiesMany([model], cells, [z])[0];
}

/**
 * {@link reconstructFromProxies} for several models on the same terms (the bands of a spectral
 * model, and their integrals), over the same cells: each cell's regressors, mapped-proxy
 * variances and source are formed once and applied to every model, and the AR(1) factor of
 * each distinct cell length is computed once per model. Each result equals what
 * {@link reconstructFromProxies} gives for that model alone, bit for bit.
 *
 * @param models the models: same term roles, quiet levels and S_ref
 * @param cells {@link ReconstructionCells}
 * @param z per model, the quantile for its interval
 * @returns one {@link Reconstruction} per model
 * @throws {InputError} as {@link reconstructFromProxies}; (field `models`) when the models'
 *   terms differ, (field `z`) when there is not one quantile per model
 * @example
 * ```ts
 * import { reconstructFromProxiesMany } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const band = (c: number, a: number) => ({
 *   coefficients: [c, a], covariance: [[1e-6, 0], [0, 1e-2]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.01, rho: 0.5, stepDays: 1, backExtension: null,
 * });
 * const [uv, vis] = reconstructFromProxiesMany([band(0.5, 20), band(1.8, 2)],
 *   { days: Float64Array.of(31), direct: [Float64Array.of(0.16)], mapped: [null] }, [1.96, 1.96]);
 * assert.ok(Math.abs(uv.value[0] - 0.7) < 1e-12 && Math.abs(vis.value[0] - 1.82) < 1e-12);
 * ```
 */
export function reconstructFromProxiesMany(
  models: readonly ReconstructionModel[],
  cells: ReconstructionCells,
  z: readonly number[],
): Reconstruction[] {
  if (models.length === 0) return [];
  const first = models[0];
  const K = first.terms.length;
  if (cells.direct.length !== K || cells.mapped.length !== K) {
    throw new InputError(
      `Cannot reconstruct: model has ${K} terms, cells have ${cells.direct.length}`,
      { field: "cells", reason: "length_mismatch", value: cells.direct.length },
    );
  }
  if (z.length !== models.length) {
    throw new InputError(`Cannot reconstruct: ${z.length} quantiles for ${models.length} models`, {
      field: "z",
      reason: "length_mismatch",
      value: z.length,
    });
  }
  models.forEach((model, j) => {
    if (model.coefficients.length !== K + 1) {
      throw new InputError("Cannot reconstruct: coefficients do not match the terms", {
        field: "model",
        reason: "length_mismatch",
        value: model.coefficients.length,
      });
    }
    const same = model.psiReference === first.psiReference && model.terms.length === K &&
      model.terms.every((t, k) =>
        t.role === first.terms[k].role && t.quietLevel === first.terms[k].quietLevel
      );
    if (!same) {
      throw new InputError(
        `Cannot reconstruct together: model ${j} has other terms than model 0`,
        { field: "models", reason: "invalid", index: j },
      );
    }
  });
  const n = cells.days.length, M = models.length;
  const scale = first.terms.map((t) => proxyRegressorScale(t.role, first.psiReference));
  const out: Reconstruction[] = models.map(() => ({
    value: new Float64Array(n),
    sd: new Float64Array(n),
    lower: new Float64Array(n),
    upper: new Float64Array(n),
    source: new Uint8Array(n),
  }));
  // the AR(1) variance factor of each distinct cell length, per model and process
  const lengths = new Map<number, number>();
  const lengthIndex = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let k = lengths.get(cells.days[i]);
    if (k === undefined) lengths.set(cells.days[i], k = lengths.size);
    lengthIndex[i] = k;
  }
  const residVar = (sdr: number, rho: number, step: number) =>
    Float64Array.from(lengths.keys(), (days) => {
      const m = Math.max(1, days / step);
      return sdr * sdr * (ar1MeanVarianceFactor(m, rho) / m);
    });
  const direct = models.map((m) => residVar(m.residualSd, m.rho, m.stepDays));
  const back = models.map((m) =>
    m.backExtension
      ? residVar(m.backExtension.residualSd, m.backExtension.rho, m.backExtension.stepDays)
      : null
  );
  const x = new Float64Array(K + 1);
  const mappedAt = new Int32Array(K), mappedV = new Float64Array(K);
  for (let i = 0; i < n; i++) {
    x[0] = 1;
    let nMapped = 0, ok = true;
    for (let k = 0; k < K; k++) {
      let v = cells.direct[k][i];
      if (!Number.isFinite(v)) {
        const m = cells.mapped[k];
        if (!m || !Number.isFinite(m.value[i])) {
          ok = false;
          break;
        }
        v = m.value[i];
        mappedAt[nMapped] = k;
        mappedV[nMapped++] = m.paramVariance[i];
      }
      const t = first.terms[k];
      x[k + 1] = proxyRegressor(t.role, t.quietLevel, first.psiReference, v);
    }
    const anyMapped = nMapped > 0;
    for (let j = 0; j < M; j++) {
      const r = out[j], model = models[j];
      if (!ok || (anyMapped && !back[j])) {
        r.value[i] =
          r.sd[i] =
          r.lower[i] =
          r.upper[i] =
            NaN;
        r.source[i] = SOURCE_NONE;
        continue;
      }
      const beta = model.coefficients, S = model.covariance;
      let mappedVar = 0;
      for (let u = 0; u < nMapped; u++) {
        const k = mappedAt[u];
        const sk = scale[k]; // (β² + Σ_kk)·s·s·v, in the one-model order of operations
        mappedVar += (beta[k + 1] * beta[k + 1] + S[k + 1][k + 1]) * sk * sk * mappedV[u];
      }
      let y = 0, q = 0;
      for (let a = 0; a <= K; a++) {
        y += beta[a] * x[a];
        const Sa = S[a];
        let s = 0;
        for (let b = 0; b <= K; b++) s += Sa[b] * x[b];
        q += x[a] * s;
      }
      const rv = anyMapped ? back[j]![lengthIndex[i]] : direct[j][lengthIndex[i]];
      const sd = Math.sqrt(Math.max(0, q) + mappedVar + rv);
      r.value[i] = y;
      r.sd[i] = sd;
      r.lower[i] = y - z[j] * sd;
      r.upper[i] = y + z[j] * sd;
      r.source[i] = anyMapped ? SOURCE_BACK_EXTENDED : SOURCE_DIRECT;
    }
  }
  return out;
}

/** Names of the source codes, in code order. */
export const SOURCE_NAMES = ["none", "direct", "back_extended"] as const;

/** Cells of one source: how many, and the first and last cell middles (null when none). */
export interface SourceCoverage {
  cells: number;
  start: number | null;
  end: number | null;
}

/** Where a reconstruction's values come from (result of {@link reconstructionCoverage}). */
export interface ReconstructionCoverage {
  cells: number;
  direct: SourceCoverage;
  backExtended: SourceCoverage;
  /** Cells without a value. */
  missing: number;
  /** Runs of consecutive cells of one source, in time order (start/end: cell middles). */
  segments: { source: typeof SOURCE_NAMES[number]; start: number; end: number; cells: number }[];
}

/**
 * Count the cells of each source and split the axis into runs of one source. A cell whose
 * value is not finite counts as having no value, whatever its source code.
 *
 * @param rec a reconstruction (its `value` and `source`)
 * @param time cell middles, decimal years, increasing, same length
 * @returns {@link ReconstructionCoverage}
 * @throws {InputError} (field `time`) when the lengths differ
 * @example
 * ```ts
 * import { reconstructionCoverage } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const c = reconstructionCoverage(
 *   { value: Float64Array.of(1, 1, NaN, 1), source: Uint8Array.of(2, 2, 2, 1) },
 *   [1700.5, 1701.5, 1702.5, 1703.5],
 * );
 * assert.equal(c.backExtended.cells, 2);
 * assert.equal(c.missing, 1);
 * assert.deepEqual(c.segments.map((s) => s.source), ["back_extended", "none", "direct"]);
 * ```
 */
export function reconstructionCoverage(
  rec: { value: ArrayLike<number>; source: ArrayLike<number> },
  time: ArrayLike<number>,
): ReconstructionCoverage {
  const n = rec.value.length;
  if (time.length !== n || rec.source.length !== n) {
    throw new InputError(
      `Cannot summarise coverage: ${n} values but ${time.length} times`,
      { field: "time", reason: "length_mismatch", value: time.length },
    );
  }
  const code = (i: number) => (Number.isFinite(rec.value[i]) ? rec.source[i] : SOURCE_NONE);
  const of = (c: number): SourceCoverage => {
    let cells = 0, start: number | null = null, end: number | null = null;
    for (let i = 0; i < n; i++) {
      if (code(i) !== c) continue;
      cells++;
      if (start === null) start = time[i];
      end = time[i];
    }
    return { cells, start, end };
  };
  const segments: ReconstructionCoverage["segments"] = [];
  for (let i = 0; i < n;) {
    let j = i;
    while (j + 1 < n && code(j + 1) === code(i)) j++;
    segments.push({
      source: SOURCE_NAMES[code(i)],
      start: time[i],
      end: time[j],
      cells: j - i + 1,
    });
    i = j + 1;
  }
  const direct = of(SOURCE_DIRECT), backExtended = of(SOURCE_BACK_EXTENDED);
  return {
    cells: n,
    direct,
    backExtended,
    missing: n - direct.cells - backExtended.cells,
    segments,
  };
}
