/**
 * Series ingestion for the HTTP layer: delimited text and JSON uploads into normalised
 * series, content ids, and CSV export. Free of Hono; routes call these and turn `errors` into
 * RFC 9457 problems.
 *
 * @module
 */
export { ingestText, type TextIngestOptions } from "./text.ts";
export type { DelimiterName, TimeFormat } from "./text.ts";
export { ingestJson, type JsonIngestOptions, type JsonSeriesInput } from "./json.ts";
export { contentId, contentJson } from "./content_id.ts";
export { type CsvSeries, seriesToCsv } from "./csv.ts";
export * from "./types.ts";
