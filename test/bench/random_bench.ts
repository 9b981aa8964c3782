/**
 * deno bench for the random streams: 2,047 uniforms (the phases of one 4,096-month surrogate)
 * through `uniform()` one call at a time and through `fill()`, which must give the same bits
 * (test/core/random/random_stream_test.ts).
 *
 *   deno bench -A test/bench/random_bench.ts
 */
import { randomStream } from "../../core/random/random_stream.ts";

const out = new Float64Array(2047);
let index = 0;

Deno.bench("2,047 uniforms, uniform() per value", { group: "u", baseline: true }, () => {
  const s = randomStream(7, index++ % 100_000);
  for (let i = 0; i < out.length; i++) out[i] = s.uniform();
});

Deno.bench("2,047 uniforms, fill()", { group: "u" }, () => {
  randomStream(7, index++ % 100_000).fill(out, out.length);
});
