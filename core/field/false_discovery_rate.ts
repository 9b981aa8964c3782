/**
 * False discovery rate control for the many local tests of a map.
 *
 * Benjamini & Hochberg 1995 (J. R. Stat. Soc. B 57, 289, the step-up procedure of §3): with
 * the m p-values sorted, p_(1) ≤ … ≤ p_(m), find the largest i with p_(i) ≤ (i/m)·q and reject
 * the hypotheses of p_(1) … p_(i). The expected share of false rejections among rejections is
 * then at most q for independent tests, and also under positive regression dependence
 * (Benjamini & Yekutieli 2001, Ann. Stat. 29, 1165).
 *
 * For spatially correlated climate fields, Wilks 2016 (Bull. Amer. Meteor. Soc. 97, 2263,
 * "The stippling shows statistically significant grid points") recommends running the
 * procedure at q = α_FDR = 2·α_global so that the field as a whole is tested at about
 * α_global; the factor 2 is quoted from memory. The global (field) null hypothesis is rejected
 * when at least one local test is.
 *
 * @module
 */

/** Result of {@link benjaminiHochberg}. */
export interface BenjaminiHochbergResult {
  /** 1 where the local null hypothesis is rejected, else 0 (also 0 for untested NaN entries). */
  rejected: Uint8Array;
  /** Largest rejected p-value (the data-dependent threshold p_FDR), or 0 when none. */
  pThreshold: number;
  /** Number of rejections. */
  count: number;
  /** Number of tests m (finite p-values). */
  tested: number;
}

/**
 * Benjamini–Hochberg step-up procedure at level q.
 *
 * Entries that are NaN are not tests (e.g. cells left out of an analysis): they are neither
 * counted in m nor rejected. Cost O(m log m).
 *
 * @param p p-values in [0, 1], NaN for "not tested"
 * @param q false discovery rate level in (0, 1)
 * @returns rejection mask, threshold, counts
 * @throws {RangeError} when q is outside (0, 1) or a p-value is outside [0, 1] (and not NaN)
 * @example
 * ```ts
 * import { benjaminiHochberg } from "./false_discovery_rate.ts";
 * import assert from "node:assert/strict";
 * // m = 4, q = 0.05: thresholds 0.0125, 0.025, 0.0375, 0.05; p_(2) = 0.02 ≤ 0.025 is the largest
 * const r = benjaminiHochberg([0.01, 0.02, 0.04, 0.9], 0.05);
 * assert.deepEqual(Array.from(r.rejected), [1, 1, 0, 0]);
 * assert.equal(r.pThreshold, 0.02);
 * ```
 */
export function benjaminiHochberg(p: ArrayLike<number>, q: number): BenjaminiHochbergResult {
  const fn = "apply Benjamini–Hochberg";
  if (!(q > 0 && q < 1)) throw new RangeError(`Cannot ${fn}: q must be in (0, 1), got ${q}`);
  const idx: number[] = [];
  for (let i = 0; i < p.length; i++) {
    const v = p[i];
    if (Number.isNaN(v)) continue;
    if (!(v >= 0 && v <= 1)) {
      throw new RangeError(`Cannot ${fn}: p[${i}] must be in [0, 1] or NaN, got ${v}`);
    }
    idx.push(i);
  }
  const m = idx.length;
  idx.sort((a, b) => p[a] - p[b] || a - b);
  let k = 0; // number rejected
  for (let i = m; i >= 1; i--) {
    if (p[idx[i - 1]] <= (i / m) * q) {
      k = i;
      break;
    }
  }
  const rejected = new Uint8Array(p.length);
  for (let i = 0; i < k; i++) rejected[idx[i]] = 1;
  return { rejected, pThreshold: k > 0 ? p[idx[k - 1]] : 0, count: k, tested: m };
}

/** Options of {@link fieldFalseDiscoveryRate}. */
export interface FieldFdrOptions {
  /** Level of the test of the field as a whole. @default 0.05 */
  alphaGlobal?: number;
  /** α_FDR = factor · α_global (Wilks 2016, from memory). @default 2 */
  factor?: number;
}

/** Result of {@link fieldFalseDiscoveryRate}. */
export interface FieldFdrResult extends BenjaminiHochbergResult {
  alphaGlobal: number;
  /** The level the procedure ran at, factor · α_global. */
  alphaFdr: number;
  /** Area-weighted fraction of the tested cells whose local null is rejected, in [0, 1]. */
  areaFraction: number;
  /** Whether the global null (no signal anywhere) is rejected: at least one local rejection. */
  fieldSignificant: boolean;
}

/**
 * Field significance by false discovery rate (Wilks 2016): Benjamini–Hochberg at
 * α_FDR = factor · α_global over the cells' p-values, with the area fraction of the cells
 * declared significant.
 *
 * @param p one p-value per cell, NaN for cells not tested
 * @param weights one area weight per cell (e.g. fieldAreaWeights), ≥ 0
 * @param options α_global and the factor
 * @returns the mask, the p threshold, the area fraction and whether the field is significant
 * @throws {RangeError} on mismatched lengths, bad weights, or α_FDR outside (0, 1)
 * @example
 * ```ts
 * import { fieldFalseDiscoveryRate } from "./false_discovery_rate.ts";
 * import assert from "node:assert/strict";
 * const r = fieldFalseDiscoveryRate([0.001, 0.3, NaN, 0.8], [1, 1, 1, 2]);
 * assert.equal(r.alphaFdr, 0.1);
 * assert.deepEqual(Array.from(r.rejected), [1, 0, 0, 0]);
 * assert.equal(r.areaFraction, 0.25); // weight 1 of the tested 1 + 1 + 2
 * ```
 */
export function fieldFalseDiscoveryRate(
  p: ArrayLike<number>,
  weights: ArrayLike<number>,
  options: FieldFdrOptions = {},
): FieldFdrResult {
  const fn = "test field significance by FDR";
  const alphaGlobal = options.alphaGlobal ?? 0.05;
  const factor = options.factor ?? 2;
  const alphaFdr = alphaGlobal * factor;
  if (!(alphaFdr > 0 && alphaFdr < 1)) {
    throw new RangeError(
      `Cannot ${fn}: factor · alphaGlobal must be in (0, 1), got ${factor} · ${alphaGlobal}`,
    );
  }
  if (weights.length !== p.length) {
    throw new RangeError(`Cannot ${fn}: ${weights.length} weights for ${p.length} p-values`);
  }
  const bh = benjaminiHochberg(p, alphaFdr);
  let tested = 0, hit = 0;
  for (let i = 0; i < p.length; i++) {
    const w = weights[i];
    if (!(w >= 0) || !Number.isFinite(w)) {
      throw new RangeError(`Cannot ${fn}: weights[${i}] must be finite and ≥ 0, got ${w}`);
    }
    if (Number.isNaN(p[i])) continue;
    tested += w;
    if (bh.rejected[i]) hit += w;
  }
  return {
    ...bh,
    alphaGlobal,
    alphaFdr,
    areaFraction: tested > 0 ? hit / tested : 0,
    fieldSignificant: bh.count > 0,
  };
}
