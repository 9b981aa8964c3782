/**
 * Side by side with ensemble_numpy.py: 1,000 members of the daily 1700–2025 reconstruction of
 * ensemble_case.ts (119,069 days, 119 million values, 950 MB if held at once), drawn in chunks
 * of 25 members and streamed into per-day running sums (mean and SD), as a NetCDF writer or a
 * downstream reduction would consume them; nothing holds the whole ensemble. Reported: wall
 * time and peak resident memory, in this thread and on 2 Web Workers (the service's pool, the
 * path `ctx.parallel` takes), and the same numbers from numpy:
 *
 *   deno run -A test/bench/ensemble_medians.ts [repeats] [thread|workers|both|netcdf]
 *   /usr/bin/python3 test/bench/ensemble_numpy.py [repeats]
 *   sh test/bench/ensemble_interleaved.sh [rounds]   (the three alternated, one run each)
 */
import { buildSeriesDataset } from "../../api/netcdf/series_dataset.ts";
import { netcdf3Chunks } from "../../core/cf/netcdf3_write.ts";
import { decimalYear } from "../../core/time/mod.ts";
import {
  drawReconstructionMembers,
  reconstructFromProxies,
  type ReconstructionEnsembleChunk,
  reconstructionEnsemblePlan,
} from "../../core/irradiance/mod.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import { RECONSTRUCTION_ENSEMBLE_CHUNK } from "../../api/analyses/irradiance_reconstructions/tasks.ts";
import { DAYS, ensembleCase } from "./ensemble_case.ts";

const MEMBERS = 1000, CHUNK = 25;
const repeats = Number(Deno.args[0] ?? 3);
/** Which runs: "thread", "workers", both (default), or "netcdf" (draw into a NetCDF file). */
const only = Deno.args[1] ?? "both";
const { model, cells } = ensembleCase();
const plan = reconstructionEnsemblePlan(model, cells);

/** Streaming per-day sums of a chunk of members. */
function accumulate(sum: Float64Array, sq: Float64Array, chunk: Float64Array) {
  const n = sum.length;
  for (let m = 0; m < chunk.length / n; m++) {
    for (let i = 0; i < n; i++) {
      const v = chunk[m * n + i];
      sum[i] += v;
      sq[i] += v * v;
    }
  }
}

let peak = 0;
const sample = () => (peak = Math.max(peak, Deno.memoryUsage().rss));

async function run(pool: WorkerPool | null): Promise<{ ms: number; sd1750: number }> {
  const sum = new Float64Array(DAYS), sq = new Float64Array(DAYS);
  const t0 = performance.now();
  const chunks: ReconstructionEnsembleChunk[] = [];
  // a worker gets 50 members at a time: the plan (about 12 MB) is copied to it once per chunk
  const size = pool ? 2 * CHUNK : CHUNK;
  for (let a = 0; a < MEMBERS; a += size) chunks.push({ plan, seed: 1, first: a, count: size });
  if (pool) {
    // one chunk in flight per worker: bounded memory, both workers busy
    for (let c = 0; c < chunks.length; c += pool.size) {
      const outs = await pool.parallel<ReconstructionEnsembleChunk, Float64Array>(
        RECONSTRUCTION_ENSEMBLE_CHUNK,
        chunks.slice(c, c + pool.size),
      );
      for (const o of outs) accumulate(sum, sq, o);
      sample();
    }
  } else {
    for (const c of chunks) {
      accumulate(sum, sq, drawReconstructionMembers(c.plan, c.seed, c.first, c.count));
      sample();
    }
  }
  const ms = performance.now() - t0;
  const i = 18_262; // 1750-01-01
  const mean = sum[i] / MEMBERS;
  return { ms, sd1750: Math.sqrt((sq[i] - MEMBERS * mean * mean) / (MEMBERS - 1)) };
}

/**
 * Draw the ensemble and stream it into a NetCDF-CF file (api/netcdf: members as
 * realization × time float32, written one member at a time as it is drawn, 25 at a time).
 */
async function toNetcdf(): Promise<{ ms: number; mb: number }> {
  const path = await Deno.makeTempFile({ suffix: ".nc" });
  const t0 = performance.now();
  const { value } = reconstructFromProxies(model, cells, 1.96);
  let cached = -1, chunk: Float64Array = new Float64Array(0);
  const { dataset } = buildSeriesDataset(
    { name: "TSI", quantity: "tsi", units: "W m-2", time: caseTime, value, resolution: "daily" },
    { title: "bench", history: [], references: [], warnings: [], cautions: [] },
    {
      ensemble: {
        members: MEMBERS,
        member: (k) => {
          const c = Math.floor(k / CHUNK);
          if (c !== cached) {
            chunk = drawReconstructionMembers(plan, 1, c * CHUNK, CHUNK);
            cached = c;
            sample();
          }
          const m = k % CHUNK;
          return chunk.subarray(m * DAYS, (m + 1) * DAYS);
        },
      },
    },
  );
  const file = await Deno.open(path, { write: true, truncate: true });
  let bytes = 0;
  for (const b of netcdf3Chunks(dataset)) {
    await file.write(b);
    bytes += b.length;
  }
  file.close();
  const ms = performance.now() - t0;
  await Deno.remove(path);
  return { ms, mb: bytes / 1e6 };
}

/** Noon of each day from 1700-01-01, as decimal years (the case's daily cells). */
const caseTime = Float64Array.from({ length: DAYS }, (_, i) => {
  const d = new Date(Date.UTC(1700, 0, 1 + i));
  return decimalYear(d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate(), 0.5);
});

if (only === "netcdf") {
  const times: number[] = [];
  let mb = 0;
  peak = 0;
  for (let k = 0; k < repeats; k++) {
    const r = await toNetcdf();
    times.push(r.ms);
    mb = r.mb;
  }
  times.sort((a, b) => a - b);
  const med = times[times.length >> 1] / 1000;
  console.log(
    `draw + NetCDF file, 1 thread: median ${med.toFixed(2)} s for ${mb.toFixed(0)} MB (${
      (mb / med).toFixed(0)
    } MB/s including the draw), peak RSS ${(peak / 2 ** 20).toFixed(0)} MiB`,
  );
  Deno.exit(0);
}

const pool = new WorkerPool(2);
console.log(`deno ${Deno.version.deno}: ${MEMBERS} members × ${DAYS} days`);
const runs = [["1 thread", null], ["2 workers", pool]] as const;
for (const [label, p] of runs.filter(([l]) => only === "both" || l.includes(only.slice(0, 4)))) {
  const times: number[] = [];
  let sd = 0;
  peak = 0;
  for (let k = 0; k < repeats; k++) {
    const r = await run(p);
    times.push(r.ms);
    sd = r.sd1750;
  }
  times.sort((a, b) => a - b);
  console.log(
    `${label}: median ${(times[times.length >> 1] / 1000).toFixed(2)} s, min ${
      (times[0] / 1000).toFixed(2)
    } s, peak RSS ${
      (peak / 2 ** 20).toFixed(0)
    } MiB (the process, workers included), SD on 1750-01-01 ${sd.toFixed(4)} W m-2`,
  );
}
pool.terminate();
