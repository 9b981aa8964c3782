/**
 * NetCDF write and read speed, sunlag beside xarray (Debian python3-xarray with netCDF4), one
 * interleaved run on the same machine: each round runs sunlag's operation, then xarray's
 * (driven over stdin by test/bench/netcdf_xarray.py, so Python's start-up is not counted).
 * Medians of the rounds; MB/s counts the uncompressed data bytes.
 *
 * - write: an ensemble of MEMBERS daily members over DAYS days (realization × time float32,
 *   ensemble mean, time and bounds) as NetCDF-3 classic: sunlag builds the CF dataset from the
 *   series (calendar axis included) and streams the file; xarray `to_netcdf`.
 * - read NetCDF-3: the file xarray wrote; sunlag opens it and decodes the member variable
 *   (mask and scale) into a Float32Array; xarray `open_dataset(path).load()`.
 * - read NetCDF-4: a 600 × 90 × 180 float32 field, zlib level 4, chunked (12, 90, 180);
 *   sunlag describes the grid and reads all blocks (h5wasm in its worker); xarray
 *   `open_dataset(path).load()`.
 * - for context, xarray's reads again with `decode_times=False` (no conversion of the time axis
 *   and bounds to datetime64), since sunlag's reads decode CF time too but more cheaply.
 *
 *   deno run -A test/bench/netcdf_medians.ts [rounds] [members] [days]
 */
import { median as d3Median } from "d3-array";
import { buildSeriesDataset } from "../../api/netcdf/series_dataset.ts";
import { netcdf3Chunks } from "../../core/cf/netcdf3_write.ts";
import { cfMaskAndScale } from "../../core/cf/cf_mask_and_scale.ts";
import { withNetcdf } from "../../api/netcdf/open.ts";
import { packingOf } from "../../api/netcdf/cf_variables.ts";
import { describeCfGrid, readCfGridBlocks } from "../../api/netcdf/cf_grid.ts";
import { stopNetcdf4Worker } from "../../api/netcdf/netcdf4_source.ts";
import { cfDateFromDayNumber, cfDayNumber, decimalYear } from "../../core/time/mod.ts";

const median = (xs: number[]): number => d3Median(xs) ?? NaN;
const ROUNDS = Number(Deno.args[0] ?? 7);
const MEMBERS = Number(Deno.args[1] ?? 100);
const DAYS = Number(Deno.args[2] ?? 119_000);

const dir = await Deno.makeTempDir({ prefix: "sunlag-ncbench-" });
const py = new Deno.Command("/usr/bin/python3", {
  args: [new URL("./netcdf_xarray.py", import.meta.url).pathname, String(MEMBERS), String(DAYS)],
  stdin: "piped",
  stdout: "piped",
  stderr: "inherit",
}).spawn();
const writer = py.stdin.getWriter();
const lines = py.stdout.pipeThrough(new TextDecoderStream()).getReader();
let buffered = "";
async function ask(cmd: string): Promise<Record<string, unknown>> {
  await writer.write(new TextEncoder().encode(cmd + "\n"));
  for (;;) {
    const nl = buffered.indexOf("\n");
    if (nl >= 0) {
      const line = buffered.slice(0, nl);
      buffered = buffered.slice(nl + 1);
      return JSON.parse(line);
    }
    const r = await lines.read();
    if (r.done) throw new Error("python helper ended");
    buffered += r.value;
  }
}

// The same ensemble as netcdf_xarray.py: member k, day j = 1361 + 0.5 sin(2πj/4018) + 0.01 k.
const ref = cfDayNumber("standard", 1850, 1, 1) + 3650;
const time = new Float64Array(DAYS);
for (let j = 0; j < DAYS; j++) {
  const c = cfDateFromDayNumber("proleptic_gregorian", ref + j);
  time[j] = decimalYear(c.year, c.month, c.day, 0.5);
}
const base = Float64Array.from(
  { length: DAYS },
  (_, j) => 1361 + 0.5 * Math.sin((2 * Math.PI * j) / 4018),
);
const member = (k: number) => {
  const m = new Float32Array(DAYS);
  for (let j = 0; j < DAYS; j++) m[j] = base[j] + 0.01 * k;
  return m;
};
const mean = Float64Array.from(base, (b) => b + 0.01 * (MEMBERS - 1) / 2);

async function sunlagWrite(path: string): Promise<number> {
  const t0 = performance.now();
  const { dataset } = buildSeriesDataset(
    {
      name: "TSI ensemble (bench)",
      quantity: "tsi",
      units: "W m-2",
      time,
      value: mean,
      resolution: "daily",
    },
    { title: "bench", history: [], references: [], warnings: [], cautions: [] },
    { calendar: "standard", ensemble: { members: MEMBERS, member } },
  );
  const f = await Deno.open(path, { write: true, create: true, truncate: true });
  for (const chunk of netcdf3Chunks(dataset)) {
    let at = 0;
    while (at < chunk.length) at += await f.write(chunk.subarray(at));
  }
  f.close();
  return (performance.now() - t0) / 1000;
}

