/**
 * RFC 9457 problem details: the one error shape of the service. Every failure, on every route,
 * leaves as `application/problem+json` with `type`, `title`, `status`, `detail`, the request id
 * (`instance` is `urn:request:<id>`) and, for validation failures, `errors: [{ pointer,
 * message }]` naming each bad field with a JSON Pointer (RFC 6901).
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
  [extra: string]: unknown;
}

const TYPE_BASE = "https://sunlag.invalid/problems/";

/** Problem type URIs by short name; the titles are fixed per type (RFC 9457 §3.1.3). */
export const PROBLEM_TYPES = {
  "malformed-json": { status: 400, title: "Malformed JSON" },
  "bad-request": { status: 400, title: "Bad request" },
  "not-found": { status: 404, title: "Not found" },
  "method-not-allowed": { status: 405, title: "Method not allowed" },
  "conflict": { status: 409, title: "Conflict" },
  "payload-too-large": { status: 413, title: "Payload too large" },
  "unsupported-media-type": { status: 415, title: "Unsupported media type" },
  "validation": { status: 422, title: "Invalid input" },
  "time-limit": { status: 422, title: "Run time limit exceeded" },
  "precondition": { status: 412, title: "Precondition failed" },
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
    this.problem = {
      type: TYPE_BASE + type,
      title: t.title,
      status: t.status,
      detail,
      ...extra,
    };
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

/** Send a problem response with the request id. */
export function problemResponse(
  c: Context,
  problem: Problem,
  headers: Record<string, string> = {},
): Response {
  const requestId = c.get("requestId" as never) as string | undefined;
  const body: Problem = { ...problem };
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
