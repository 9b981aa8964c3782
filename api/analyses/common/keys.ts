/**
 * The key-spelling policy of results: every object key in a result's JSON is snake_case
 * (`r_squared`, `p_family_wise`), including keys chosen by users (regressor and term names,
 * which the request schemas restrict to lower-case letters, digits and `_`). Core results are
 * camelCase TypeScript; an adapter either writes the snake_case keys itself or converts a core
 * object with {@link snakeKeys}. The serializer (`api/runs/json.ts`) enforces the policy: it
 * refuses a result holding any other key, with the key's JSON Pointer.
 *
 * @module
 */
import { undefinedAsNull } from "./undefined_as_null.ts";

/** A key as results spell it: lower-case letters, digits and `_`, starting with a letter. */
export const SNAKE_CASE_KEY = /^[a-z][a-z0-9_]*$/;

/**
 * A TypeScript name as the API spells it; snake_case names pass unchanged.
 *
 * @example
 * ```ts
 * import { snakeName } from "./keys.ts";
 * import assert from "node:assert/strict";
 * assert.equal(snakeName("rSquared"), "r_squared");
 * assert.equal(snakeName("residualLag1"), "residual_lag1");
 * assert.equal(snakeName("p_value"), "p_value");
 * ```
 */
export function snakeName(name: string): string {
  return name.replace(/(?<=.)[A-Z]/g, (c) => `_${c.toLowerCase()}`).toLowerCase();
}

/**
 * The inverse of {@link snakeName}; camelCase names pass unchanged.
 *
 * @example
 * ```ts
 * import { camelName } from "./keys.ts";
 * import assert from "node:assert/strict";
 * assert.equal(camelName("adj_r_squared"), "adjRSquared");
 * ```
 */
export function camelName(name: string): string {
  return name.replace(/_([a-z0-9])/g, (_, c: string) => c.toUpperCase());
}

/**
 * A JSON copy with every object key in snake_case, to put core results (camelCase
 * TypeScript) into the API's snake_case JSON. Applied to JSON that is already snake_case it
 * changes nothing, so it also reads results stored before the API spoke snake_case.
 *
 * Numbers go through {@link undefinedAsNull} (typed arrays become plain arrays): use it for core
 * objects whose non-finite numbers mean "undefined by the method", and document those nulls in
 * the result schema.
 *
 * @example
 * ```ts
 * import { snakeKeys } from "./keys.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(snakeKeys({ rSquared: 0.5, perTerm: Float64Array.of(1, NaN) }), {
 *   r_squared: 0.5,
 *   per_term: [1, null],
 * });
 * ```
 */
export function snakeKeys(v: unknown): unknown {
  return renameKeys(v, snakeName);
}

/** A JSON copy with every object key in camelCase, to hand stored snake_case JSON back to
 * core functions; only for objects whose keys are all field names (no user-chosen keys). */
export function camelKeys(v: unknown): unknown {
  return renameKeys(v, camelName);
}

function renameKeys(v: unknown, rename: (k: string) => string): unknown {
  if (typeof v === "number") return undefinedAsNull(v);
  if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
    return undefinedAsNull(v as unknown as ArrayLike<number>);
  }
  if (Array.isArray(v)) return v.map((x) => renameKeys(x, rename));
  if (v && typeof v === "object") {
    const o: Record<string, unknown> = {};
    for (const [k, x] of Object.entries(v)) o[rename(k)] = renameKeys(x, rename);
    return o;
  }
  return v;
}
