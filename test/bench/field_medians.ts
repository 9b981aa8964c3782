/**
 * Side-by-side medians for the gridded-field area: the Monte Carlo field-significance test of
 * field_case.ts (5° field, 2,592 cells, 600 months, lags 0..24, 1,000 surrogates, best-lag
 * statistic), whole test from the field in memory, peak resident memory of each process:
 *
 * - sunlag on 2 Web Workers through the service's chunk task with its default engine: OpenBLAS
 *   sgemm through Deno's FFI, one OpenBLAS thread per worker (field_run.ts blas2; where the
 *   library exists, else the WebAssembly engine is the production path);
 * - the same with `SUNLAG_BLAS=off`, the WebAssembly SIMD float32 kernel (wasm2);
 * - the same as blas2 with OpenBLAS's own thread count (blas2-default-threads);
 * - numpy/scipy as a researcher writes it (field_numpy.py), numpy's default float64 and a
 *   float32 variant, with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset for numpy alone.
 *
 * Every contender runs in its own process, in interleaved rounds (the machine is shared and
 * its load changes from minute to minute); medians per contender, and the median of the
 * per-round ratios. The sunlag variants must print the same result SHA-256.
 *
 *   deno run -A test/bench/field_medians.ts [rounds]
 *
 * @module
 */
import { median as d3Median } from "d3-array";
import { writeFieldCase } from "./field_case.ts";

const ROUNDS = Number(Deno.args[0] ?? 5);
const DIR = new URL("../output/field_case", import.meta.url).pathname;
const median = (xs: number[]): number => d3Median(xs) ?? NaN;

interface Run {
  variant: string;
  seconds: number;
  peakBytes: number;
  pField: number;
  observedFraction: number[];
  observedBest: number;
  nullQ95: number;
  stages: Record<string, number>;
  engine?: string;
  resultSha256?: string;
  versions?: Record<string, string>;
}

function run(cmd: string, args: string[], env?: Record<string, string>): Run {
  const out = new Deno.Command(cmd, {
    args,
    stdout: "piped",
    stderr: "piped",
    ...(env ? { env, clearEnv: true } : {}),
  }).outputSync();
  if (!out.success) {
    throw new Error(`${cmd} ${args.join(" ")}: ${new TextDecoder().decode(out.stderr)}`);
  }
  const lines = new TextDecoder().decode(out.stdout).trim().split("\n");
  return JSON.parse(lines[lines.length - 1]);
}

const deno = Deno.execPath();
const here = (f: string) => new URL(`./${f}`, import.meta.url).pathname;
const pyEnv = Object.fromEntries(
  Object.entries(Deno.env.toObject()).filter(([k]) =>
    k !== "OPENBLAS_CORETYPE" && k !== "OPENBLAS_L2_SIZE"
  ),
);
const hasBlas = (() => {
  try {
    Deno.dlopen("libopenblas.so.0", {}).close();
    return true;
  } catch {
    return false;
  }
})();

await writeFieldCase(DIR);
const PROD = hasBlas ? "sunlag OpenBLAS, 2 workers" : "sunlag wasm, 2 workers";
const sunlag = (variant: string) => () => run(deno, ["run", "-A", here("field_run.ts"), variant]);
const contenders: [string, () => Run][] = [
  ...(hasBlas ? [[PROD, sunlag("blas2")] as [string, () => Run]] : []),
  ["numpy float64", () => run("/usr/bin/python3", [here("field_numpy.py"), DIR, "float64"], pyEnv)],
  ["numpy float32", () => run("/usr/bin/python3", [here("field_numpy.py"), DIR, "float32"], pyEnv)],
  ["sunlag wasm, 2 workers", sunlag("wasm2")],
  ...(hasBlas
    ? [["sunlag OpenBLAS default threads, 2 workers", sunlag("blas2-default-threads")] as [
      string,
      () => Run,
    ]]
    : []),
];
const runs = new Map<string, Run[]>(contenders.map(([name]) => [name, []]));
const load0 = Deno.loadavg()[0];
for (let r = 0; r < ROUNDS; r++) {
  for (const [name, fn] of contenders) runs.get(name)!.push(fn());
}
const load1 = Deno.loadavg()[0];

