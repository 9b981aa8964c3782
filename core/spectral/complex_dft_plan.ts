/**
 * Complex discrete Fourier transforms of any length N ≥ 1, float64, planned once per length:
 * the one FFT engine of sunlag (real transforms, periodograms, filters and the surrogate
 * tests are built on it).
 *
 * Method: a mixed-radix Cooley–Tukey FFT (Cooley & Tukey 1965, Math. Comp. 19, 297) in the
 * self-sorting Stockham form (out of place, no bit reversal; Van Loan 1992, Computational
 * Frameworks for the Fast Fourier Transform, §1.7), with hand-written butterflies for radix
 * 2, 3, 4 and 5 and a generic butterfly for other small primes. Lengths whose prime factors
 * are too large for that to pay (e.g. a prime N) use Bluestein's chirp-z algorithm
 * (Bluestein 1970, IEEE Trans. Audio Electroacoust. 18, 451): the DFT becomes a circular
 * convolution of a smooth length M ≥ 2N − 1 done with this same engine. The choice between
 * the two follows a cost estimate of the form used by pocketfft (the FFT inside numpy and
 * scipy): N times the sum of the factors, Bluestein counted as two transforms of M with a
 * factor 1.5, and only for lengths ≥ 50 whose largest prime factor squared exceeds N.
 * Twiddle factors are computed directly as cos/sin of 2π·(jk mod N)/N (no recurrences), so
 * rounding errors grow like log N: results agree with numpy.fft to about 1e-15 relative
 * (test/core/spectral/fft_reference_test.ts, against fixtures/reference/fft_numpy.json).
 *
 * Convention (as numpy.fft): forward X_k = Σ_j x_j e^{−2πi jk/N}; `inverse` is the same sum
 * with e^{+2πi jk/N} and WITHOUT the 1/N factor (callers scale).
 *
 * Why hand-written: the float64 FFTs on npm handle powers of two only (fft.js 4.0.4, which
 * sunlag used before, so that a length such as 4,000 went through Bluestein with two
 * transforms of 8,192), and the mixed-radix ones are float32 only (the WebAssembly builds of
 * PFFFT and KISS FFT), not enough for the 1e-12 agreement with numpy the tests ask. Measured
 * with test/bench/fft_bench.ts (deno bench, shared 2-core machine): complex length 4,000
 * (2⁵·5³) 50 µs here against 213 µs through fft.js + Bluestein; length 4,096 46 µs here
 * against 38 µs with fft.js, where `inverseEdges` (which fft.js cannot do) brings the
 * surrogate test's transform down to about the fft.js time.
 *
 * @module
 */

/** A reusable complex DFT of one length; data interleaved [re0, im0, re1, im1, ...]. */
export interface ComplexDftPlan {
  /** Transform length N. */
  readonly n: number;
  /**
   * Forward transform X_k = Σ_j x_j e^{−2πi jk/N} of `input` (2N numbers) into `output`
   * (2N numbers). `input` is left unchanged; the two must not overlap.
   */
  forward(input: Float64Array, output: Float64Array): void;
  /** Inverse transform x_j = Σ_k X_k e^{+2πi jk/N}, without the 1/N factor. */
  inverse(input: Float64Array, output: Float64Array): void;
  /**
   * The inverse transform at the two ends only: output slots j < `edge` and j ≥ N − `edge`
   * are written, the others are left unspecified. For callers that read a window around
   * j = 0 (e.g. correlations at a few lags): the last pass is computed only for those
   * outputs, which saves up to one pass over the data.
   */
  inverseEdges(input: Float64Array, output: Float64Array, edge: number): void;
}

/** One Stockham pass: length-`len` sub-transforms at stride `stride`, radix `radix`. */
interface Stage {
  radix: number;
  /** Sub-transform length at this pass (N / stride). */
  len: number;
  stride: number;
  /** cos/sin of 2π·p·k/len for p < len/radix, k = 1..radix−1 (interleaved, p-major). */
  twiddle: Float64Array;
}

