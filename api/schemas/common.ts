/**
 * Response schemas shared by routes (for the OpenAPI document; responses are built from the
 * store types, so these describe rather than validate).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";

// Validation messages speak to the user: a missing field is "required", not zod's default
// "expected object, received undefined". (zod's global configuration; every route's schemas
// import this module.)
z.config({
  customError: (iss) => {
    if (iss.input !== undefined) return undefined;
    if (iss.code === "invalid_type") return `required (${iss.expected})`;
    if (iss.code === "invalid_union") return "required";
    return undefined;
  },
});

export const FieldErrorSchema = z.object({
  pointer: z.string().openapi({ example: "/window" }),
  message: z.string(),
  in: z.enum(["body", "query", "path", "header"]).optional(),
  row: z.number().int().optional(),
  column: z.union([z.string(), z.number()]).optional(),
}).openapi("FieldError");

export const ProblemSchema = z.object({
  type: z.string().openapi({ example: "https://sunlag.invalid/problems/validation" }),
  title: z.string(),
  status: z.number().int(),
  detail: z.string(),
  instance: z.string().optional(),
  request_id: z.string().optional(),
  errors: z.array(FieldErrorSchema).max(20).optional().openapi({
    description: "At most 20 bad fields; `errors_omitted` counts the others",
  }),
  errors_omitted: z.number().int().optional().openapi({
    description: "Field errors found beyond those listed in `errors`",
  }),
}).openapi("Problem", { description: "RFC 9457 problem details (application/problem+json)" });

export const problemContent = {
  "application/problem+json": { schema: ProblemSchema },
};

/** Standard problem responses for a route. */
export function problems(...codes: number[]) {
  const text: Record<number, string> = {
    400: "Malformed request (e.g. JSON that does not parse)",
    401: "An API key is required (`Authorization: Bearer <key>`) or the one given is not valid",
    403: "The key's role or the item's owner does not allow this",
    404: "Not found (or not shared with you)",
    409: "Conflict with the current state",
    413: "Body over the configured limit",
    415: "Unsupported media type",
    422: "Invalid input; `errors` names each bad field",
    429: "Rate limit or quota exceeded; `Retry-After` says when to try again",
    500: "Unexpected failure (the body carries the request id, never a stack trace)",
  };
  return Object.fromEntries(
    codes.map((c) => [c, { description: text[c] ?? "Problem", content: problemContent }]),
  );
}

export const ResolutionSchema = z.enum(["daily", "monthly", "annual", "irregular"]);

export const SeriesMetaSchema = z.object({
  id: z.string(),
  name: z.string(),
  quantity: z.string(),
  units: z.string(),
  description: z.string().nullable(),
  source: z.string().nullable(),
  version: z.string().nullable(),
  resolution: ResolutionSchema,
  n: z.number().int(),
  start: z.number().openapi({ description: "First time, decimal year" }),
  end: z.number().openapi({ description: "Last time, decimal year" }),
  start_date: z.string().openapi({ description: "First time, ISO 8601 at the series resolution" }),
  end_date: z.string(),
  derived_from: z.string().nullable(),
  created_at: z.string(),
}).openapi("SeriesMeta");

export const SeriesSchema = SeriesMetaSchema.extend({
  date: z.array(z.string()).openapi({ description: "ISO 8601 date of each point" }),
  time: z.array(z.number()).openapi({ description: "Decimal year of each point" }),
  value: z.array(z.number()),
  uncertainty: z.array(z.number()).nullable(),
}).openapi("Series");

export const RunStatusSchema = z.enum(["queued", "running", "succeeded", "failed", "cancelled"]);

export const RunSummarySchema = z.object({
  id: z.string().openapi({ description: "UUIDv7" }),
  label: z.string().openapi({
    description: "Short label that tells runs apart (the last 8 hex digits of the id, its " +
      "random part; the first digits are the creation time, shared by runs made within a " +
      "minute), as chart titles and CSV headers show it",
  }),
  kind: z.string(),
  created_at: z.string(),
  updated_at: z.string(),
  status: RunStatusSchema,
  progress: z.number(),
  input_series: z.array(z.string()),
  input_runs: z.array(z.string()),
  service_version: z.string(),
  algorithm_version: z.string(),
  seed: z.number().int().nullable(),
  result_digest: z.string().nullable().openapi({
    description: "Hex SHA-256 of the RFC 8785 canonical JSON of the result",
  }),
  eta_seconds: z.number().nullable(),
}).openapi("RunSummary");

export const RunSchema = RunSummarySchema.extend({
  params: z.record(z.string(), z.unknown()).openapi({
    description: "Parameters with every default filled in; inline series replaced by their ids",
  }),
  result: z.record(z.string(), z.unknown()).nullable(),
  error: z.record(z.string(), z.unknown()).nullable(),
  saved_series: z.array(z.object({ output: z.string(), id: z.string() })).optional(),
}).openapi("Run");

/** A page of a listing: the items, the total count, and the paging that produced it. */
export function pageSchema<T extends z.ZodType>(item: T) {
  return z.object({
    items: z.array(item),
    total: z.number().int(),
    limit: z.number().int(),
    offset: z.number().int(),
  });
}

export const PageQuery = z.object({
  limit: z.coerce.number().int().min(1).max(1000).default(50).openapi({
    description: "Page size (1–1000)",
  }),
  offset: z.coerce.number().int().min(0).default(0),
});
