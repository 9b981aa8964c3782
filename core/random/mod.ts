/**
 * Seeded random streams.
 *
 * @module
 */
export * from "./random_stream.ts";