const SMALL_PRIME_LIMIT = 64;

/**
 * Factors of n: odd primes first, then a 2 or a 4, then 8s (fewest passes over the data), so
 * that the last pass, which `inverseEdges` prunes, is the most expensive one.
 */
function factorize(n: number): number[] {
  const eights: number[] = [], mid: number[] = [], odd: number[] = [];
  while (n % 8 === 0) {
    eights.push(8);
    n /= 8;
  }
  if (n % 4 === 0) {
    mid.push(4);
    n /= 4;
  }
  if (n % 2 === 0) {
    mid.push(2);
    n /= 2;
  }
  for (let p = 3; p * p <= n; p += 2) {
    while (n % p === 0) {
      odd.push(p);
      n /= p;
    }
  }
  if (n > 1) odd.push(n);
  return [...odd, ...mid, ...eights];
}

/** Cost estimate N·Σ factors, larger (generic) factors penalised by 1.1 (as pocketfft). */
function costGuess(n: number): number {
  let c = 0;
  for (const f of factorize(n)) {
    c += f === 8 ? 3 : f === 4 ? 2 : f === 2 ? 1.1 : f <= 5 ? f : 1.1 * f;
  }
  return c * n;
}

/** The smallest 2^a·3^b·5^c ≥ n (the length of Bluestein's convolution). */
function smoothLength(n: number): number {
  let best = 1;
  while (best < n) best *= 2;
  for (let f5 = 1; f5 < best; f5 *= 5) {
    for (let f35 = f5; f35 < best; f35 *= 3) {
      let v = f35;
      while (v < n) v *= 2;
      if (v < best) best = v;
    }
  }
  return best;
}

function useBluestein(n: number): boolean {
  const largest = Math.max(...factorize(n));
  if (n < 50 || largest * largest <= n) return largest > SMALL_PRIME_LIMIT;
  return 1.5 * 2 * costGuess(smoothLength(2 * n - 1)) < costGuess(n) ||
    largest > SMALL_PRIME_LIMIT;
}

function buildStages(n: number, factors: number[]): Stage[] {
  const stages: Stage[] = [];
  let len = n, stride = 1;
  for (const r of factors) {
    const m = len / r;
    const tw = new Float64Array(2 * m * (r - 1));
    for (let p = 0; p < m; p++) {
      for (let k = 1; k < r; k++) {
        const ang = (2 * Math.PI * ((p * k) % len)) / len;
        const o = 2 * (p * (r - 1) + k - 1);
        tw[o] = Math.cos(ang);
        tw[o + 1] = Math.sin(ang);
      }
    }
    stages.push({ radix: r, len, stride, twiddle: tw });
    len = m;
    stride *= r;
  }
  return stages;
}

// Each pass reads x[q + s(p + j·m)] (j = 0..r−1) and writes, for k = 0..r−1,
// y[q + s(r·p + k)] = w^{pk} Σ_j x_j ω_r^{jk}, with w = e^{sg·2πi/len}, ω_r = e^{sg·2πi/r},
// sg = −1 forward and +1 inverse, p < m = len/r, q < s (decimation in frequency).

function pass2(x: Float64Array, y: Float64Array, st: Stage, n: number, sg: number): void {
  const s = st.stride, m = st.len / 2, tw = st.twiddle, h = n; // offsets in doubles: 2·(n/2)
  for (let p = 0; p < m; p++) {
    const wr = tw[2 * p], wi = sg * tw[2 * p + 1];
    let i = 2 * s * p, o = 4 * s * p;
    for (let q = 0; q < s; q++, i += 2, o += 2) {
      const ar = x[i], ai = x[i + 1], br = x[i + h], bi = x[i + h + 1];
      y[o] = ar + br;
      y[o + 1] = ai + bi;
      const dr = ar - br, di = ai - bi;
      y[o + 2 * s] = dr * wr - di * wi;
      y[o + 2 * s + 1] = dr * wi + di * wr;
    }
  }
}

