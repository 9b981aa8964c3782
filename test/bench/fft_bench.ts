/**
 * deno bench for the FFT engine (core/spectral/complex_dft_plan.ts) beside fft.js 4.0.4, the
 * power-of-two package sunlag used before, with its Bluestein wrapper for other lengths:
 *
 *   deno bench -A test/bench/fft_bench.ts
 */
import FFT from "fft.js";
import { complexDftPlan } from "../../core/spectral/complex_dft_plan.ts";
import { realDft } from "../../core/spectral/fft.ts";

function data(n: number): Float64Array {
  return Float64Array.from({ length: 2 * n }, (_, i) => Math.sin(0.37 * i) + 0.1 * (i % 7));
}

for (const n of [4096, 4000, 4320, 4099]) {
  const x = data(n), y = new Float64Array(2 * n);
  const plan = complexDftPlan(n);
  Deno.bench(`complex DFT n = ${n}, mixed radix`, { group: `c${n}`, baseline: true }, () => {
    plan.forward(x, y);
  });
  if ((n & (n - 1)) === 0) {
    const f = new FFT(n);
    Deno.bench(`complex DFT n = ${n}, fft.js`, { group: `c${n}` }, () => {
      f.transform(y, x);
    });
  } else {
    // the previous engine: Bluestein over power-of-two fft.js transforms
    let m = 1;
    while (m < 2 * n - 1) m <<= 1;
    const f = new FFT(m);
    const a = new Float64Array(2 * m), b = new Float64Array(2 * m), c = new Float64Array(2 * m);
    Deno.bench(`complex DFT n = ${n}, fft.js + Bluestein (2 transforms of ${m})`, {
      group: `c${n}`,
    }, () => {
      a.set(x);
      f.transform(b, a);
      f.inverseTransform(c, b);
    });
  }
  const r = x.subarray(0, n);
  Deno.bench(`real DFT n = ${n}`, () => {
    realDft(r);
  });
}
