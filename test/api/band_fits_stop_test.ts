/**
 * The band-fit task of spectral models stops between bands when asked, and, band by band,
 * gives the same numbers as the calibration of the whole chunk at once.
 */
import assert from "node:assert/strict";
import { bandFitsChunk } from "../../api/analyses/spectral_irradiance_models/tasks.ts";
import { calibrateBandModels, randomStream, StoppedError } from "../../core/mod.ts";

/** A chunk of `bands` invented bands on 240 monthly cells of one facular proxy. */
function chunk(method: "ols" | "prais_winsten", bands = 6) {
  const rng = randomStream(21);
  const n = 240;
  const f = Float64Array.from({ length: n }, (_, t) => 0.15 + 0.01 * Math.sin(t / 21));
  const ys = Array.from({ length: bands }, (_, b) =>
    Float64Array.from(f, (v, t) =>
      // band 2 misses a few cells, so it is fitted on its own cells
      b === 2 && t % 17 === 0 ? NaN : 1 + b + (20 + b) * (v - 0.15) + 0.01 * rng.normal()));
  return {
    offset: 8,
    bands: ys,
    terms: [{ name: "mg_ii", role: "facular" as const, values: f }],
    options: { method, folds: 5 },
  };
}

Deno.test("bandFitsChunk() polls before every band and stops", () => {
  let calls = 0;
  const shouldStop = () => ++calls > 3;
  assert.throws(() => bandFitsChunk(chunk("prais_winsten"), { shouldStop }), StoppedError);
  assert.equal(calls, 4, "polled before every band");
});

Deno.test("bandFitsChunk() band by band gives the numbers of the whole chunk at once", () => {
  for (const method of ["prais_winsten", "ols"] as const) {
    const input = chunk(method);
    const whole = calibrateBandModels(input.bands, input.terms, {
      ...input.options,
      crossCorrelation: false,
    });
    assert.deepEqual(bandFitsChunk(input, { shouldStop: () => false }), whole, method);
  }
});

Deno.test("bandFitsChunk() names a failing band by its index among all bands", () => {
  const input = chunk("prais_winsten");
  input.bands[3] = new Float64Array(240).fill(2);
  assert.throws(() => bandFitsChunk(input), { name: "InputError", index: 11 });
});