function pass4(x: Float64Array, y: Float64Array, st: Stage, n: number, sg: number): void {
  const s = st.stride, m = st.len / 4, tw = st.twiddle;
  const d = n / 2; // input stride between the four legs, in doubles: 2·(n/4)
  const s2 = 2 * s;
  let w1r = 1, w1i = 0, w2r = 1, w2i = 0, w3r = 1, w3i = 0;
  // one loop over all m·s butterflies (efficient for any stride), twiddles reloaded per p
  for (let p = 0, q = s, i = -2, o = -2; p < m || q < s; q++, i += 2, o += 2) {
    if (q === s) {
      const t = 6 * p;
      w1r = tw[t], w1i = sg * tw[t + 1], w2r = tw[t + 2], w2i = sg * tw[t + 3];
      w3r = tw[t + 4], w3i = sg * tw[t + 5];
      q = 0;
      i = 2 * s * p;
      o = 8 * s * p;
      p++;
    }
    const a0r = x[i], a0i = x[i + 1];
    const a1r = x[i + d], a1i = x[i + d + 1];
    const a2r = x[i + 2 * d], a2i = x[i + 2 * d + 1];
    const a3r = x[i + 3 * d], a3i = x[i + 3 * d + 1];
    const t0r = a0r + a2r, t0i = a0i + a2i, t1r = a0r - a2r, t1i = a0i - a2i;
    const t2r = a1r + a3r, t2i = a1i + a3i;
    // (a1 − a3)·(sg·i)
    const t3r = -sg * (a1i - a3i), t3i = sg * (a1r - a3r);
    y[o] = t0r + t2r;
    y[o + 1] = t0i + t2i;
    const y1r = t1r + t3r, y1i = t1i + t3i;
    const y2r = t0r - t2r, y2i = t0i - t2i;
    const y3r = t1r - t3r, y3i = t1i - t3i;
    y[o + s2] = y1r * w1r - y1i * w1i;
    y[o + s2 + 1] = y1r * w1i + y1i * w1r;
    y[o + 2 * s2] = y2r * w2r - y2i * w2i;
    y[o + 2 * s2 + 1] = y2r * w2i + y2i * w2r;
    y[o + 3 * s2] = y3r * w3r - y3i * w3i;
    y[o + 3 * s2 + 1] = y3r * w3i + y3i * w3r;
  }
}

const H = Math.SQRT1_2;

/**
 * Radix 8: radix-2 butterflies on legs (j, j+4), then two radix-4 butterflies, the odd one on
 * legs rotated by ω₈^j. One loop over all m·s butterflies, twiddles reloaded when p changes.
 */
