/**
 * A computed result made ready to store: plain JSON with every object's keys in RFC 8785 order
 * (api/runs/json.ts), with the warnings and cautions it inherits (api/runs/inherit.ts), then its
 * canonical JSON bytes and digest (api/store/result_text.ts). Pure: it runs where the result was
 * computed (a compute worker hands over only the bytes, transferred or shared, and the digest),
 * so the request thread neither walks nor serialises a large result.
 *
 * @module
 */
import type { RunResult } from "./kind.ts";
import { createHash } from "node:crypto";
import { canonicalJsonBytes, toPlainJson } from "./json.ts";
import { type InheritedNote, withInherited } from "./inherit.ts";
import { type CanonicalBytes, LARGE_RESULT_BYTES } from "../store/result_text.ts";

/** A finished result: its canonical bytes and digest, and the outputs to save as series. */
export interface FinishedResult extends CanonicalBytes {
  /** The outputs named by the kind's `autoSave` (plain JSON), for saving as series. */
  saved: Record<string, unknown>;
}

/**
 * The stored form of a computed result: plain JSON with its inherited context, every object's
 * keys in RFC 8785 order (so that its one serialisation is its canonical JSON).
 *
 * @example
 * ```ts
 * import { finishPlain } from "./finish.ts";
 * import assert from "node:assert/strict";
 * const notes = [{ run: "r", kind: "k", level: "caution" as const, text: "t" }];
 * const out = finishPlain({ warnings: [], cautions: [], value: Float64Array.of(1) }, notes);
 * assert.deepEqual(Object.keys(out), ["cautions", "inherited", "value", "warnings"]);
 * ```
 */
export function finishPlain(
  result: RunResult,
  notes: InheritedNote[],
): Record<string, unknown> {
  const plain = toPlainJson(result) as Record<string, unknown>;
  const full = withInherited(plain, notes);
  if (full === plain) return plain;
  // the inherited part is small: sort it, then the top level with it
  const withNotes: Record<string, unknown> = { ...plain, inherited: toPlainJson(full.inherited) };
  const sorted: Record<string, unknown> = {};
  for (const k of Object.keys(withNotes).sort()) sorted[k] = withNotes[k];
  return sorted;
}

/** {@link finishPlain}, then the canonical bytes, digest and the outputs named in `autoSave`. */
export function finishResult(
  result: RunResult,
  notes: InheritedNote[],
  autoSave: readonly string[] = [],
): FinishedResult {
  // the bytes of JSON.stringify(finishPlain(result, notes)), written without the plain copy;
  // a large result's in shared memory, read by the threads that store and send it, not copied
  const bytes = canonicalJsonBytes(withInherited(result, notes), LARGE_RESULT_BYTES);
  const outputs = (result.outputs ?? {}) as Record<string, unknown>;
  const saved: Record<string, unknown> = {};
  for (const name of autoSave) if (outputs[name]) saved[name] = toPlainJson(outputs[name]);
  return { bytes, digest: createHash("sha256").update(bytes).digest("hex"), saved };
}
