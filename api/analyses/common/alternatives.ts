/**
 * "Give exactly one of these fields", in the form JSON Schema has for it (`oneOf` of
 * `required` lists), published on a request schema in OpenAPI. Clients, the API reference and
 * the page's forms read from it which inputs are the alternatives of a required choice (the
 * page shows them first and preselects the first). The analysis still enforces the rule with
 * a problem naming the field.
 *
 * @module
 */

/**
 * The OpenAPI metadata saying that exactly one of `fields` must be given.
 *
 * @param fields the alternative fields, the usual choice first
 * @returns `{ oneOf: [{ required: [field] }, ...] }`, to spread into `.openapi(...)`
 * @example
 * ```ts
 * import { oneOfFields } from "./alternatives.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(oneOfFields("solar", "solar_run"), {
 *   oneOf: [{ required: ["solar"] }, { required: ["solar_run"] }],
 * });
 * ```
 */
export function oneOfFields(...fields: string[]): { oneOf: { required: string[] }[] } {
  return { oneOf: fields.map((f) => ({ required: [f] })) };
}
