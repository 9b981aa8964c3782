/**
 * RFC 9457 problem details: the one error shape of the service. Every failure, on every route,
 * leaves as `application/problem+json` with `type`, `title`, `status`, `detail`, the request id
 * (`instance` is `urn:request:<id>`) and, for validation failures, `errors: [{ pointer,
 * message }]` naming each bad field with a JSON Pointer (RFC 6901).
 *
 * Problems are bounded whatever the request: at most {@link MAX_FIELD_ERRORS} field errors
 * (the rest counted in `errors_omitted`), messages and pointers of bounded length, and a
 * bounded `detail`, so a body with millions of bad fields never gets a larger answer.
 *
 * @module
 */
import type { Context } from "hono";

/** One bad field. `pointer` is a JSON Pointer into the part named by `in` (default the body). */
export interface FieldError {
  pointer: string;
  message: string;
  in?: "body" | "query" | "path" | "header";
  row?: number;
  column?: string | number;
}

export interface Problem {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  request_id?: string;
  errors?: FieldError[];
  /** How many field errors were found beyond those listed in `errors`. */
  errors_omitted?: number;
  [extra: string]: unknown;
}

/** Most field errors a problem lists; the rest are counted in `errors_omitted`. */
export const MAX_FIELD_ERRORS = 20;
/** Longest `detail`, pointer or field-error message, in characters. */
export const MAX_DETAIL_CHARS = 2000;
export const MAX_POINTER_CHARS = 300;
export const MAX_MESSAGE_CHARS = 500;

function clip(s: string, max: number): string {
  return s.length > max ? s.slice(0, max - 1) + "…" : s;
}

/**
 * The problem with its field errors, detail and messages cut to their bounds; errors left
 * out are added to `errors_omitted`.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { boundProblem, MAX_FIELD_ERRORS } from "./problems.ts";
 * const errors = Array.from({ length: 100 }, (_, i) => ({ pointer: `/x/${i}`, message: "bad" }));
 * const p = boundProblem({ type: "t", title: "t", status: 422, detail: "d", errors });
 * assert.equal(p.errors!.length, MAX_FIELD_ERRORS);
 * assert.equal(p.errors_omitted, 100 - MAX_FIELD_ERRORS);
 * ```
 */
export function boundProblem(problem: Problem): Problem {
  const out: Problem = { ...problem, detail: clip(String(problem.detail), MAX_DETAIL_CHARS) };
  const errors = problem.errors;
  if (Array.isArray(errors)) {
    const kept = errors.slice(0, MAX_FIELD_ERRORS).map((e) => ({
      ...e,
      pointer: clip(String(e.pointer), MAX_POINTER_CHARS),
      message: clip(String(e.message), MAX_MESSAGE_CHARS),
      ...(typeof e.column === "string" ? { column: clip(e.column, MAX_POINTER_CHARS) } : {}),
    }));
    out.errors = kept;
    const omitted = (problem.errors_omitted ?? 0) + errors.length - kept.length;
    if (omitted > 0) out.errors_omitted = omitted;
  }
  return out;
}

const TYPE_BASE = "https://sunlag.invalid/problems/";

/** Problem type URIs by short name; the titles are fixed per type (RFC 9457 §3.1.3). */
export const PROBLEM_TYPES = {
  "malformed-json": { status: 400, title: "Malformed JSON" },
  "bad-request": { status: 400, title: "Bad request" },
  "unauthorized": { status: 401, title: "API key required or not valid" },
  "forbidden": { status: 403, title: "Forbidden" },
  "cross-site": { status: 403, title: "Cross-site request refused" },
  "not-found": { status: 404, title: "Not found" },
  "method-not-allowed": { status: 405, title: "Method not allowed" },
  "conflict": { status: 409, title: "Conflict" },
  "payload-too-large": { status: 413, title: "Payload too large" },
  "unsupported-media-type": { status: 415, title: "Unsupported media type" },
  "validation": { status: 422, title: "Invalid input" },
  "time-limit": { status: 422, title: "Run time limit exceeded" },
  "precondition": { status: 412, title: "Precondition failed" },
  "misdirected": { status: 421, title: "Misdirected request" },
  "rate-limited": { status: 429, title: "Too many requests" },
  "quota-exceeded": { status: 429, title: "Quota exceeded" },
  "header-too-large": { status: 431, title: "Request header fields too large" },
  "internal": { status: 500, title: "Internal error" },
  "unavailable": { status: 503, title: "Service unavailable" },
} as const;

