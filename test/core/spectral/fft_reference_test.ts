/**
 * The FFT engine against numpy.fft (pocketfft), on R's sunspot series and on closed-form
 * series of lengths that exercise every radix and Bluestein's algorithm. Reference values:
 * fixtures/reference/fft_numpy.json, written by fixtures/reference/fft_numpy.py (numpy 1.24.2,
 * Debian python3-numpy).
 */
import assert from "node:assert/strict";
import { complexDftPlan } from "../../../core/spectral/complex_dft_plan.ts";
import { inverseRealDft, realDft } from "../../../core/spectral/fft.ts";

interface Spectrum {
  index: number[];
  re: number[];
  im: number[];
}
const ref = JSON.parse(
  await Deno.readTextFile(new URL("../../../fixtures/reference/fft_numpy.json", import.meta.url)),
) as {
  rfft: ({ input: string; n: number } & Spectrum)[];
  irfft: { n: number; index: number[]; value: number[] }[];
  fft: { n: number; forward: Spectrum; inverse_times_n: Spectrum }[];
};

async function dataset(name: string): Promise<Float64Array> {
  const text = await Deno.readTextFile(
    new URL(`../../../fixtures/datasets/${name}.csv`, import.meta.url),
  );
  const lines = text.split("\n").filter((l) => l.trim() && !l.startsWith("#"));
  const col = lines[0].split(",").indexOf("value");
  return Float64Array.from(lines.slice(1), (l) => Number(l.split(",")[col]));
}

/** x_j = sin(0.37 j) + 0.1 (j mod 7) + 0.001 j, as fft_numpy.py. */
function formula(n: number): Float64Array {
  return Float64Array.from({ length: n }, (_, j) => Math.sin(0.37 * j) + 0.1 * (j % 7) + 0.001 * j);
}

/** Largest error relative to the largest reference magnitude. */
function relErr(re: ArrayLike<number>, im: ArrayLike<number>, want: Spectrum): number {
  let err = 0, scale = 0;
  want.index.forEach((k, i) => {
    err = Math.max(err, Math.hypot(re[k] - want.re[i], im[k] - want.im[i]));
    scale = Math.max(scale, Math.hypot(want.re[i], want.im[i]));
  });
  return scale > 0 ? err / scale : err;
}

Deno.test("realDft() equals numpy.fft.rfft to 1e-13 relative, for every radix and Bluestein", async (t) => {
  for (const c of ref.rfft) {
    await t.step(`${c.input} n=${c.n}`, async () => {
      const x = c.input === "formula" ? formula(c.n) : await dataset(c.input.split("::")[1]);
      assert.equal(x.length, c.n);
      const { re, im } = realDft(x);
      assert.equal(re.length, Math.floor(c.n / 2) + 1);
      const e = relErr(re, im, c);
      assert.ok(e < 1e-13, `relative error ${e}`);
    });
  }
});

Deno.test("inverseRealDft() equals numpy.fft.irfft to 1e-13", () => {
  for (const c of ref.irfft) {
    const y = inverseRealDft(realDft(formula(c.n)), c.n);
    const scale = Math.max(...c.value.map(Math.abs));
    c.index.forEach((k, i) => {
      assert.ok(Math.abs(y[k] - c.value[i]) < 1e-13 * scale, `n=${c.n} j=${k}`);
    });
  }
});

Deno.test("complexDftPlan() forward and inverse equal numpy.fft.fft and n·ifft to 1e-13", () => {
  for (const c of ref.fft) {
    const z = new Float64Array(2 * c.n), out = new Float64Array(2 * c.n);
    const x = formula(c.n);
    for (let j = 0; j < c.n; j++) {
      z[2 * j] = x[j];
      z[2 * j + 1] = Math.cos(0.91 * j);
    }
    const plan = complexDftPlan(c.n);
    const split = (a: Float64Array) => [
      a.filter((_, i) => i % 2 === 0),
      a.filter((_, i) => i % 2 === 1),
    ];
    plan.forward(z, out);
    let [re, im] = split(out);
    assert.ok(relErr(re, im, c.forward) < 1e-13, `forward n=${c.n}`);
    plan.inverse(z, out);
    [re, im] = split(out);
    assert.ok(relErr(re, im, c.inverse_times_n) < 1e-13, `inverse n=${c.n}`);
    // the pruned inverse writes the same numbers at both ends
    const edges = new Float64Array(2 * c.n), e = Math.max(1, Math.floor(c.n / 20));
    plan.inverseEdges(z, edges, e);
    for (let j = 0; j < c.n; j++) {
      if (j < e || j >= c.n - e) {
        assert.ok(Math.abs(edges[2 * j] - out[2 * j]) <= 1e-12 * (1 + Math.abs(out[2 * j])));
        assert.ok(
          Math.abs(edges[2 * j + 1] - out[2 * j + 1]) <= 1e-12 * (1 + Math.abs(out[2 * j + 1])),
        );
      }
    }
  }
  assert.throws(() => complexDftPlan(0), RangeError);
  assert.throws(() => complexDftPlan(2.5), RangeError);
});
