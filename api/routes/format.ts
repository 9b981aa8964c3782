/**
 * Content negotiation between JSON and CSV: `?format=` wins over `Accept`.
 *
 * @module
 */
import type { RequestView } from "./cache.ts";

/** True when the client asked for CSV. */
export function wantsCsv(c: RequestView): boolean {
  const f = c.req.query("format");
  if (f) return f.toLowerCase() === "csv";
  const accept = (c.req.header("accept") ?? "").toLowerCase();
  return accept.includes("text/csv") && !accept.includes("application/json");
}
