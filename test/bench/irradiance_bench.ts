/**
 * Irradiance benchmarks (deno bench): the workload of irradiance_case.ts. The same work in
 * numpy: test/bench/peers/peer_side.py (`deno task bench:peers`).
 */
import { irradianceCase } from "./irradiance_case.ts";

const work = irradianceCase();

Deno.bench("calibrate: Prais–Winsten + 5-fold blocked CV, 17,000 days", () => {
  work.calibrate();
});

Deno.bench(
  "reconstruct: 153,000 days with 95 % prediction intervals (half back-extended)",
  () => {
    work.reconstruct();
  },
);
