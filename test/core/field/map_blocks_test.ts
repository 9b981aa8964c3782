import assert from "node:assert/strict";
import {
  assembleSolarSignalMap,
  prepareFieldAnalysis,
  sliceFieldAnalysisInputs,
  solarSignalMap,
  solarSignalMapCells,
} from "../../../core/field/mod.ts";
import { localTestTally } from "../../../core/field/local_test_tally.ts";
import { randomStream } from "../../../core/random/random_stream.ts";
import { syntheticField } from "./synthetic_field.ts";

Deno.test("assembleSolarSignalMap() gives the whole map's numbers for any split of the cells", () => {
  const { field, x } = syntheticField({ seed: 4 });
  // one cell constant: it must come back as constant, with the same warning
  const G = field.lat.length * field.lon.length;
  for (let t = 0; t < field.nTime; t++) field.values[t * G + 5] = 2.5;
  const trend = Float64Array.from(x, (_, t) => Math.cos(t / 9));
  const inputs = prepareFieldAnalysis(field, x, {
    minLag: 0,
    maxLag: 4,
    controls: [{ name: "z", values: trend }],
  });
  const whole = solarSignalMap(inputs);
  assert.ok(whole.warnings.some((w) => w.includes("constant")));
  const nc = inputs.cells.length;
  for (const cuts of [[0, nc], [0, 1, nc], [0, 7, 40, nc], [0, nc - 1, nc]]) {
    const blocks = cuts.slice(1).map((end, k) =>
      solarSignalMapCells(sliceFieldAnalysisInputs(inputs, cuts[k], end))
    );
    // blocks in any order
    assert.deepEqual(assembleSolarSignalMap(inputs, blocks.reverse()), whole, `cuts ${cuts}`);
  }
});

Deno.test("sliceFieldAnalysisInputs() refuses ranges outside the cells", () => {
  const { field, x } = syntheticField({ seed: 1 });
  const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 1 });
  assert.throws(() => sliceFieldAnalysisInputs(inputs, 0, 0), RangeError);
  assert.throws(() => sliceFieldAnalysisInputs(inputs, -1, 2), RangeError);
  assert.throws(() => sliceFieldAnalysisInputs(inputs, 0, inputs.cells.length + 1), RangeError);
});

Deno.test("localTestTally() decides every cell as the plain float64 comparisons do", () => {
  // products at, near and far from their bounds, bounds with Infinity and zeros
  const s = randomStream(9), cells = 501, lags = 3, rows = 2;
  const f32 = (k: number, g: () => number) => Float32Array.from({ length: k }, g);
  const lo = f32(lags * cells, () => (s.uniform() < 0.05 ? 0 : s.uniform() * 4));
  const hi = Float32Array.from(lo, (v) => (s.uniform() < 0.05 ? Infinity : v * (1 + s.uniform())));
  const exLo = f32(lags * cells, () => s.uniform() * 4);
  const exHi = Float32Array.from(exLo, (v) => v * (1 + 0.1 * s.uniform()));
  const w = Float64Array.from({ length: cells }, () => Math.round(s.uniform() * 2 ** 32));
  const bounds = { sigHi: hi, sigLo: lo, exHi, exLo };
  const pass = localTestTally(bounds, w, rows);
  const c = f32(lags * rows * cells, () => {
    const u = s.uniform();
    return u < 0.2
      ? 0
      : u < 0.4
      ? Math.sqrt(lo[Math.floor(s.uniform() * lo.length)])
      : 2.2 * s.normal();
  });
  pass.setProducts(c, lags * rows, cells);
  const flags = [new Uint8Array(cells), new Uint8Array(cells)];
  let anyListed = 0, anyUnits = 0;
  for (let ii = 0; ii < rows; ii++) {
    for (let j = 0; j < lags; j++) {
      const row = ii * lags + j, sx = 0.5 + s.uniform();
      const got = pass.row(row, j, ii, sx);
      let units = 0;
      const listed: number[] = [];
      for (let cc = 0; cc < cells; cc++) {
        const v = c[row * cells + cc], v2 = v * v, o = j * cells + cc;
        const sig = v2 >= hi[o] * sx;
        if (sig) units += w[cc];
        let band = !sig && v2 > lo[o] * sx;
        if (flags[ii][cc] === 0) {
          if (v2 >= exHi[o] * sx) flags[ii][cc] = 1;
          else if (v2 > exLo[o] * sx) band = true;
        }
        if (band) listed.push(cc);
      }
      assert.equal(got.units, units);
      anyListed += listed.length;
      anyUnits += units;
      assert.deepEqual(Array.from(pass.listed().subarray(0, got.banded)), listed);
      const got2 = pass.flags(ii);
      assert.deepEqual(
        Uint8Array.from(flags[ii], (_, cc) => (got2[2 * cc] !== 0 ? 1 : 0)),
        flags[ii],
      );
    }
  }
  // the case reaches every branch: bands, certain significance, flags
  assert.ok(anyListed > 0 && anyUnits > 0 && flags[0].some((v) => v === 1));
});