function pass8(x: Float64Array, y: Float64Array, st: Stage, n: number, sg: number): void {
  const s = st.stride, m = st.len / 8, tw = st.twiddle;
  const d = n / 4, s2 = 2 * s, last = m === 1;
  let w1r = 1, w1i = 0, w2r = 1, w2i = 0, w3r = 1, w3i = 0, w4r = 1, w4i = 0;
  let w5r = 1, w5i = 0, w6r = 1, w6i = 0, w7r = 1, w7i = 0;
  for (let p = 0, q = s, i = -2, o = -2; p < m || q < s; q++, i += 2, o += 2) {
    if (q === s) {
      // next twiddle set
      if (!last) {
        const t = 14 * p;
        w1r = tw[t], w1i = sg * tw[t + 1], w2r = tw[t + 2], w2i = sg * tw[t + 3];
        w3r = tw[t + 4], w3i = sg * tw[t + 5], w4r = tw[t + 6], w4i = sg * tw[t + 7];
        w5r = tw[t + 8], w5i = sg * tw[t + 9], w6r = tw[t + 10], w6i = sg * tw[t + 11];
        w7r = tw[t + 12], w7i = sg * tw[t + 13];
      }
      q = 0;
      i = 2 * s * p;
      o = 16 * s * p;
      p++;
    }
    const a0r = x[i], a0i = x[i + 1], a4r = x[i + 4 * d], a4i = x[i + 4 * d + 1];
    const a1r = x[i + d], a1i = x[i + d + 1], a5r = x[i + 5 * d], a5i = x[i + 5 * d + 1];
    const a2r = x[i + 2 * d], a2i = x[i + 2 * d + 1], a6r = x[i + 6 * d], a6i = x[i + 6 * d + 1];
    const a3r = x[i + 3 * d], a3i = x[i + 3 * d + 1], a7r = x[i + 7 * d], a7i = x[i + 7 * d + 1];
    const u0r = a0r + a4r, u0i = a0i + a4i, v0r = a0r - a4r, v0i = a0i - a4i;
    const u1r = a1r + a5r, u1i = a1i + a5i, e1r = a1r - a5r, e1i = a1i - a5i;
    const u2r = a2r + a6r, u2i = a2i + a6i, e2r = a2r - a6r, e2i = a2i - a6i;
    const u3r = a3r + a7r, u3i = a3i + a7i, e3r = a3r - a7r, e3i = a3i - a7i;
    // v_j = (a_j − a_{j+4})·ω₈^j, ω₈ = (1 + sg·i)/√2
    const v1r = H * (e1r - sg * e1i), v1i = H * (e1i + sg * e1r);
    const v2r = -sg * e2i, v2i = sg * e2r;
    const v3r = -H * (e3r + sg * e3i), v3i = H * (sg * e3r - e3i);
    // radix 4 on u → Y0, Y2, Y4, Y6
    let t0r = u0r + u2r, t0i = u0i + u2i, t1r = u0r - u2r, t1i = u0i - u2i;
    let t2r = u1r + u3r, t2i = u1i + u3i, t3r = -sg * (u1i - u3i), t3i = sg * (u1r - u3r);
    y[o] = t0r + t2r;
    y[o + 1] = t0i + t2i;
    let zr = t1r + t3r, zi = t1i + t3i;
    y[o + 2 * s2] = zr * w2r - zi * w2i;
    y[o + 2 * s2 + 1] = zr * w2i + zi * w2r;
    zr = t0r - t2r, zi = t0i - t2i;
    y[o + 4 * s2] = zr * w4r - zi * w4i;
    y[o + 4 * s2 + 1] = zr * w4i + zi * w4r;
    zr = t1r - t3r, zi = t1i - t3i;
    y[o + 6 * s2] = zr * w6r - zi * w6i;
    y[o + 6 * s2 + 1] = zr * w6i + zi * w6r;
    // radix 4 on v → Y1, Y3, Y5, Y7
    t0r = v0r + v2r, t0i = v0i + v2i, t1r = v0r - v2r, t1i = v0i - v2i;
    t2r = v1r + v3r, t2i = v1i + v3i, t3r = -sg * (v1i - v3i), t3i = sg * (v1r - v3r);
    zr = t0r + t2r, zi = t0i + t2i;
    y[o + s2] = zr * w1r - zi * w1i;
    y[o + s2 + 1] = zr * w1i + zi * w1r;
    zr = t1r + t3r, zi = t1i + t3i;
    y[o + 3 * s2] = zr * w3r - zi * w3i;
    y[o + 3 * s2 + 1] = zr * w3i + zi * w3r;
    zr = t0r - t2r, zi = t0i - t2i;
    y[o + 5 * s2] = zr * w5r - zi * w5i;
    y[o + 5 * s2 + 1] = zr * w5i + zi * w5r;
    zr = t1r - t3r, zi = t1i - t3i;
    y[o + 7 * s2] = zr * w7r - zi * w7i;
    y[o + 7 * s2 + 1] = zr * w7i + zi * w7r;
  }
}

const SIN60 = Math.sqrt(3) / 2;

