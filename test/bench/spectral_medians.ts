/**
 * Side-by-side medians of the spectral workload (spectral_case.ts) and its numpy twin
 * (spectral_numpy.py), interleaved: in each round every task runs once here and once in a
 * numpy process that stays up (`--serve`), so both see the same machine load. Prints medians,
 * minima, the Deno/numpy ratio of the medians, and peak resident memory (Deno: the largest
 * RSS seen after a task; numpy: ru_maxrss).
 *
 *   deno run -A test/bench/spectral_medians.ts [rounds]
 */
import { median, min } from "d3-array";
import { spectralCase } from "./spectral_case.ts";

const rounds = Number(Deno.args[0] ?? 5);
const TASKS = [
  ["calibrate_ols", "calibrate 100 bands × 17,000 days, OLS + 5-fold CV + correlation"],
  ["calibrate_prais_winsten", "calibrate 100 bands × 17,000 days, Prais–Winsten + CV + corr."],
  ["reconstruct", "reconstruct 100 bands × 119,000 days + integral, 95 % intervals"],
] as const;

const env = { ...Deno.env.toObject() };
delete env.OPENBLAS_CORETYPE;
delete env.OPENBLAS_L2_SIZE;
const py = new Deno.Command("/usr/bin/python3", {
  args: [new URL("./spectral_numpy.py", import.meta.url).pathname, "--serve"],
  stdin: "piped",
  stdout: "piped",
  env,
  clearEnv: true,
}).spawn();
const writer = py.stdin.getWriter();
const lines = py.stdout.pipeThrough(new TextDecoderStream()).getReader();
let pending = "";
async function readLine(): Promise<Record<string, unknown>> {
  while (!pending.includes("\n")) {
    const r = await lines.read();
    if (r.done) throw new Error("numpy process ended");
    pending += r.value;
  }
  const i = pending.indexOf("\n");
  const line = pending.slice(0, i);
  pending = pending.slice(i + 1);
  return JSON.parse(line);
}
async function numpy(task: string): Promise<Record<string, unknown>> {
  await writer.write(new TextEncoder().encode(task + "\n"));
  return await readLine();
}

const ready = await readLine();
const work = spectralCase();
const run: Record<string, () => unknown> = {
  calibrate_ols: work.calibrateOls,
  calibrate_prais_winsten: work.calibratePraisWinsten,
  reconstruct: work.reconstruct,
};
const times: Record<string, { deno: number[]; numpy: number[] }> = {};
let rss = 0;
for (const [k] of TASKS) {
  times[k] = { deno: [], numpy: [] };
  run[k](); // warm-up (JIT)
  await numpy(k); // warm-up
}
for (let r = 0; r < rounds; r++) {
  for (const [k] of TASKS) {
    const t0 = performance.now();
    run[k]();
    times[k].deno.push(performance.now() - t0);
    rss = Math.max(rss, Deno.memoryUsage().rss);
    times[k].numpy.push((await numpy(k)).ms as number);
  }
}
const peak = (await numpy("rss")).peak_rss_mb as number;
await writer.write(new TextEncoder().encode("quit\n"));
await writer.close();
await py.status;
const ms = (x: number | undefined) => (x ?? NaN).toFixed(0);
console.log(
  `deno ${Deno.version.deno} beside numpy ${ready.numpy} (OpenBLAS), ${rounds} interleaved rounds`,
);
for (const [k, label] of TASKS) {
  const d = times[k].deno, n = times[k].numpy;
  console.log(
    `${label}: deno median ${ms(median(d))} ms (min ${ms(min(d))}), numpy median ${
      ms(median(n))
    } ms (min ${ms(min(n))}), ratio ${(median(d)! / median(n)!).toFixed(2)}`,
  );
}
console.log(`peak RSS: deno ${(rss / 1e6).toFixed(0)} MB, numpy ${peak.toFixed(0)} MB`);
