/**
 * The sunlag side of the side-by-side benchmarks (test/bench/peers/run_peers.ts starts one
 * process of this script per workload, and one process of peer_side.py beside it).
 *
 *   deno run -A test/bench/peers/sunlag_side.ts WORKLOAD INPUT_DIR
 *
 * On start it builds the workload's inputs (invented data, fixed seeds), writes them to
 * INPUT_DIR as little-endian float64 files so that the peer reads exactly the same numbers,
 * and prints one JSON line {"ready": true, ...}. Then, per line on standard input: `run`
 * times one repetition of the workload and prints {"seconds": s, "check": {...}}; `quit` ends.
 * The runner reads this process's peak resident memory from /proc before it quits.
 *
 * @module
 */
import { workloads } from "./workloads.ts";

const [name, dir] = Deno.args;
const w = workloads[name];
if (!w || !dir) {
  console.error(`usage: sunlag_side.ts ${Object.keys(workloads).join("|")} INPUT_DIR`);
  Deno.exit(2);
}
const job = await w.setup(dir);
const out = (o: unknown) => console.log(JSON.stringify(o));
out({ ready: true, deno: Deno.version.deno, repeat: job.repeat });

let buffered = "";
for await (const chunk of Deno.stdin.readable.pipeThrough(new TextDecoderStream())) {
  buffered += chunk;
  let nl: number;
  while ((nl = buffered.indexOf("\n")) >= 0) {
    const cmd = buffered.slice(0, nl).trim();
    buffered = buffered.slice(nl + 1);
    if (cmd === "quit") {
      await job.close?.();
      Deno.exit(0);
    }
    if (cmd === "run") {
      let check: unknown = null;
      const t0 = performance.now();
      for (let i = 0; i < job.repeat; i++) check = await job.run();
      out({ seconds: (performance.now() - t0) / 1000 / job.repeat, check });
    }
  }
}
