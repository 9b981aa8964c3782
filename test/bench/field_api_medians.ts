/**
 * Side-by-side medians of the field-significance workload (field_case.ts: 5° field, 600 months,
 * lags 0..24, 1,000 surrogates) through the API (field_api_run.ts: upload, then `POST
 * /v1/solar-signal-maps` on 2 Web Workers, with `SUNLAG_BLAS=auto`, OpenBLAS where it loads, and
 * `off`, WebAssembly), the same test called on core directly with the service's chunk task
 * (field_run.ts blas2), and the numpy peer as a researcher writes it (field_numpy.py, float64),
 * each in its own process, in interleaved rounds; peak resident memory of each.
 *
 *   deno run -A test/bench/field_api_medians.ts [rounds]
 *
 * @module
 */
import { median as d3Median } from "d3-array";
import { writeFieldCase } from "./field_case.ts";

const ROUNDS = Number(Deno.args[0] ?? 3);
const DIR = new URL("../output/field_case", import.meta.url).pathname;
const here = (f: string) => new URL(`./${f}`, import.meta.url).pathname;
const median = (xs: number[]) => d3Median(xs) ?? NaN;

interface Run {
  seconds: number;
  peakBytes: number;
  pField: number;
  observedBest: number;
  resultDigest?: string;
}

function run(cmd: string, args: string[]): Run {
  const out = new Deno.Command(cmd, { args, stdout: "piped", stderr: "piped" }).outputSync();
  if (!out.success) throw new Error(`${cmd}: ${new TextDecoder().decode(out.stderr)}`);
  const lines = new TextDecoder().decode(out.stdout).trim().split("\n");
  return JSON.parse(lines[lines.length - 1]);
}

await writeFieldCase(DIR);
const deno = Deno.execPath();
const contenders: [string, () => Run][] = [
  ["sunlag API, 2 workers", () => run(deno, ["run", "-A", here("field_api_run.ts"), "auto"])],
  ["sunlag core, 2 workers", () => run(deno, ["run", "-A", here("field_run.ts"), "blas2"])],
  ["sunlag API off, 2 workers", () => run(deno, ["run", "-A", here("field_api_run.ts"), "off"])],
  ["numpy float64", () => run("/usr/bin/python3", [here("field_numpy.py"), DIR, "float64"])],
];
const rows = new Map(contenders.map(([n]) => [n, [] as Run[]]));
const load0 = Deno.loadavg()[0];
for (let r = 0; r < ROUNDS; r++) for (const [n, f] of contenders) rows.get(n)!.push(f());
const api = rows.get("sunlag API, 2 workers")!, core = rows.get("sunlag core, 2 workers")!;
const np = rows.get("numpy float64")!;
console.log(JSON.stringify(
  {
    rounds: ROUNDS,
    loadAverage: [load0, Deno.loadavg()[0]],
    contenders: Object.fromEntries([...rows].map(([n, rs]) => [n, {
      medianSeconds: median(rs.map((x) => x.seconds)),
      peakMiB: Math.max(...rs.map((x) => x.peakBytes)) / 2 ** 20,
      pField: rs[0].pField,
      observedBest: rs[0].observedBest,
      seconds: rs.map((x) => +x.seconds.toFixed(3)),
      resultDigests: [...new Set(rs.map((x) => x.resultDigest))],
    }])),
    ratioApiToCore: median(api.map((x, i) => x.seconds / core[i].seconds)),
    ratioApiToNumpy: median(api.map((x, i) => x.seconds / np[i].seconds)),
    ratioApiToNumpyPerRound: api.map((x, i) => +(x.seconds / np[i].seconds).toFixed(3)),
    ratioApiToApiOff: median(
      api.map((x, i) => x.seconds / rows.get("sunlag API off, 2 workers")![i].seconds),
    ),
  },
  null,
  2,
));
