/**
 * The canonical JSON bytes of a run's result (api/runs/json.ts `canonicalJsonBytes`, RFC 8785),
 * written in the compute worker before the digest: a result shaped like a 153,000-day
 * reconstruction (21 arrays of 153,402 numbers, 34 MB) and one shaped like a cycles run on 3,000
 * months (a 3,000-month time axis under four outputs, 0.3 MB). The numbers are a fixed function
 * of the index (deterministic), rounded to 7 decimals: about as many characters per number as
 * the reconstruction writes (12).
 *
 *   deno bench -A test/bench/canonical_bytes_bench.ts
 *
 * @module
 */
import { canonicalJsonBytes } from "../../api/runs/json.ts";

const wave = (n: number, a: number, f: number, offset: number) =>
  Array.from(
    { length: n },
    (_, i) => Math.round((offset + a * Math.sin(f * i + 0.1) * Math.cos(0.37 * i)) * 1e7) / 1e7,
  );

function reconstructionLike() {
  const n = 153_402;
  const time = Array.from({ length: n }, (_, i) => 2_309_000.5 + i);
  const factor = (k: number) => ({
    name: `factor_${k}`,
    loading: wave(n, 0.01 * (k + 1), 1e-3, 0),
  });
  const process = (k: number) => ({
    name: `cell_${k}`,
    lag1: wave(n, 0.2, 2e-4 * (k + 1), 0.5),
    loading: wave(n, 0.05, 3e-4 * (k + 1), 0),
  });
  return {
    cautions: ["invented"],
    error_model: {
      factors: Array.from({ length: 8 }, (_, k) => factor(k)),
      processes: Array.from({ length: 4 }, (_, k) => process(k)),
    },
    outputs: {
      tsi: {
        lower: wave(n, 0.6, 1.6e-3, 1360.2),
        time,
        uncertainty: wave(n, 0.05, 7e-4, 0.3),
        upper: wave(n, 0.6, 1.6e-3, 1361.4),
        value: wave(n, 0.6, 1.6e-3, 1360.8),
      },
    },
    warnings: [],
  };
}

function cyclesLike() {
  const n = 3_000;
  const time = Array.from({ length: n }, (_, i) => 1750 + (i + 0.5) / 12);
  const output = (k: number) => ({ time, value: wave(n, 60, 0.048, 80 + k) });
  return {
    cautions: [],
    outputs: { a: output(0), b: output(1), c: output(2), d: output(3) },
    warnings: [],
  };
}

const big = reconstructionLike();
const small = cyclesLike();
console.log(
  `bytes: reconstruction-like ${canonicalJsonBytes(big).length}, cycles-like ${
    canonicalJsonBytes(small).length
  }`,
);

Deno.bench({
  name: "canonical JSON bytes, reconstruction-like (21 × 153,402 numbers)",
  n: 30,
  warmup: 3,
  fn: () => {
    canonicalJsonBytes(big);
  },
});
Deno.bench({
  name: "canonical JSON bytes, cycles-like (3,000 months, 4 outputs)",
  fn: () => {
    canonicalJsonBytes(small);
  },
});
