/**
 * Medians (deno bench prints means) for the store: put/get of one 150,000-point series with
 * uncertainty, SQLite file (WAL, synchronous FULL) and memory, and PostgreSQL on an ephemeral
 * local cluster (fsync off, so a lower bound) when the server binaries exist, beside two references of the
 * same data: encoding the three arrays as JSON text and decoding it (the cost a row-of-JSON
 * design would add to every get), and the bytes each takes.
 *
 *   deno run -A test/bench/store_medians.ts
 */
import { median as d3Median } from "d3-array";
import { join } from "node:path";
import postgres from "postgres";
import { openSqliteStore } from "../../api/store/sqlite.ts";
import { openPostgresStore } from "../../api/store/postgres.ts";
import type { Store } from "../../api/store/types.ts";
import { startPgServer } from "../api/store/pg_cluster.ts";
import { makeSeries, seriesId } from "../api/store/store_suite.ts";

const median = (xs: number[]): number => d3Median(xs) ?? NaN;

const N = 150_000;
const ROUNDS = 41;

async function time(rounds: number, fn: (i: number) => Promise<unknown> | unknown) {
  const out: number[] = [];
  for (let i = 0; i < rounds + 3; i++) {
    const t0 = performance.now();
    await fn(i);
    if (i >= 3) out.push(performance.now() - t0);
  }
  return median(out);
}

const dir = await Deno.makeTempDir({ prefix: "sunlag-bench-" });
try {
  const template = makeSeries("bench", { n: N, uncertainty: true });
  const rows: [string, number][] = [];
  const pg = await startPgServer();
  const openers: [string, () => Promise<Store>][] = [
    ["sqlite file", () => openSqliteStore({ path: join(dir, "b.db") })],
    ["sqlite memory", () => openSqliteStore({ path: ":memory:" })],
  ];
  if (pg) {
    const admin = postgres(pg.adminUrl, { max: 1, onnotice: () => {} });
    await admin.unsafe("CREATE DATABASE sunlag_bench");
    await admin.end();
    openers.push(["postgres, local", () => openPostgresStore({ url: pg.urlFor("sunlag_bench") })]);
  }
  for (const [where, open] of openers) {
    const store = await open();
    await store.putSeries(template);
    const ids: string[] = [];
    rows.push([
      `putSeries (${where})`,
      await time(ROUNDS, (i) => {
        const id = seriesId(`${where}-${i}`);
        ids.push(id);
        return store.putSeries({ ...template, id });
      }),
    ]);
    for (const id of ids) await store.deleteSeries(id);
    rows.push([`getSeries (${where})`, await time(ROUNDS, () => store.getSeries(template.id))]);
    await store.close();
  }
  const arrays = {
    time: [...template.time],
    value: [...template.value],
    uncertainty: [...template.uncertainty!],
  };
  const json = JSON.stringify(arrays);
  rows.push(["JSON.stringify of the arrays", await time(ROUNDS, () => JSON.stringify(arrays))]);
  rows.push(["JSON.parse of the arrays", await time(ROUNDS, () => JSON.parse(json))]);

  console.log(`store, one series of ${N} points with uncertainty, median of ${ROUNDS} rounds`);
  for (const [name, ms] of rows) console.log(`${name.padEnd(32)} ${ms.toFixed(2).padStart(8)} ms`);
  console.log(
    `blob bytes ${(3 * N * 8).toLocaleString("en")}, JSON bytes ${
      new TextEncoder().encode(json).length.toLocaleString("en")
    }`,
  );
  const [putFile, getFile, putMem, getMem] = rows.map((r) => r[1]);
  console.log(
    `file/memory ratio: put ${(putFile / putMem).toFixed(1)}x, get ${
      (getFile / getMem).toFixed(1)
    }x`,
  );
} finally {
  await Deno.remove(dir, { recursive: true });
}
