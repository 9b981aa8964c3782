/**
 * Side-by-side benchmarks of sunlag against numpy/scipy, interleaved in one run:
 *
 *   deno task bench:peers [--rounds 7] [--only lag4096,cycles] [--out FILE]
 *
 * For each workload of workloads.ts it starts two long-lived processes, sunlag_side.ts (Deno)
 * and peer_side.py (Debian's python3 with numpy, scipy and OpenBLAS), which share the same
 * input files. Then, round after round, it asks each process for one timed repetition,
 * alternating which side goes first, so both sides see the same machine load. After one
 * untimed warm-up round it reports per workload the median seconds of each side, their ratio
 * (sunlag / peer; below 1 means sunlag is faster), the per-round ratios, the median CPU
 * seconds each process used per repetition (all its threads: workers, BLAS and FFT threads;
 * 10 ms resolution, so a guide for the short workloads), each process's peak resident
 * memory (VmHWM from /proc), the load average before and after, and the numbers
 * both sides computed (to check they did the same work). The summary goes to
 * test/bench/results/peers.json.
 *
 * OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE are removed from the peer's environment only: set on
 * some machines to work around old OpenBLAS bugs, they slow a current numpy; the kernel the
 * peer ran is recorded (`openblas.core`).
 *
 * @module
 */
import { median } from "d3-array";

const args = Deno.args;
const opt = (name: string, dflt: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && i + 1 < args.length ? args[i + 1] : dflt;
};
const ROUNDS = Number(opt("rounds", "7"));
const ONLY = opt("only", "lag4096,lag4000,irradiance,cycles").split(",");
const OUT = opt("out", new URL("../results/peers.json", import.meta.url).pathname);

/** A child process spoken to one JSON line at a time. */
class Side {
  #proc: Deno.ChildProcess;
  #writer: WritableStreamDefaultWriter<Uint8Array>;
  #lines: AsyncIterator<string>;
  constructor(cmd: string, cmdArgs: string[], env?: Record<string, string>) {
    this.#proc = new Deno.Command(cmd, {
      args: cmdArgs,
      stdin: "piped",
      stdout: "piped",
      stderr: "inherit",
      ...(env ? { env, clearEnv: true } : {}),
    }).spawn();
    this.#writer = this.#proc.stdin.getWriter();
    this.#lines = lines(this.#proc.stdout)[Symbol.asyncIterator]();
  }
  async read(): Promise<Record<string, unknown>> {
    const r = await this.#lines.next();
    if (r.done) throw new Error("benchmark side ended early");
    return JSON.parse(r.value);
  }
  async ask(cmd: string): Promise<Record<string, unknown>> {
    await this.#writer.write(new TextEncoder().encode(cmd + "\n"));
    return await this.read();
  }
  /** CPU seconds used so far by all threads (utime + stime of /proc/PID/stat, 100 ticks/s). */
  cpuSeconds(): number {
    const st = Deno.readTextFileSync(`/proc/${this.#proc.pid}/stat`);
    const f = st.slice(st.lastIndexOf(")") + 2).split(" ");
    return (Number(f[11]) + Number(f[12])) / 100;
  }
  /** Peak resident set size so far, MiB (Linux: VmHWM of /proc/PID/status). */
  peakMiB(): number {
    const st = Deno.readTextFileSync(`/proc/${this.#proc.pid}/status`);
    const m = /VmHWM:\s+(\d+) kB/.exec(st);
    return m ? Number(m[1]) / 1024 : NaN;
  }
  async quit(): Promise<void> {
    await this.#writer.write(new TextEncoder().encode("quit\n"));
    await this.#writer.close();
    await this.#proc.status;
  }
}

async function* lines(stream: ReadableStream<Uint8Array<ArrayBuffer>>): AsyncGenerator<string> {
  let buf = "";
  for await (const chunk of stream.pipeThrough(new TextDecoderStream())) {
    buf += chunk;
    let nl: number;
    while ((nl = buf.indexOf("\n")) >= 0) {
      const line = buf.slice(0, nl).trim();
      buf = buf.slice(nl + 1);
      if (line) yield line;
    }
  }
}

const peerEnv = { ...Deno.env.toObject() };
delete peerEnv.OPENBLAS_CORETYPE;
delete peerEnv.OPENBLAS_L2_SIZE;
const here = (f: string) => new URL(f, import.meta.url).pathname;

interface Pair {
  name: string;
  sunlag: Side;
  peer: Side;
  ready: { sunlag: Record<string, unknown>; peer: Record<string, unknown> };
  seconds: { sunlag: number[]; peer: number[] };
  cpu: { sunlag: number[]; peer: number[] };
  check: { sunlag: unknown; peer: unknown };
}