function pass3(x: Float64Array, y: Float64Array, st: Stage, n: number, sg: number): void {
  const s = st.stride, m = st.len / 3, tw = st.twiddle;
  const d = (2 * n) / 3, s2 = 2 * s, k = sg * SIN60;
  let w1r = 1, w1i = 0, w2r = 1, w2i = 0;
  // one loop over all m·s butterflies (efficient for any stride), twiddles reloaded per p
  for (let p = 0, q = s, i = -2, o = -2; p < m || q < s; q++, i += 2, o += 2) {
    if (q === s) {
      const t = 4 * p;
      w1r = tw[t], w1i = sg * tw[t + 1], w2r = tw[t + 2], w2i = sg * tw[t + 3];
      q = 0;
      i = 2 * s * p;
      o = 6 * s * p;
      p++;
    }
    const a0r = x[i], a0i = x[i + 1];
    const a1r = x[i + d], a1i = x[i + d + 1], a2r = x[i + 2 * d], a2i = x[i + 2 * d + 1];
    const br = a1r + a2r, bi = a1i + a2i;
    const cr = a0r - 0.5 * br, ci = a0i - 0.5 * bi;
    const dr = k * (a1r - a2r), di = k * (a1i - a2i);
    y[o] = a0r + br;
    y[o + 1] = a0i + bi;
    const y1r = cr - di, y1i = ci + dr, y2r = cr + di, y2i = ci - dr;
    y[o + s2] = y1r * w1r - y1i * w1i;
    y[o + s2 + 1] = y1r * w1i + y1i * w1r;
    y[o + 2 * s2] = y2r * w2r - y2i * w2i;
    y[o + 2 * s2 + 1] = y2r * w2i + y2i * w2r;
  }
}

const C1 = Math.cos((2 * Math.PI) / 5), C2 = Math.cos((4 * Math.PI) / 5);
const S1 = Math.sin((2 * Math.PI) / 5), S2 = Math.sin((4 * Math.PI) / 5);

function pass5(x: Float64Array, y: Float64Array, st: Stage, n: number, sg: number): void {
  const s = st.stride, m = st.len / 5, tw = st.twiddle;
  const d = (2 * n) / 5, s2 = 2 * s;
  const s1 = sg * S1, s2n = sg * S2;
  let w1r = 1, w1i = 0, w2r = 1, w2i = 0, w3r = 1, w3i = 0, w4r = 1, w4i = 0;
  for (let p = 0, q = s, i = -2, o = -2; p < m || q < s; q++, i += 2, o += 2) {
    if (q === s) {
      const t = 8 * p;
      w1r = tw[t], w1i = sg * tw[t + 1], w2r = tw[t + 2], w2i = sg * tw[t + 3];
      w3r = tw[t + 4], w3i = sg * tw[t + 5], w4r = tw[t + 6], w4i = sg * tw[t + 7];
      q = 0;
      i = 2 * s * p;
      o = 10 * s * p;
      p++;
    }
    const a0r = x[i], a0i = x[i + 1];
    const a1r = x[i + d], a1i = x[i + d + 1];
    const a2r = x[i + 2 * d], a2i = x[i + 2 * d + 1];
    const a3r = x[i + 3 * d], a3i = x[i + 3 * d + 1];
    const a4r = x[i + 4 * d], a4i = x[i + 4 * d + 1];
    const b1r = a1r + a4r, b1i = a1i + a4i, d1r = a1r - a4r, d1i = a1i - a4i;
    const b2r = a2r + a3r, b2i = a2i + a3i, d2r = a2r - a3r, d2i = a2i - a3i;
    y[o] = a0r + b1r + b2r;
    y[o + 1] = a0i + b1i + b2i;
    const c1r = a0r + C1 * b1r + C2 * b2r, c1i = a0i + C1 * b1i + C2 * b2i;
    const c2r = a0r + C2 * b1r + C1 * b2r, c2i = a0i + C2 * b1i + C1 * b2i;
    // i·(s1 d1 + s2 d2) and i·(s2 d1 − s1 d2), signs folded into s1, s2n
    const e1r = -(s1 * d1i + s2n * d2i), e1i = s1 * d1r + s2n * d2r;
    const e2r = -(s2n * d1i - s1 * d2i), e2i = s2n * d1r - s1 * d2r;
    const y1r = c1r + e1r, y1i = c1i + e1i, y4r = c1r - e1r, y4i = c1i - e1i;
    const y2r = c2r + e2r, y2i = c2i + e2i, y3r = c2r - e2r, y3i = c2i - e2i;
    y[o + s2] = y1r * w1r - y1i * w1i;
    y[o + s2 + 1] = y1r * w1i + y1i * w1r;
    y[o + 2 * s2] = y2r * w2r - y2i * w2i;
    y[o + 2 * s2 + 1] = y2r * w2i + y2i * w2r;
    y[o + 3 * s2] = y3r * w3r - y3i * w3i;
    y[o + 3 * s2 + 1] = y3r * w3i + y3i * w3r;
    y[o + 4 * s2] = y4r * w4r - y4i * w4i;
    y[o + 4 * s2 + 1] = y4r * w4i + y4i * w4r;
  }
}

