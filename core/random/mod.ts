/**
 * Seeded random streams.
 *
 * @module
 */
export * from "./random_stream.ts";
export * from "./ziggurat_normal.ts";
