/**
 * What the service derives from a list of analyses: the worker task table, lookups by name,
 * the enum of kind names for OpenAPI, and the small index the page builds its forms from.
 * Everything takes the list as an argument, so an app built with other analyses (tests) is
 * served consistently by its routes, workers and charts.
 *
 * @module
 */
import type { RunKind, Task } from "../runs/kind.ts";

/**
 * The worker tasks of all analyses by name. A name registered twice is a programming error,
 * reported at start-up.
 */
export function taskTable(kinds: readonly RunKind[]): Record<string, Task> {
  const table: Record<string, Task> = {};
  for (const k of kinds) {
    for (const [name, fn] of Object.entries(k.tasks ?? {})) {
      if (table[name] && table[name] !== fn) {
        throw new Error(`worker task "${name}" of analysis ${k.kind} is registered twice`);
      }
      table[name] = fn;
    }
  }
  return table;
}

/** The analysis of a given kind name, or undefined. */
export function kindByName(kinds: readonly RunKind[], name: string): RunKind | undefined {
  return kinds.find((k) => k.kind === name);
}

/** The kind names, for enums in OpenAPI and for problems that list the valid ones. */
export function kindNames(kinds: readonly RunKind[]): string[] {
  return kinds.map((k) => k.kind);
}

/** A `$ref` name (`#/components/schemas/Name` → `Name`), or null. */
function refName(schema: unknown): string | null {
  const ref = (schema as { $ref?: unknown } | undefined)?.$ref;
  return typeof ref === "string" ? ref.slice(ref.lastIndexOf("/") + 1) : null;
}

/**
 * The index of analyses served at `GET /v1/analyses` (featured ones first, then in registry
 * order), with the names of their request and run schemas read from the OpenAPI document.
 */
export function analysisIndex(
  kinds: readonly RunKind[],
  doc: { paths?: Record<string, Record<string, unknown>> },
) {
  const entries = kinds.map((k) => {
    // deno-lint-ignore no-explicit-any
    const op = doc.paths?.[k.path]?.post as any;
    return {
      kind: k.kind,
      path: k.path,
      tag: k.tag,
      summary: k.summary,
      featured: k.featured === true,
      algorithm_version: k.algorithmVersion,
      request_schema: refName(op?.requestBody?.content?.["application/json"]?.schema),
      run_schema: refName(op?.responses?.["201"]?.content?.["application/json"]?.schema),
    };
  });
  return [...entries.filter((e) => e.featured), ...entries.filter((e) => !e.featured)];
}
