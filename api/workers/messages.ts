/**
 * Helpers for messages between the pool and its workers.
 *
 * @module
 */
import { InputError, type InputErrorDetail } from "../../core/errors.ts";

export interface SerialisedError {
  name: string;
  message: string;
  pointer?: string;
  extra?: Record<string, unknown>;
  /** The fields of a core `InputError`. */
  input?: InputErrorDetail;
}

const EXPECTED = new Set([
  "InputProblem",
  "RangeError",
  "InputError",
  "CancelledError",
  "StoppedError",
]);

/** Keep the fields the run machinery maps to problems (name, message, pointer, extra, and a
 * core InputError's field, reason, index and value). */
export function serialiseError(err: unknown): SerialisedError {
  const e = err as {
    name?: string;
    message?: string;
    pointer?: string;
    extra?: Record<string, unknown>;
    stack?: string;
  };
  if (!EXPECTED.has(e?.name ?? "")) console.error(e?.stack ?? String(err));
  return {
    name: e?.name ?? "Error",
    message: e?.message ?? String(err),
    ...(e?.pointer !== undefined ? { pointer: e.pointer } : {}),
    ...(e?.extra !== undefined ? { extra: e.extra } : {}),
    ...(err instanceof InputError
      ? {
        input: {
          field: err.field,
          reason: err.reason,
          ...(err.index !== undefined ? { index: err.index } : {}),
          ...(err.value !== undefined ? { value: err.value } : {}),
        },
      }
      : {}),
  };
}

/** The distinct ArrayBuffers of typed arrays in a value (two levels deep), for transfer. */
export function transferablesOf(value: unknown): ArrayBuffer[] {
  const found = new Set<ArrayBuffer>();
  const visit = (v: unknown, depth: number) => {
    if (v === null || typeof v !== "object") return;
    if (ArrayBuffer.isView(v)) {
      if (v.buffer instanceof ArrayBuffer && v.byteLength === v.buffer.byteLength) {
        found.add(v.buffer);
      }
      return;
    }
    if (depth > 2) return;
    const values = Array.isArray(v) ? v : Object.values(v);
    for (const x of values) visit(x, depth + 1);
  };
  visit(value, 0);
  return [...found];
}
