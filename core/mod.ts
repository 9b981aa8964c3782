/**
 * sunlag's science library: pure functions over typed arrays, no I/O.
 *
 * @module
 */
export * from "./random/mod.ts";
export * from "./time/mod.ts";
export * from "./series/mod.ts";
export * from "./cycles/mod.ts";
export * from "./spectral/mod.ts";
export * from "./stats/mod.ts";
export * from "./climate/mod.ts";
export * from "./irradiance/mod.ts";
export * from "./errors.ts";
export * from "./stop_signal.ts";
export * from "./cf/mod.ts";
export * from "./field/mod.ts";