async function sunlagRead3(path: string): Promise<number> {
  const t0 = performance.now();
  await withNetcdf(path, async (src) => {
    const v = src.header.variables.find((x) => x.name === "tsi_realizations")!;
    const raw = await src.read(v.name);
    const out = new Float32Array(raw.length);
    cfMaskAndScale(raw, v.type, packingOf(v), out);
    for (const n of ["time", "time_bnds", "tsi"]) await src.read(n);
  });
  return (performance.now() - t0) / 1000;
}

async function sunlagRead4(path: string): Promise<number> {
  const t0 = performance.now();
  await withNetcdf(path, async (src) => {
    const g = await describeCfGrid(src, "tas");
    for await (const _ of readCfGridBlocks(src, g)) { /* each block decoded, then dropped */ }
  });
  return (performance.now() - t0) / 1000;
}

const versions = await ask("versions");
const field = `${dir}/field.nc`;
await ask(`make_field ${field}`);
const fieldBytes = 600 * 90 * 180 * 4;
const ensBytes = MEMBERS * DAYS * 4 + DAYS * 8 * 4;
const t: Record<string, number[]> = {
  sunlag_write: [],
  xarray_write: [],
  sunlag_read3: [],
  xarray_read3: [],
  sunlag_read4: [],
  xarray_read4: [],
  xarray_read3_raw_times: [],
  xarray_read4_raw_times: [],
};
// Warm-up round (not counted), then interleaved rounds.
for (let r = -1; r < ROUNDS; r++) {
  const keep = (k: string, s: number) => r >= 0 && t[k].push(s);
  keep("sunlag_write", await sunlagWrite(`${dir}/s.nc`));
  keep("xarray_write", (await ask(`write ${dir}/x.nc`)).seconds as number);
  keep("sunlag_read3", await sunlagRead3(`${dir}/x.nc`));
  keep("xarray_read3", (await ask(`read ${dir}/x.nc`)).seconds as number);
  keep("sunlag_read4", await sunlagRead4(field));
  keep("xarray_read4", (await ask(`read ${field}`)).seconds as number);
  keep("xarray_read3_raw_times", (await ask(`read_raw ${dir}/x.nc`)).seconds as number);
  keep("xarray_read4_raw_times", (await ask(`read_raw ${field}`)).seconds as number);
}
const sizes = {
  sunlag: (await Deno.stat(`${dir}/s.nc`)).size,
  xarray: (await Deno.stat(`${dir}/x.nc`)).size,
};
await writer.close();
await py.status;
stopNetcdf4Worker();
await Deno.remove(dir, { recursive: true });

const mbps = (bytes: number, s: number) => Math.round((bytes / 1e6 / s) * 10) / 10;
const m = Object.fromEntries(Object.entries(t).map(([k, v]) => [k, median(v)]));
console.log(JSON.stringify(
  {
    rounds: ROUNDS,
    workload: {
      ensemble: `${MEMBERS} members × ${DAYS} days float32 + mean, time, bounds (${
        (ensBytes / 1e6).toFixed(1)
      } MB of data)`,
      field: `600 × 90 × 180 float32, NetCDF-4 zlib 4, chunks (12, 90, 180) (${
        (fieldBytes / 1e6).toFixed(1)
      } MB of data)`,
      file_bytes: sizes,
    },
    xarray: versions,
    deno: Deno.version.deno,
    median_seconds: m,
    mb_per_s: {
      write_netcdf3: {
        sunlag: mbps(ensBytes, m.sunlag_write),
        xarray: mbps(ensBytes, m.xarray_write),
      },
      read_netcdf3: {
        sunlag: mbps(ensBytes, m.sunlag_read3),
        xarray: mbps(ensBytes, m.xarray_read3),
      },
      read_netcdf4_zlib: {
        sunlag: mbps(fieldBytes, m.sunlag_read4),
        xarray: mbps(fieldBytes, m.xarray_read4),
      },
      xarray_without_time_decoding: {
        read_netcdf3: mbps(ensBytes, m.xarray_read3_raw_times),
        read_netcdf4_zlib: mbps(fieldBytes, m.xarray_read4_raw_times),
      },
    },
    ratio_sunlag_time_over_xarray: {
      write_netcdf3: m.sunlag_write / m.xarray_write,
      read_netcdf3: m.sunlag_read3 / m.xarray_read3,
      read_netcdf4_zlib: m.sunlag_read4 / m.xarray_read4,
    },
  },
  null,
  2,
));