/** Generic odd prime radix r: Y_k = Σ_j a_j ω^{jk} by pairs (a_j ± a_{r−j}), O(r²). */
function passGeneric(
  x: Float64Array,
  y: Float64Array,
  st: Stage,
  n: number,
  sg: number,
  scratch: Float64Array,
): void {
  const r = st.radix, s = st.stride, m = st.len / r, tw = st.twiddle;
  const d = (2 * n) / r, s2 = 2 * s, half = (r - 1) / 2;
  // scratch: cos/sin(2π jk / r) for jk mod r, then b_j, d_j (re, im) for j = 1..half
  const cs = scratch, b = 2 * r, dd = b + 2 * half;
  for (let p = 0; p < m; p++) {
    for (let q = 0; q < s; q++) {
      const i = 2 * (q + s * p), o = 2 * (q + s * r * p);
      const a0r = x[i], a0i = x[i + 1];
      let y0r = a0r, y0i = a0i;
      for (let j = 1; j <= half; j++) {
        const ur = x[i + j * d], ui = x[i + j * d + 1];
        const vr = x[i + (r - j) * d], vi = x[i + (r - j) * d + 1];
        cs[b + 2 * (j - 1)] = ur + vr;
        cs[b + 2 * (j - 1) + 1] = ui + vi;
        cs[dd + 2 * (j - 1)] = ur - vr;
        cs[dd + 2 * (j - 1) + 1] = ui - vi;
        y0r += ur + vr;
        y0i += ui + vi;
      }
      y[o] = y0r;
      y[o + 1] = y0i;
      for (let k = 1; k <= half; k++) {
        let cr = a0r, ci = a0i, er = 0, ei = 0;
        for (let j = 1; j <= half; j++) {
          const jk = (j * k) % r;
          const c = cs[2 * jk], sn = sg * cs[2 * jk + 1];
          cr += c * cs[b + 2 * (j - 1)];
          ci += c * cs[b + 2 * (j - 1) + 1];
          // i·sn·d_j
          er -= sn * cs[dd + 2 * (j - 1) + 1];
          ei += sn * cs[dd + 2 * (j - 1)];
        }
        const ykr = cr + er, yki = ci + ei, yrr = cr - er, yri = ci - ei;
        const tk = 2 * (p * (r - 1) + k - 1), tr = 2 * (p * (r - 1) + r - k - 1);
        const wkr = tw[tk], wki = sg * tw[tk + 1], wrr = tw[tr], wri = sg * tw[tr + 1];
        y[o + k * s2] = ykr * wkr - yki * wki;
        y[o + k * s2 + 1] = ykr * wki + yki * wkr;
        y[o + (r - k) * s2] = yrr * wrr - yri * wri;
        y[o + (r - k) * s2 + 1] = yrr * wri + yri * wrr;
      }
    }
  }
}

