/**
 * Key spelling between core and the API: core results are camelCase TypeScript, the API's JSON
 * is snake_case everywhere. Non-finite numbers become null and typed arrays plain arrays on the
 * way (like `jsonSafe`).
 *
 * @module
 */

function nullable(x: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Number.isFinite(x[i]) ? x[i] : null;
  return out;
}

/** A TypeScript name as the API spells it: "rSquared" → "r_squared", "residualLag1" →
 * "residual_lag1"; snake_case names pass unchanged. */
export function snakeName(name: string): string {
  return name.replace(/(?<=.)[A-Z]/g, (c) => `_${c.toLowerCase()}`).toLowerCase();
}

/** The inverse of {@link snakeName}: "r_squared" → "rSquared"; camelCase names pass unchanged. */
export function camelName(name: string): string {
  return name.replace(/_([a-z0-9])/g, (_, c: string) => c.toUpperCase());
}

/**
 * A JSON-safe copy with every object key in snake_case, to put core results (camelCase
 * TypeScript) into the API's snake_case JSON. Applied to JSON that is already snake_case it
 * changes nothing, so it also reads results stored before the API spoke snake_case. Keys
 * chosen by users (term names) must be snake_case already (the schemas require it).
 */
export function snakeKeys(v: unknown): unknown {
  return renameKeys(v, snakeName);
}

/** A JSON-safe copy with every object key in camelCase, to hand stored snake_case JSON back to
 * core functions; only for objects whose keys are all field names (no user-chosen keys). */
export function camelKeys(v: unknown): unknown {
  return renameKeys(v, camelName);
}

function renameKeys(v: unknown, rename: (k: string) => string): unknown {
  if (typeof v === "number") return Number.isFinite(v) ? v : null;
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
    return nullable(v as unknown as ArrayLike<number>);
  }
  if (Array.isArray(v)) return v.map((x) => renameKeys(x, rename));
  if (v && typeof v === "object") {
    const o: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) o[rename(k)] = renameKeys(x, rename);
    return o;
  }
  return v;
}
