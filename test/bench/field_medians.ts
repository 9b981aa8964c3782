/**
 * Side-by-side medians for the gridded-field area: the Monte Carlo field-significance test of
 * field_case.ts (5° field, 2,592 cells, 600 months, lags 0..24, 1,000 surrogates, best-lag
 * statistic), whole test from the field in memory, peak resident memory of each process:
 *
 * - sunlag, WebAssembly SIMD float32 kernel on 2 Web Workers (field_run.ts wasm2)
 * - sunlag, the same in one thread (wasm1)
 * - sunlag, one thread with OpenBLAS sgemm through Deno's FFI (blas; where the library exists)
 * - numpy/scipy as a researcher writes it (field_numpy.py), numpy's default float64 and a
 *   float32 variant, with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset for numpy alone.
 *
 * Every contender runs in its own process, in interleaved rounds (the machine is shared and
 * its load changes from minute to minute); medians per contender, and the median of the
 * per-round ratios.
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
const contenders: [string, () => Run][] = [
  ["sunlag wasm, 2 workers", () => run(deno, ["run", "-A", here("field_run.ts"), "wasm2"])],
  ["numpy float64", () => run("/usr/bin/python3", [here("field_numpy.py"), DIR, "float64"], pyEnv)],
  ["numpy float32", () => run("/usr/bin/python3", [here("field_numpy.py"), DIR, "float32"], pyEnv)],
  ["sunlag wasm, 1 thread", () => run(deno, ["run", "-A", here("field_run.ts"), "wasm1"])],
  ...(hasBlas
    ? [["sunlag OpenBLAS FFI", () => run(deno, ["run", "-A", here("field_run.ts"), "blas"])] as [
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

const ours = runs.get("sunlag wasm, 2 workers")!, np64 = runs.get("numpy float64")!;
const np32 = runs.get("numpy float32")!;
// the observed statistic is deterministic: sunlag and numpy float64 must agree on it
const maxDiff = Math.max(
  ...ours[0].observedFraction.map((v, j) => Math.abs(v - np64[0].observedFraction[j])),
);
const summary = {
  rounds: ROUNDS,
  loadAverage: [load0, load1],
  versions: np64[0].versions,
  contenders: Object.fromEntries(
    [...runs].map(([name, rs]) => [name, {
      medianSeconds: median(rs.map((r) => r.seconds)),
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
  ratioWasm2ToNumpy64: median(ours.map((r, i) => r.seconds / np64[i].seconds)),
  ratioWasm2ToNumpy32: median(ours.map((r, i) => r.seconds / np32[i].seconds)),
  ...(hasBlas
    ? {
      ratioBlasToNumpy64: median(
        runs.get("sunlag OpenBLAS FFI")!.map((r, i) => r.seconds / np64[i].seconds),
      ),
    }
    : {}),
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
    `  ${name.padEnd(24)} ${c.medianSeconds.toFixed(2)} s   peak ${c.peakMiB.toFixed(0)} MiB   p ${
      c.pField.toFixed(4)
    }`,
  );
}
console.log(
  `  ratio sunlag (2 workers) / numpy float64: ${summary.ratioWasm2ToNumpy64.toFixed(2)}`,
);
console.log(
  `  ratio sunlag (2 workers) / numpy float32: ${summary.ratioWasm2ToNumpy32.toFixed(2)}`,
);
if (hasBlas) {
  console.log(`  ratio sunlag OpenBLAS / numpy float64: ${summary.ratioBlasToNumpy64!.toFixed(2)}`);
}
console.log(`  observed fractions, max |sunlag − numpy float64|: ${maxDiff.toExponential(1)}`);
