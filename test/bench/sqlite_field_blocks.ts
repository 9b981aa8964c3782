/**
 * What writing a field's blocks costs SQLite by itself: 38 blobs of 4 MiB (a 150 MB upload), one
 * `BEGIN IMMEDIATE` transaction each, in WAL mode, as the store writes them, with three settings
 * in interleaved rounds: `synchronous = FULL` and the default automatic checkpoint, the automatic
 * checkpoint off and one checkpoint at the end, the automatic checkpoint off and a checkpoint
 * every 8 blocks (32 MiB; the store's setting for field blocks), and `synchronous = NORMAL`. Prints per setting the medians of the commits' milliseconds and of the total
 * (checkpoint included).
 *
 *   deno run -A test/bench/sqlite_field_blocks.ts [rounds]
 *
 * @module
 */
import { DatabaseSync } from "node:sqlite";
import { median } from "d3-array";

const ROUNDS = Number(Deno.args[0] ?? 4);
const BLOCKS = 38;
const blob = new Uint8Array(4 * 2 ** 20);
for (let i = 0; i < blob.length; i++) blob[i] = (i * 2654435761) >>> 24;

function once(setting: string): [number, number] {
  const dir = Deno.makeTempDirSync({ prefix: "sunlag-blocks-" });
  const db = new DatabaseSync(`${dir}/s.db`);
  db.exec("PRAGMA journal_mode = WAL");
  db.exec(`PRAGMA synchronous = ${setting === "normal" ? "NORMAL" : "FULL"}`);
  db.exec("PRAGMA journal_size_limit = 67108864");
  db.exec("CREATE TABLE b (k INTEGER PRIMARY KEY, data BLOB)");
  if (setting !== "full" && setting !== "normal") db.exec("PRAGMA wal_autocheckpoint = 0");
  const ins = db.prepare("INSERT INTO b (k, data) VALUES (?, ?)");
  const t0 = performance.now();
  for (let i = 0; i < BLOCKS; i++) {
    db.exec("BEGIN IMMEDIATE");
    ins.run(i, blob);
    db.exec("COMMIT");
    if (setting === "checkpoint every 8 blocks" && i % 8 === 7) {
      db.exec("PRAGMA wal_checkpoint(PASSIVE)");
    }
  }
  const t1 = performance.now();
  if (setting !== "full" && setting !== "normal") db.exec("PRAGMA wal_checkpoint(PASSIVE)");
  const t2 = performance.now();
  db.close();
  Deno.removeSync(dir, { recursive: true });
  return [t1 - t0, t2 - t0];
}

const settings = ["full", "one checkpoint", "checkpoint every 8 blocks", "normal"];
const rows = new Map(settings.map((s) => [s, [] as [number, number][]]));
const load0 = Deno.loadavg()[0];
for (let r = 0; r < ROUNDS; r++) for (const s of settings) rows.get(s)!.push(once(s));
console.log(JSON.stringify(
  {
    rounds: ROUNDS,
    loadAverage: [load0, Deno.loadavg()[0]],
    settings: Object.fromEntries([...rows].map(([s, xs]) => [s, {
      commitsMs: Math.round(median(xs.map((x) => x[0])) ?? NaN),
      totalMs: Math.round(median(xs.map((x) => x[1])) ?? NaN),
    }])),
  },
  null,
  2,
));