function stockhamPlan(n: number): ComplexDftPlan {
  const stages = buildStages(n, factorize(n));
  const scratch = new Float64Array(2 * n);
  const maxR = Math.max(...stages.map((s) => s.radix));
  const gen = new Float64Array(2 * maxR + 2 * (maxR - 1));
  const genTables = new Map<number, Float64Array>();
  for (const st of stages) {
    if (st.radix > 5 && !genTables.has(st.radix)) {
      const t = new Float64Array(2 * st.radix);
      for (let j = 0; j < st.radix; j++) {
        t[2 * j] = Math.cos((2 * Math.PI * j) / st.radix);
        t[2 * j + 1] = Math.sin((2 * Math.PI * j) / st.radix);
      }
      genTables.set(st.radix, t);
    }
  }
  const runPass = (i: number, src: Float64Array, dst: Float64Array, sg: number) => {
    const st = stages[i];
    switch (st.radix) {
      case 8:
        pass8(src, dst, st, n, sg);
        break;
      case 4:
        pass4(src, dst, st, n, sg);
        break;
      case 2:
        pass2(src, dst, st, n, sg);
        break;
      case 3:
        pass3(src, dst, st, n, sg);
        break;
      case 5:
        pass5(src, dst, st, n, sg);
        break;
      default:
        gen.set(genTables.get(st.radix)!);
        passGeneric(src, dst, st, n, sg, gen);
    }
  };
  // all passes but the last (which writes into output; passes alternate output/scratch)
  const early = (input: Float64Array, output: Float64Array, sg: number) => {
    const count = stages.length;
    let src = input;
    for (let i = 0; i < count - 1; i++) {
      const dst = (count - 1 - i) % 2 === 0 ? output : scratch;
      runPass(i, src, dst, sg);
      src = dst;
    }
    return src;
  };
  const run = (input: Float64Array, output: Float64Array, sg: number) => {
    runPass(stages.length - 1, early(input, output, sg), output, sg);
  };
  // the last pass has sub-transforms of length r (twiddles 1): y[q + s·k] = Σ_j x[q + s·j]·ω^{jk}
  const last = stages[stages.length - 1];
  const lr = last.radix, ls = n / lr;
  const roots = new Float64Array(2 * lr);
  for (let u = 0; u < lr; u++) {
    roots[2 * u] = Math.cos((2 * Math.PI * u) / lr);
    roots[2 * u + 1] = Math.sin((2 * Math.PI * u) / lr);
  }
  const lastAt = (x: Float64Array, y: Float64Array, t: number) => {
    const k = (t / ls) | 0, q = t - ls * k;
    let re = 0, im = 0;
    for (let j = 0, u = 0, o = 2 * q; j < lr; j++, o += 2 * ls) {
      const c = roots[2 * u], sn = roots[2 * u + 1];
      const xr = x[o], xi = x[o + 1];
      re += xr * c - xi * sn;
      im += xr * sn + xi * c;
      u += k;
      if (u >= lr) u -= lr;
    }
    y[2 * t] = re;
    y[2 * t + 1] = im;
  };
  return {
    n,
    forward: (input, output) => run(input, output, -1),
    inverse: (input, output) => run(input, output, 1),
    inverseEdges(input, output, edge) {
      if (2 * edge * lr >= n) return run(input, output, 1);
      const src = early(input, output, 1);
      for (let t = 0; t < edge; t++) lastAt(src, output, t);
      for (let t = Math.max(edge, n - edge); t < n; t++) lastAt(src, output, t);
    },
  };
}

