/**
 * Side-by-side medians of the spectral workload (spectral_case.ts) and its numpy twin
 * (spectral_numpy.py), interleaved: in each round every task runs once here and once in a
 * numpy process that stays up (`--serve`), so both see the same machine load. Prints medians,
 * minima, the Deno/numpy ratio of the medians and of each round, and peak resident memory
 * (Deno: the largest RSS seen after a task; numpy: ru_maxrss) and the load average before and
 * after (the 2 cores may be shared). The ensemble (100 realisations of 100 bands × 119,000 days) runs in this
 * thread (`ensemble`) and on a pool of 2 Web Workers (`ensemble_workers`, the path a run's
 * `ctx.parallel` takes: one member per chunk, one chunk in flight per worker); both are
 * compared with the one numpy ensemble.
 *
 *   deno run -A test/bench/spectral_medians.ts [rounds] [task,task,...]
 */
import { median, min } from "d3-array";
import { MemberSums, REALIZATIONS, spectralCase } from "./spectral_case.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import type { SpectralBandEnsembleChunk } from "../../core/irradiance/mod.ts";
import { SPECTRAL_ENSEMBLE_CHUNK } from "../../api/analyses/spectral_irradiance_reconstructions/tasks.ts";

const rounds = Number(Deno.args[0] ?? 5);
const only = Deno.args[1]?.split(",");
const ALL_TASKS = [
  ["calibrate_ols", "calibrate 100 bands × 17,000 days, OLS + 5-fold CV + correlation"],
  ["calibrate_prais_winsten", "calibrate 100 bands × 17,000 days, Prais–Winsten + CV + corr."],
  ["reconstruct", "reconstruct 100 bands × 119,000 days + integral, 95 % intervals"],
  ["ensemble", "ensemble: 100 realisations × 100 bands × 119,000 days + integral, 1 thread"],
  ["ensemble_workers", "the same ensemble on 2 Web Workers"],
] as const;
const TASKS = ALL_TASKS.filter(([k]) => !only || only.includes(k));
/** The numpy task each task is compared with. */
const PEER: Record<string, string> = { ensemble_workers: "ensemble" };

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
const pool = only && !only.includes("ensemble_workers") ? null : new WorkerPool(2);
let rss = 0;
/** Largest RSS seen after each task (the process's: it includes what earlier tasks left). */
const rssAfter: Record<string, number> = {};
const sample = (task?: string) => {
  const now = Deno.memoryUsage().rss;
  rss = Math.max(rss, now);
  if (task) rssAfter[task] = Math.max(rssAfter[task] ?? 0, now);
};
/** The ensemble on the pool: one member per chunk, one chunk in flight per worker. */
async function ensembleOnWorkers(): Promise<MemberSums> {
  const plan = work.plan(), sums = new MemberSums(work.weights);
  for (let m = 0; m < REALIZATIONS; m += pool!.size) {
    const chunks: SpectralBandEnsembleChunk[] = [];
    for (let k = m; k < Math.min(REALIZATIONS, m + pool!.size); k++) {
      chunks.push({ plan, seed: 1, first: k, count: 1 });
    }
    const outs = await pool!.parallel<SpectralBandEnsembleChunk, Float64Array>(
      SPECTRAL_ENSEMBLE_CHUNK,
      chunks,
    );
    for (const o of outs) sums.add(o);
    sample("ensemble_workers");
  }
  return sums;
}
const run: Record<string, () => unknown> = {
  calibrate_ols: work.calibrateOls,
  calibrate_prais_winsten: work.calibratePraisWinsten,
  reconstruct: work.reconstruct,
  ensemble: work.ensemble,
  ensemble_workers: ensembleOnWorkers,
};
const load0 = Deno.loadavg();
const times: Record<string, { deno: number[]; numpy: number[] }> = {};
const heavy = (k: string) => k.startsWith("ensemble");
for (const [k] of TASKS) {
  times[k] = { deno: [], numpy: [] };
  if (heavy(k)) continue; // minutes each: the JIT warms up within the first members
  await run[k](); // warm-up (JIT)
  await numpy(k); // warm-up
}
let sd: [number, number] | null = null;
for (let r = 0; r < rounds; r++) {
  for (const [k] of TASKS) {
    const t0 = performance.now();
    const out = await run[k]();
    times[k].deno.push(performance.now() - t0);
    if (out instanceof MemberSums) sd = [out.sd(1000, 30), out.sd(100_000, 30)];
    sample(k);
    // one numpy ensemble per round serves both ensemble tasks
    const peer = PEER[k] ?? k;
    if (PEER[k] && TASKS.some(([x]) => x === peer)) continue;
    times[k].numpy.push((await numpy(peer)).ms as number);
  }
}
for (const [k] of TASKS) if (PEER[k] && times[PEER[k]]) times[k].numpy = times[PEER[k]].numpy;
const load1 = Deno.loadavg();
pool?.terminate();
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
    } ms (min ${ms(min(n))}), ratio ${(median(d)! / median(n)!).toFixed(2)}; per round ${
      d.map((x, r) => (x / n[r]).toFixed(2)).join(" ")
    }`,
  );
}
console.log(
  `peak RSS: deno ${(rss / 1e6).toFixed(0)} MB (main thread and workers), numpy ${
    peak.toFixed(0)
  } MB; deno after each task: ${
    TASKS.map(([k]) => `${k} ${((rssAfter[k] ?? NaN) / 1e6).toFixed(0)}`).join(", ")
  } MB`,
);
if (sd) {
  console.log(
    `ensemble SD of band 30 on day 1,000 ${sd[0].toFixed(6)}, on day 100,000 ${sd[1].toFixed(6)}`,
  );
}
const la = (l: number[]) => l.map((x) => x.toFixed(2)).join(" ");
console.log(
  `load average (1, 5, 15 min) before ${la(load0)}, after ${
    la(load1)
  }, on ${navigator.hardwareConcurrency} cores`,
);