const ours = runs.get(PROD)!, np64 = runs.get("numpy float64")!;
const np32 = runs.get("numpy float32")!, wasm2 = runs.get("sunlag wasm, 2 workers")!;
const ratio = (xs: Run[], ys: Run[]) => median(xs.map((r, i) => r.seconds / ys[i].seconds));
const perRound = (xs: Run[], ys: Run[]) =>
  xs.map((r, i) => +(r.seconds / ys[i].seconds).toFixed(3));
// the observed statistic is deterministic: sunlag and numpy float64 must agree on it
const maxDiff = Math.max(
  ...ours[0].observedFraction.map((v, j) => Math.abs(v - np64[0].observedFraction[j])),
);
const digests = new Set(
  [...runs].filter(([n]) => n.startsWith("sunlag")).flatMap(([, rs]) =>
    rs.map((r) => r.resultSha256)
  ),
);
const summary = {
  rounds: ROUNDS,
  loadAverage: [load0, load1],
  versions: np64[0].versions,
  contenders: Object.fromEntries(
    [...runs].map(([name, rs]) => [name, {
      medianSeconds: median(rs.map((r) => r.seconds)),
      seconds: rs.map((r) => +r.seconds.toFixed(3)),
      stages: Object.fromEntries(
        Object.keys(rs[0].stages).map((k) => [k, median(rs.map((r) => r.stages[k]))]),
      ),
      peakMiB: Math.max(...rs.map((r) => r.peakBytes)) / 2 ** 20,
      pField: rs[0].pField,
      observedBest: rs[0].observedBest,
      nullQ95: rs[0].nullQ95,
      engine: rs[0].engine,
    }]),
  ),
  production: PROD,
  ratioToNumpy64: ratio(ours, np64),
  ratioToNumpy64PerRound: perRound(ours, np64),
  ratioToNumpy32: ratio(ours, np32),
  ratioToNumpy32PerRound: perRound(ours, np32),
  ratioToWasm2: ratio(ours, wasm2),
  ratioWasm2ToNumpy64: ratio(wasm2, np64),
  ...(hasBlas
    ? {
      ratioDefaultThreadsToOneThread: ratio(
        runs.get("sunlag OpenBLAS default threads, 2 workers")!,
        ours,
      ),
    }
    : {}),
  sunlagResultSha256: [...digests],
  observedFractionMaxDiffVsNumpy64: maxDiff,
};
await Deno.writeTextFile(
  new URL("../output/field_medians.json", import.meta.url),
  JSON.stringify(summary, null, 2) + "\n",
);
console.log(`field significance, 2,592 cells × 600 months, lags 0..24, 1,000 surrogates`);
console.log(
  `(${ROUNDS} interleaved rounds; load average ${load0.toFixed(1)} → ${load1.toFixed(1)})`,
);
for (const [name, c] of Object.entries(summary.contenders)) {
  console.log(
    `  ${name.padEnd(44)} ${c.medianSeconds.toFixed(2)} s   peak ${c.peakMiB.toFixed(0)} MiB   p ${
      c.pField.toFixed(4)
    }`,
  );
}
console.log(
  `  ${PROD} / numpy float64: ${summary.ratioToNumpy64.toFixed(2)} (rounds ${
    summary.ratioToNumpy64PerRound.join(", ")
  })`,
);
console.log(
  `  ${PROD} / numpy float32: ${summary.ratioToNumpy32.toFixed(2)} (rounds ${
    summary.ratioToNumpy32PerRound.join(", ")
  })`,
);
console.log(`  ${PROD} / sunlag wasm: ${summary.ratioToWasm2.toFixed(2)}`);
console.log(`  sunlag wasm / numpy float64: ${summary.ratioWasm2ToNumpy64.toFixed(2)}`);
if (hasBlas) {
  console.log(
    `  OpenBLAS default threads / 1 thread: ${summary.ratioDefaultThreadsToOneThread!.toFixed(2)}`,
  );
}
console.log(`  sunlag result SHA-256: ${summary.sunlagResultSha256.join(", ")}`);
console.log(`  observed fractions, max |sunlag − numpy float64|: ${maxDiff.toExponential(1)}`);