function bluesteinPlan(n: number): ComplexDftPlan {
  const m = smoothLength(2 * n - 1);
  const inner = stockhamPlan(m);
  // chirp w_k = e^{iπ k²/N}; k² mod 2N keeps the angle exact for large k
  const cr = new Float64Array(n), ci = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const ang = (Math.PI * ((k * k) % (2 * n))) / n;
    cr[k] = Math.cos(ang);
    ci[k] = Math.sin(ang);
  }
  // spectra of b_j = w_j (forward) laid out circularly over M for j in (−N, N), scaled by 1/M
  const chirpSpectrum = (sg: number) => {
    const b = new Float64Array(2 * m), f = new Float64Array(2 * m);
    for (let k = 0; k < n; k++) {
      b[2 * k] = cr[k];
      b[2 * k + 1] = -sg * ci[k];
      if (k > 0) {
        b[2 * (m - k)] = cr[k];
        b[2 * (m - k) + 1] = -sg * ci[k];
      }
    }
    inner.forward(b, f);
    for (let i = 0; i < 2 * m; i++) f[i] /= m;
    return f;
  };
  const spectra = new Map<number, Float64Array>();
  const a = new Float64Array(2 * m), af = new Float64Array(2 * m);
  // X_k = conj-chirp_k Σ_j (x_j conj-chirp_j) chirp_{k−j} for the forward sign (sg = −1)
  const run = (input: Float64Array, output: Float64Array, sg: number) => {
    let bf = spectra.get(sg);
    if (!bf) spectra.set(sg, bf = chirpSpectrum(sg));
    a.fill(0);
    for (let k = 0; k < n; k++) {
      const xr = input[2 * k], xi = input[2 * k + 1], wr = cr[k], wi = sg * ci[k];
      a[2 * k] = xr * wr - xi * wi;
      a[2 * k + 1] = xr * wi + xi * wr;
    }
    inner.forward(a, af);
    for (let k = 0; k < m; k++) {
      const ar = af[2 * k], ai = af[2 * k + 1], br = bf[2 * k], bi = bf[2 * k + 1];
      af[2 * k] = ar * br - ai * bi;
      af[2 * k + 1] = ar * bi + ai * br;
    }
    inner.inverse(af, a);
    for (let k = 0; k < n; k++) {
      const yr = a[2 * k], yi = a[2 * k + 1], wr = cr[k], wi = sg * ci[k];
      output[2 * k] = yr * wr - yi * wi;
      output[2 * k + 1] = yr * wi + yi * wr;
    }
  };
  return {
    n,
    forward: (input, output) => run(input, output, -1),
    inverse: (input, output) => run(input, output, 1),
    inverseEdges: (input, output) => run(input, output, 1),
  };
}

const cache = new Map<number, ComplexDftPlan>();

/**
 * The complex DFT plan of length n (plans are cached per length, up to 32 lengths).
 *
 * @param n transform length, a positive integer
 * @returns a plan whose `forward` and `inverse` transform interleaved complex arrays of 2n
 *   numbers
 * @throws {RangeError} when n is not a positive integer
 * @example
 * ```ts
 * import { complexDftPlan } from "./complex_dft_plan.ts";
 * import assert from "node:assert/strict";
 * // the DFT of a unit impulse at j = 1 is e^{−2πi k/N}; N = 6 = 2·3
 * const n = 6, x = new Float64Array(2 * n), X = new Float64Array(2 * n);
 * x[2] = 1;
 * complexDftPlan(n).forward(x, X);
 * for (let k = 0; k < n; k++) {
 *   assert.ok(Math.abs(X[2 * k] - Math.cos((2 * Math.PI * k) / n)) < 1e-15);
 *   assert.ok(Math.abs(X[2 * k + 1] + Math.sin((2 * Math.PI * k) / n)) < 1e-15);
 * }
 * ```
 */
export function complexDftPlan(n: number): ComplexDftPlan {
  if (!Number.isInteger(n) || n < 1) {
    throw new RangeError(`Cannot plan DFT: length must be a positive integer, got ${n}`);
  }
  let p = cache.get(n);
  if (!p) {
    const copy = (i: Float64Array, o: Float64Array) => o.set(i.subarray(0, 2));
    p = n === 1
      ? { n, forward: copy, inverse: copy, inverseEdges: copy }
      : useBluestein(n)
      ? bluesteinPlan(n)
      : stockhamPlan(n);
    if (cache.size >= 32) cache.delete(cache.keys().next().value!);
    cache.set(n, p);
  }
  return p;
}
