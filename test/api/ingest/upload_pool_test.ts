import assert from "node:assert/strict";
import { UploadPool } from "../../../api/ingest/upload.ts";

function request(body: ReadableStream<Uint8Array>): Request {
  return new Request("http://localhost/", { method: "POST", body });
}

Deno.test("UploadPool.readBody() reads one body at a time, and a slow sender gives its turn away", async () => {
  const pool = new UploadPool(1, 50);
  let release!: () => void;
  const stalled = new ReadableStream<Uint8Array>({
    async pull(ctl) {
      await new Promise<void>((ok) => release = ok);
      ctl.enqueue(new Uint8Array([1]));
      ctl.close();
    },
  });
  const slow = pool.readBody(request(stalled));
  const order: string[] = [];
  const fast = pool.readBody(request(new Blob([new Uint8Array([2, 3])]).stream()))
    .then((b) => (order.push("fast"), b));
  // The fast body waited for the turn, then got it once the slow one gave it away (50 ms);
  // without that it would wait for ever (the guard fails the test instead of hanging).
  let guard: ReturnType<typeof setTimeout> | undefined;
  const stuck = new Promise<never>((_, no) =>
    guard = setTimeout(() => no(new Error("the slow body kept its turn")), 10_000)
  );
  assert.deepEqual([...await Promise.race([fast, stuck])], [2, 3]);
  clearTimeout(guard);
  release();
  assert.deepEqual([...await slow], [1]);
  assert.deepEqual(order, ["fast"]);
  pool.terminate();
});
