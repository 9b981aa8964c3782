/**
 * Small run kinds for testing the run machinery itself (not registered in the service).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { CancelledError, InputProblem, type RunKind } from "../../api/runs/kind.ts";
import { refId, SeriesRef } from "../../api/schemas/series_ref.ts";
import { randomStream } from "../../core/random/mod.ts";
import { cautions, nums, OutputSeriesSchema } from "../../api/analyses/common/result_parts.ts";

/** Mean of a series plus a seeded Monte Carlo of bootstrap means; slow when `spin` > 0. */
export const meanKind: RunKind = {
  kind: "test-mean",
  path: "/v1/test-mean",
  algorithmVersion: "1.0.0",
  tag: "Test",
  summary: "mean",
  description: "mean with bootstrap",
  request: z.object({
    series: SeriesRef,
    replicates: z.number().int().min(1).max(100_000).default(50),
    spin_ms: z.number().min(0).max(10_000).default(0),
    seed: z.number().int().min(0).max(4294967295).default(7),
  }),
  result: z.object({
    mean: z.number(),
    bootstrap_means: nums,
    outputs: z.object({ doubled: OutputSeriesSchema }),
    cautions,
  }),
  estimateSeconds: (p: { spin_ms: number }) => p.spin_ms / 1000,
  async compute(p, ctx) {
    const s = ctx.series(refId(p.series));
    if (s.n < 3) throw new InputProblem("/series", "needs at least 3 points");
    const mean = s.value.reduce((a, b) => a + b, 0) / s.n;
    const means: number[] = [];
    const t0 = Date.now();
    for (let r = 0; r < p.replicates; r++) {
      const rng = randomStream(p.seed, r);
      let m = 0;
      for (let i = 0; i < s.n; i++) m += s.value[rng.int(0, s.n - 1)];
      means.push(m / s.n);
      if (p.spin_ms > 0) {
        while (Date.now() - t0 < (p.spin_ms * (r + 1)) / p.replicates) {
          // busy wait to stand in for heavy work
        }
        await new Promise((r) => setTimeout(r, 0));
      }
      if (ctx.cancelled()) throw new CancelledError();
      ctx.progress((r + 1) / p.replicates);
    }
    return {
      mean,
      bootstrap_means: means,
      outputs: {
        doubled: {
          name: "doubled",
          quantity: s.quantity,
          units: s.units,
          time: Array.from(s.time),
          value: Array.from(s.value, (v) => 2 * v),
        },
      },
      cautions: ["test kind"],
    };
  },
};

/** The analyses of this module, for a worker pool serving them (`new WorkerPool(n, url)`). */
export const RUN_KINDS: readonly RunKind[] = [meanKind];
