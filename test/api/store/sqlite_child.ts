/**
 * Child process for the SQLite process tests. Prints one line per acknowledged write, written
 * synchronously, so the parent knows exactly which writes the store reported as committed.
 *
 *   deno run -A sqlite_child.ts writer <db> <tag> <count>   prints "ready", waits for a byte
 *       on stdin, prints "start <ms>", writes count rounds, then prints "done <count> <ms>"
 *   deno run -A sqlite_child.ts crash <db> <tag>            writes until killed
 *
 * Each round is three transactions: a series (2,000 points with uncertainty), a running run
 * using it, and the update that marks that run succeeded. Acks: "S <label>", "R <label>",
 * "U <label>".
 *
 * @module
 */
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { makeRun, makeSeries } from "./store_suite.ts";

/** Points per series written by the child. */
export const CHILD_SERIES_POINTS = 2000;

const enc = new TextEncoder();

function ack(line: string): void {
  const bytes = enc.encode(line + "\n");
  let off = 0;
  while (off < bytes.length) off += Deno.stdout.writeSync(bytes.subarray(off));
}

if (import.meta.main) {
  const [mode, path, tag, countArg] = Deno.args;
  const count = mode === "writer" ? Number(countArg) : Infinity;
  // A crash child whose parent vanished must not run forever.
  if (mode === "crash") setTimeout(() => Deno.exit(3), 60_000);
  const store = await openSqliteStore({ path });
  if (mode === "writer") {
    // Say the store is open, then wait for a start signal so both writers begin together.
    ack("ready");
    await Deno.stdin.read(new Uint8Array(1));
    ack(`start ${Date.now()}`);
  }
  for (let i = 0; i < count; i++) {
    const label = `${tag}-${i}`;
    const s = makeSeries(label, { n: CHILD_SERIES_POINTS, uncertainty: true });
    await store.putSeries(s);
    ack(`S ${label}`);
    const r = makeRun(label, { inputSeries: [s.id], status: "running" });
    await store.putRun(r);
    ack(`R ${label}`);
    await store.updateRun(r.id, { status: "succeeded", progress: 1, result: { round: i } });
    ack(`U ${label}`);
    // Let the exit timer run between rounds.
    if (mode === "crash" && i % 50 === 49) await new Promise((ok) => setTimeout(ok, 0));
  }
  await store.close();
  ack(`done ${count} ${Date.now()}`);
}
