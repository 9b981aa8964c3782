/**
 * Side-by-side medians of a 150 MB NetCDF-4 field upload: sunlag's `POST /v1/fields` into a
 * SQLite file store (field_upload_run.ts) against xarray's `open_dataset(...).load()` of the same
 * file (field_upload_xarray.py), each in its own process, in interleaved rounds; wall and CPU
 * time (the machine is shared: CPU time is the steadier figure) and peak resident memory. The file is written once by field_upload_make.py (Debian python3-netcdf4).
 *
 *   deno run -A test/bench/field_upload_medians.ts [rounds] [--before DIR]
 *
 * Contenders: the first upload of a fresh process (the HDF5 reader loads during it), xarray,
 * the same upload with the reader already loaded (`--warm`: xarray's import is outside its
 * clock too), and with --before, the upload of another checkout, all in the same rounds.
 *
 * @module
 */
import { median as d3Median } from "d3-array";

const ROUNDS = Number(Deno.args.find((a) => /^\d+$/.test(a)) ?? 3);
const at = Deno.args.indexOf("--before");
/** Another checkout (e.g. `git archive main | tar -x -C DIR`) measured in the same rounds. */
const BEFORE = at >= 0 ? Deno.args[at + 1] : null;
const DIR = new URL("../output/field_upload/", import.meta.url).pathname;
const FILE = `${DIR}field150.nc`;
const here = (f: string) => new URL(`./${f}`, import.meta.url).pathname;
const median = (xs: number[]) => d3Median(xs) ?? NaN;

type Row = { seconds: number; cpuSeconds: number; peakBytes: number };

function run(cmd: string, args: string[]): Row {
  const out = new Deno.Command(cmd, { args, stdout: "piped", stderr: "piped" }).outputSync();
  if (!out.success) throw new Error(`${cmd}: ${new TextDecoder().decode(out.stderr)}`);
  const lines = new TextDecoder().decode(out.stdout).trim().split("\n");
  return JSON.parse(lines[lines.length - 1]);
}

await Deno.mkdir(DIR, { recursive: true });
try {
  await Deno.stat(FILE);
} catch {
  const made = new Deno.Command("/usr/bin/python3", { args: [here("field_upload_make.py"), FILE] })
    .outputSync();
  if (!made.success) throw new Error(new TextDecoder().decode(made.stderr));
}
const contenders: [string, () => Row][] = [
  [
    "sunlag POST /v1/fields",
    () => run(Deno.execPath(), ["run", "-A", here("field_upload_run.ts"), FILE]),
  ],
  [
    "xarray open_dataset().load()",
    () => run("/usr/bin/python3", [here("field_upload_xarray.py"), FILE]),
  ],
  [
    "sunlag POST /v1/fields, HDF5 reader loaded",
    () => run(Deno.execPath(), ["run", "-A", here("field_upload_run.ts"), FILE, "--warm"]),
  ],
];
if (BEFORE) {
  contenders.push([
    `sunlag POST /v1/fields (${BEFORE})`,
    () =>
      run(Deno.execPath(), [
        "run",
        "-A",
        `${BEFORE}/test/bench/field_upload_run.ts`,
        FILE,
      ]),
  ]);
}
const rows = new Map(contenders.map(([n]) => [n, [] as Row[]]));
const load0 = Deno.loadavg()[0];
for (let r = 0; r < ROUNDS; r++) for (const [n, f] of contenders) rows.get(n)!.push(f());
const [a, b, ...others] = contenders.map(([n]) => rows.get(n)!);
const ratio = (xs: Row[], key: "seconds" | "cpuSeconds") =>
  median(xs.map((x, i) => x[key] / b[i][key]));
console.log(JSON.stringify(
  {
    rounds: ROUNDS,
    fileMiB: (await Deno.stat(FILE)).size / 2 ** 20,
    loadAverage: [load0, Deno.loadavg()[0]],
    contenders: Object.fromEntries([...rows].map(([n, rs]) => [n, {
      medianSeconds: median(rs.map((x) => x.seconds)),
      medianCpuSeconds: median(rs.map((x) => x.cpuSeconds)),
      peakMiB: Math.max(...rs.map((x) => x.peakBytes)) / 2 ** 20,
    }])),
    // medians of the per-round ratios to xarray (first: the cold sunlag upload)
    ratioSunlagToXarray: ratio(a, "seconds"),
    cpuRatioSunlagToXarray: ratio(a, "cpuSeconds"),
    ratiosToXarray: Object.fromEntries(
      contenders.slice(2).map(([n], i) => [n, {
        seconds: ratio(others[i], "seconds"),
        cpuSeconds: ratio(others[i], "cpuSeconds"),
      }]),
    ),
    perRound: Object.fromEntries([...rows].map(([n, rs]) => [
      n,
      rs.map((x) => [+x.seconds.toFixed(3), +x.cpuSeconds.toFixed(3)]),
    ])),
  },
  null,
  2,
));