const pairs: Pair[] = [];
for (const name of ONLY) {
  const dir = await Deno.makeTempDir({ prefix: `sunlag-bench-${name}-` });
  const sunlag = new Side(Deno.execPath(), ["run", "-A", here("./sunlag_side.ts"), name, dir]);
  const readyS = await sunlag.read(); // inputs are written before the peer starts
  const peer = new Side("/usr/bin/python3", [here("./peer_side.py"), name, dir], peerEnv);
  const readyP = await peer.read();
  pairs.push({
    name,
    sunlag,
    peer,
    ready: { sunlag: readyS, peer: readyP },
    seconds: { sunlag: [], peer: [] },
    cpu: { sunlag: [], peer: [] },
    check: { sunlag: null, peer: null },
  });
}

const load0 = Deno.loadavg();
const started = new Date().toISOString();
for (let r = 0; r <= ROUNDS; r++) {
  for (const p of pairs) {
    const order: ("sunlag" | "peer")[] = r % 2 ? ["peer", "sunlag"] : ["sunlag", "peer"];
    for (const side of order) {
      const cpu0 = p[side].cpuSeconds();
      const res = await p[side].ask("run");
      if (r === 0) continue; // warm-up round
      const repeat = p.ready[side].repeat as number;
      p.cpu[side].push((p[side].cpuSeconds() - cpu0) / repeat);
      p.seconds[side].push(res.seconds as number);
      p.check[side] = res.check;
    }
  }
}
const load1 = Deno.loadavg();

const med = (xs: number[]) => median(xs) ?? NaN;
const results = [];
for (const p of pairs) {
  const s = med(p.seconds.sunlag), q = med(p.seconds.peer);
  results.push({
    workload: p.name,
    sunlag_seconds: s,
    peer_seconds: q,
    ratio: s / q,
    per_round_ratios: p.seconds.sunlag.map((v, i) => v / p.seconds.peer[i]),
    sunlag_rounds: p.seconds.sunlag,
    peer_rounds: p.seconds.peer,
    sunlag_cpu_seconds: med(p.cpu.sunlag),
    peer_cpu_seconds: med(p.cpu.peer),
    sunlag_peak_rss_mib: p.sunlag.peakMiB(),
    peer_peak_rss_mib: p.peer.peakMiB(),
    check: p.check,
  });
  await p.sunlag.quit();
  await p.peer.quit();
}
const peerInfo = pairs[0]?.ready.peer ?? {};
const summary = {
  started,
  rounds: ROUNDS,
  statistic: "median wall-clock seconds per repetition; ratio = sunlag / peer; " +
    "cpu_seconds: median CPU seconds per repetition, all threads of the process",
  machine: {
    cores: navigator.hardwareConcurrency,
    load_average_before: load0,
    load_average_after: load1,
  },
  versions: {
    deno: Deno.version.deno,
    python: peerInfo.python,
    numpy: peerInfo.numpy,
    scipy: peerInfo.scipy,
    openblas: peerInfo.openblas,
  },
  results,
};
await Deno.mkdir(new URL("../results/", import.meta.url), { recursive: true });
await Deno.writeTextFile(OUT, JSON.stringify(summary, null, 2) + "\n");

const f = (x: number) => x < 0.01 ? `${(x * 1e3).toFixed(3)} ms` : `${x.toFixed(3)} s`;
console.log(`side by side, ${ROUNDS} interleaved rounds (medians); ratio = sunlag / peer`);
console.log(
  `numpy ${peerInfo.numpy}, scipy ${peerInfo.scipy}, OpenBLAS core ${
    (peerInfo.openblas as { core?: string } | null)?.core ?? "?"
  }; deno ${Deno.version.deno}`,
);
for (const r of results) {
  console.log(
    `${r.workload.padEnd(11)} sunlag ${f(r.sunlag_seconds).padStart(10)}  peer ${
      f(r.peer_seconds).padStart(10)
    }  ratio ${r.ratio.toFixed(3)}  CPU ${f(r.sunlag_cpu_seconds)} / ${
      f(r.peer_cpu_seconds)
    }  peak RSS ${r.sunlag_peak_rss_mib.toFixed(0)} / ${r.peer_peak_rss_mib.toFixed(0)} MiB`,
  );
}
console.log(
  `load average (1, 5, 15 min) before ${load0.map((v) => v.toFixed(2)).join(", ")}, after ${
    load1.map((v) => v.toFixed(2)).join(", ")
  } on ${navigator.hardwareConcurrency} cores`,
);
console.log(`summary: ${OUT}`);
