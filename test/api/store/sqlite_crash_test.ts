import assert from "node:assert/strict";
import { DatabaseSync } from "node:sqlite";
import { join } from "node:path";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { makeRun, makeSeries } from "./store_suite.ts";
import { CHILD_SERIES_POINTS } from "./sqlite_child.ts";

const CHILD = new URL("./sqlite_child.ts", import.meta.url).pathname;

/** Start a crash child, SIGKILL it after `killAfter` acks, and return every complete ack. */
async function crashRound(path: string, tag: string, killAfter: number): Promise<string[]> {
  const child = new Deno.Command(Deno.execPath(), {
    args: ["run", "-A", CHILD, "crash", path, tag],
    stdout: "piped",
    stderr: "null",
  }).spawn();
  const acks: string[] = [];
  let buffered = "";
  let killed = false;
  for await (const chunk of child.stdout.pipeThrough(new TextDecoderStream())) {
    buffered += chunk;
    const lines = buffered.split("\n");
    buffered = lines.pop()!; // an unterminated tail is not an acknowledgement
    acks.push(...lines);
    if (!killed && acks.length >= killAfter) {
      child.kill("SIGKILL");
      killed = true;
    }
  }
  const status = await child.status;
  assert.equal(status.signal, "SIGKILL", `child ended by itself (code ${status.code})`);
  return acks;
}

Deno.test("SqliteStore survives SIGKILL mid-write with every acknowledged write present", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-crash-" });
  try {
    const path = join(dir, "crash.db");
    const all: string[] = [];
    // Kill points chosen to land in different phases of the three-transaction round.
    for (const [round, killAfter] of [7, 41, 12, 95, 30].entries()) {
      const acks = await crashRound(path, `c${round}`, killAfter);
      assert.ok(acks.length >= killAfter, `round ${round}: only ${acks.length} acks`);
      all.push(...acks);

      const store = await openSqliteStore({ path });
      try {
        assert.equal(store.integrityCheck(), "ok", `round ${round}: integrity_check failed`);
        for (const line of all) {
          const [what, label] = line.split(" ");
          if (what === "S") {
            const want = makeSeries(label, { n: CHILD_SERIES_POINTS, uncertainty: true });
            const got = await store.getSeries(want.id);
            assert.ok(got, `acknowledged series ${label} lost`);
            assert.deepEqual(got.value, want.value);
            assert.deepEqual(got.uncertainty, want.uncertainty);
          } else if (what === "R" || what === "U") {
            const got = await store.getRun(makeRun(label).id);
            assert.ok(got, `acknowledged run ${label} lost`);
            assert.deepEqual(got.input_series, [makeSeries(label).id]);
            if (what === "U") {
              assert.equal(got.status, "succeeded", `acknowledged update of ${label} lost`);
              assert.deepEqual(got.result, { round: Number(label.split("-")[1]) });
            }
          } else {
            assert.fail(`unexpected child output: ${line}`);
          }
        }
      } finally {
        await store.close();
      }
    }
    const db = new DatabaseSync(path);
    try {
      assert.deepEqual(db.prepare("PRAGMA foreign_key_check").all(), [], "orphaned rows");
    } finally {
      db.close();
    }
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
});
