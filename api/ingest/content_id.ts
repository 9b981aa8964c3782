/**
 * Content ids of series: identity is content.
 *
 * @module
 */
import { canonicalJson, sha256Hex } from "../canonical.ts";
import type { NormalisedSeries } from "./types.ts";

/**
 * The content id of a normalised series: `sha256:` + hex SHA-256 of the RFC 8785 canonical
 * JSON of `{name, quantity, units, description, source, version, resolution, time[], value[],
 * uncertainty[] | null}` (absent optional metadata as null). Lineage and storage time are not
 * part of the content, so the same upload always gets the same id.
 *
 * @param series a normalised series (as returned by ingestText / ingestJson)
 * @returns `sha256:<64 hex digits>`
 * @example
 * ```ts
 * import { contentId } from "./content_id.ts";
 * import assert from "node:assert/strict";
 * const s = {
 *   name: "x", quantity: "other" as const, units: "1", description: null, source: null,
 *   version: null, resolution: "annual" as const,
 *   time: new Float64Array([2000.5, 2001.5]), value: new Float64Array([1, 2]), uncertainty: null,
 * };
 * assert.match(contentId(s), /^sha256:[0-9a-f]{64}$/);
 * assert.equal(contentId(s), contentId({ ...s, value: new Float64Array([1, 2]) }));
 * assert.notEqual(contentId(s), contentId({ ...s, value: new Float64Array([1, 3]) }));
 * ```
 */
export function contentId(series: NormalisedSeries): string {
  return `sha256:${sha256Hex(contentJson(series))}`;
}

/**
 * The canonical JSON text whose hash is the content id.
 *
 * Equal, byte for byte, to `canonicalJson` of the object described in {@link contentId}
 * (checked by a property test), but built directly: the keys are written in their RFC 8785
 * order and the point arrays with the native `JSON.stringify`, whose output for finite
 * numbers and for strings is the serialisation RFC 8785 §3.2.2 prescribes. About 5x faster
 * than the general canonicaliser on long series.
 */
export function contentJson(series: NormalisedSeries): string {
  const str = (
    v: string | null | undefined,
  ) => (v === null || v === undefined ? "null" : JSON.stringify(v));
  const arr = (a: ArrayLike<number>) => {
    for (let i = 0; i < a.length; i++) {
      if (!Number.isFinite(a[i])) {
        throw new RangeError(`Cannot compute content id: non-finite number at ${i}`);
      }
    }
    return JSON.stringify(Array.from(a));
  };
  // keys in RFC 8785 order (UTF-16 code unit order of the key names)
  return `{"description":${str(series.description)},"name":${str(series.name)},"quantity":${
    str(series.quantity)
  },"resolution":${str(series.resolution)},"source":${str(series.source)},"time":${
    arr(series.time)
  },"uncertainty":${series.uncertainty ? arr(series.uncertainty) : "null"},"units":${
    str(series.units)
  },"value":${arr(series.value)},"version":${str(series.version)}}`;
}

/** The same text through the general RFC 8785 canonicaliser (the reference for tests). */
export function contentJsonReference(series: NormalisedSeries): string {
  return canonicalJson({
    name: series.name,
    quantity: series.quantity,
    units: series.units,
    description: series.description ?? null,
    source: series.source ?? null,
    version: series.version ?? null,
    resolution: series.resolution,
    time: Array.from(series.time),
    value: Array.from(series.value),
    uncertainty: series.uncertainty ? Array.from(series.uncertainty) : null,
  });
}
