/**
 * A large synchronous result is stored while its response is sent (api/runs/service.ts
 * `submit`, api/routes/kinds.ts `lastByteWhenStored`): the response's bytes are those of the
 * ordinary path, its last byte waits until the run is stored, and a run that could not be
 * stored ends its response short (no whole response for a run that is not there). The size
 * from which this applies is lowered here so that a cycles run on 40 years exercises it.
 *
 * @module
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, uploadSeries } from "./helpers.ts";
import { LARGE_RESULT_BYTES } from "../../api/store/result_text.ts";
import type { RunRecord } from "../../api/store/types.ts";
import type { HolderSpec } from "../../api/store/types.ts";

const cycleSeries = monthlySeries(
  "cycles for the streamed response",
  "sunspot_number",
  "1",
  1950,
  480,
  (i) => 80 + 70 * Math.sin((2 * Math.PI * i) / 132),
);

/** The lines `console.error` was given while `fn` ran. */
async function errorsLogged(fn: () => Promise<void>): Promise<string[]> {
  const logged: string[] = [];
  const error = console.error;
  console.error = (...a: unknown[]) => logged.push(a.join(" "));
  try {
    await fn();
  } finally {
    console.error = error;
  }
  return logged;
}

Deno.test("POST of a large synchronous result: the same bytes, the last one only once the run is stored", async (t) => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-stream-" });
  const svc = await makeTestApp({ store: `sqlite:${dir}/store.db` });
  const store = svc.store;
  const putRun = store.putRun.bind(store);
  try {
    const series = await uploadSeries(svc, cycleSeries);
    const ordinary = await svc.post("/v1/cycles", { series });
    assert.equal(ordinary.status, 201);
    const ordinaryText = await ordinary.text();
    assert.ok(ordinaryText.length < LARGE_RESULT_BYTES, "the default path for small ones");
    svc.runs.options.storeWhileSendingBytes = 1;

    await t.step("the bytes of the ordinary path, with its Content-Length", async () => {
      const res = await svc.post("/v1/cycles", { series });
      assert.equal(res.status, 201);
      const text = await res.text();
      assert.equal(
        res.headers.get("content-length"),
        String(new TextEncoder().encode(text).length),
      );
      const run = JSON.parse(text);
      const before = JSON.parse(ordinaryText);
      assert.equal(run.result_digest, before.result_digest);
      assert.deepEqual(run.result, before.result);
      assert.equal(res.headers.get("location"), `/v1/runs/${run.id}`);
      // stored as sent
      const got = await svc.get(`/v1/runs/${run.id}`);
      assert.equal(got.status, 200);
      assert.deepEqual((await got.json()).result, run.result);
    });

    await t.step("the last byte waits for the store", async () => {
      let release!: () => void;
      const gate = new Promise<void>((r) => (release = r));
      store.putRun = async (r: RunRecord, h?: HolderSpec) => {
        await gate;
        return putRun(r, h);
      };
      const res = await svc.post("/v1/cycles", { series });
      assert.equal(res.status, 201);
      const length = Number(res.headers.get("content-length"));
      const id = res.headers.get("location")!.split("/").pop()!;
      const reader = res.body!.getReader();
      let received = 0;
      let next = reader.read();
      // everything but the last byte arrives while the run is not yet stored
      while (received < length - 1) {
        const { value, done } = await next;
        assert.equal(done, false);
        received += value!.length;
        next = reader.read();
      }
      assert.equal(received, length - 1);
      const pending = await Promise.race([
        next.then(() => "read"),
        new Promise((r) => setTimeout(() => r("pending"), 100)),
      ]);
      assert.equal(pending, "pending");
      assert.equal((await svc.get(`/v1/runs/${id}`)).status, 404);
      release();
      const last = await next;
      assert.equal(last.value?.length, 1);
      assert.equal((await reader.read()).done, true);
      assert.equal((await svc.get(`/v1/runs/${id}`)).status, 200);
    });

    await t.step("a run that cannot be stored ends its response short, and is logged", async () => {
      store.putRun = () => Promise.reject(new Error("disk full (simulated)"));
      const logged = await errorsLogged(async () => {
        const res = await svc.post("/v1/cycles", { series });
        assert.equal(res.status, 201);
        const id = res.headers.get("location")!.split("/").pop()!;
        await assert.rejects(() => res.text());
        assert.equal((await svc.get(`/v1/runs/${id}`)).status, 404);
      });
      assert.ok(
        logged.some((l) => l.includes("run_store_failed") && l.includes("disk full")),
        logged.join("\n"),
      );
    });

    await t.step("a client that leaves early: a failure to store is still logged", async () => {
      let fail!: (e: Error) => void;
      const gate = new Promise<void>((_, reject) => (fail = reject));
      store.putRun = () => gate;
      const logged = await errorsLogged(async () => {
        const res = await svc.post("/v1/cycles", { series });
        assert.equal(res.status, 201);
        await res.body!.cancel();
        fail(new Error("disk full after the client left (simulated)"));
        await new Promise((r) => setTimeout(r, 20));
      });
      assert.ok(
        logged.some((l) => l.includes("run_store_failed") && l.includes("after the client left")),
        logged.join("\n"),
      );
    });
  } finally {
    store.putRun = putRun;
    await svc.close();
    await Deno.remove(dir, { recursive: true });
  }
});
