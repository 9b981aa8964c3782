/**
 * Helpers for messages between the pool and its workers.
 *
 * @module
 */

export interface SerialisedError {
  name: string;
  message: string;
  pointer?: string;
  extra?: Record<string, unknown>;
}

/** Keep the fields the run machinery maps to problems (name, message, pointer, extra). */
export function serialiseError(err: unknown): SerialisedError {
  const e = err as {
    name?: string;
    message?: string;
    pointer?: string;
    extra?: Record<string, unknown>;
    stack?: string;
  };
  if (e?.name !== "InputProblem" && e?.name !== "RangeError" && e?.name !== "CancelledError") {
    console.error(e?.stack ?? String(err));
  }
  return {
    name: e?.name ?? "Error",
    message: e?.message ?? String(err),
    ...(e?.pointer !== undefined ? { pointer: e.pointer } : {}),
    ...(e?.extra !== undefined ? { extra: e.extra } : {}),
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
