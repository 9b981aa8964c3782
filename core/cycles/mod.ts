/**
 * Solar cycles: shape functions, timing and amplitudes.
 *
 * @module
 */
export * from "./hathaway_shape.ts";