export type ProblemType = keyof typeof PROBLEM_TYPES;

/** Thrown anywhere in the API layer; `app.onError` turns it into the response. */
export class ProblemError extends Error {
  readonly problem: Problem;
  readonly headers: Record<string, string>;
  constructor(
    type: ProblemType,
    detail: string,
    extra: Partial<Problem> = {},
    headers: Record<string, string> = {},
  ) {
    super(detail);
    this.name = "ProblemError";
    const t = PROBLEM_TYPES[type];
    this.problem = boundProblem({
      type: TYPE_BASE + type,
      title: t.title,
      status: t.status,
      detail,
      ...extra,
    });
    this.headers = headers;
  }
}

/** A 422 naming fields. */
export function validationProblem(detail: string, errors: FieldError[]): ProblemError {
  return new ProblemError("validation", detail, { errors });
}

/** Escape one JSON Pointer reference token (RFC 6901 §3). */
export function pointerToken(t: string | number): string {
  return String(t).replace(/~/g, "~0").replace(/\//g, "~1");
}

/** JSON Pointer from a path of keys. */
export function toPointer(path: readonly PropertyKey[]): string {
  return path.map((p) => "/" + pointerToken(typeof p === "symbol" ? String(p) : p)).join("");
}

/**
 * Map zod issues to field errors with JSON Pointers: at most {@link MAX_FIELD_ERRORS} places,
 * the issues at other places counted in `omitted` (never turned into pointers, so millions of
 * bad fields cost one pass over the issues).
 */
export function zodFieldErrors(
  issues: readonly { path: readonly PropertyKey[]; message: string }[],
  where: "body" | "query" | "path" | "header",
): { errors: FieldError[]; omitted: number } {
  // A union reports one issue per branch at the same place: merge them into one entry.
  const byPointer = new Map<string, string[]>();
  let omitted = 0;
  for (const i of issues) {
    if (byPointer.size >= MAX_FIELD_ERRORS) {
      omitted++;
      continue;
    }
    const p = toPointer(i.path);
    const list = byPointer.get(p) ?? [];
    if (!list.includes(i.message)) list.push(i.message);
    byPointer.set(p, list);
  }
  const errors = [...byPointer].map(([pointer, messages]) => ({
    pointer,
    message: messages.join("; or "),
    ...(where === "body" ? {} : { in: where }),
  }));
  return { errors, omitted };
}

/** {@link zodFieldErrors} without the count of the ones left out. */
export function zodErrors(
  issues: readonly { path: readonly PropertyKey[]; message: string }[],
  where: "body" | "query" | "path" | "header",
): FieldError[] {
  return zodFieldErrors(issues, where).errors;
}

/** Send a problem response with the request id. */
export function problemResponse(
  c: Context,
  problem: Problem,
  headers: Record<string, string> = {},
): Response {
  const requestId = c.get("requestId" as never) as string | undefined;
  const body: Problem = boundProblem(problem);
  if (requestId) {
    body.request_id = requestId;
    body.instance ??= `urn:request:${requestId}`;
  }
  return new Response(JSON.stringify(body), {
    status: problem.status,
    headers: {
      "content-type": "application/problem+json",
      ...(requestId ? { "x-request-id": requestId } : {}),
      ...headers,
    },
  });
}
