/**
 * A compute worker: runs whole run-kind computations and named tasks off the request thread.
 * Messages (structured clone; typed-array buffers in task results are transferred):
 *
 * - in  `{ type: "run", job, kind, params, inputs, stop, finish }` → out `started`, `progress`,
 *   `parallel` (a request to map a task over chunks on the pool), then `done` or `error`;
 *   with `finish` (`{ notes, autoSave }`), `done` carries the finished result
 *   (api/runs/finish.ts: canonical bytes, transferred, digest and auto-saved outputs)
 * - in  `{ type: "task", job, task, input, stop? }` → out `done` or `error`
 * - in  `{ type: "configure", blas }` (the pool's first message) → no answer: the product engine
 *   setting of the field-significance chunks (api/workers/openblas_product.ts)
 * - in  `{ type: "warm", job }` → out `done` with the warm-up's timings (api/workers/warm_up.ts)
 *   and the product engine this worker uses
 * - in  `{ type: "parallel-result", req, results | error }`
 * - out `{ type: "ready" }` once the analyses are loaded
 *
 * `stop` is an `Int32Array` over a `SharedArrayBuffer` of the run: the pool sets its first
 * element when the run is cancelled or out of time. A message cannot reach a worker that is
 * busy in a loop, but this flag can: `ctx.cancelled()` and a task's `shouldStop` read it, so
 * the loops that poll them stop within milliseconds.
 *
 * @module
 */
/// <reference lib="deno.worker" />
import { CancelledError, type RunKind, type Task } from "../runs/kind.ts";
import { makeContext } from "../runs/service.ts";
import { taskTable } from "../analyses/derive.ts";
import { serialiseError, transferablesOf } from "./messages.ts";
import { warmUp } from "./warm_up.ts";
import { finishResult } from "../runs/finish.ts";
import { productEngine, setProductEngineSetting } from "./openblas_product.ts";

/**
 * The analyses come from the registry module the pool names in the worker's `name` (a module
 * URL exporting `RUN_KINDS`), so a pool serves the same analyses as the app that made it.
 */
const registry: Promise<{ kinds: readonly RunKind[]; tasks: Record<string, Task> }> = import(
  self.name
).then((m: { RUN_KINDS: readonly RunKind[] }) => ({
  kinds: m.RUN_KINDS,
  tasks: taskTable(m.RUN_KINDS),
}));

// the pool knows from here on that this worker computes what it is given
registry.then(() => self.postMessage({ type: "ready" }));

const waiting = new Map<number, { resolve(v: unknown[]): void; reject(e: unknown): void }>();
let nextReq = 1;

/** The stop test of a shared flag (never, without one). */
function stopTest(stop: Int32Array | undefined): () => boolean {
  return stop ? () => Atomics.load(stop, 0) !== 0 : () => false;
}

self.onmessage = async (e: MessageEvent) => {
  const m = e.data;
  if (m.type === "configure") {
    setProductEngineSetting(m.blas === "off" ? "off" : "auto");
    return;
  }
  if (m.type === "parallel-result") {
    const w = waiting.get(m.req);
    waiting.delete(m.req);
    if (m.error) w?.reject(Object.assign(new Error(m.error.message), m.error));
    else w?.resolve(m.results);
    return;
  }
  const { kinds, tasks } = await registry;
  if (m.type === "warm") {
    const timings = await warmUp(kinds, tasks);
    // the engine is loaded now rather than in the first run (it is not part of any result)
    const result = { ...timings, product_engine: productEngine().name };
    self.postMessage({ type: "done", job: m.job, result });
    return;
  }
  if (m.type === "task") {
    try {
      const fn = tasks[m.task];
      if (!fn) throw new Error(`unknown worker task "${m.task}"`);
      const shouldStop = stopTest(m.stop);
      // stopped while this worker was starting or busy: do not begin
      if (shouldStop()) throw new CancelledError();
      const result = fn(m.input, { shouldStop });
      self.postMessage({ type: "done", job: m.job, result }, transferablesOf(result));
    } catch (err) {
      self.postMessage({ type: "error", job: m.job, error: serialiseError(err) });
    }
    return;
  }
  if (m.type === "run") {
    const job = m.job as number;
    self.postMessage({ type: "started", job });
    try {
      const kind = kinds.find((k) => k.kind === m.kind);
      if (!kind) throw new Error(`unknown run kind "${m.kind}"`);
      if (stopTest(m.stop)()) throw new CancelledError();
      let last = 0;
      const ctx = makeContext(m.inputs, {
        progress: (f) => {
          const t = performance.now();
          if (t - last > 50 || f >= 1) {
            last = t;
            self.postMessage({ type: "progress", job, fraction: f });
          }
        },
        isCancelled: stopTest(m.stop),
      }, (task, chunks) =>
        new Promise((resolve, reject) => {
          const req = nextReq++;
          waiting.set(req, { resolve: resolve as (v: unknown[]) => void, reject });
          self.postMessage({ type: "parallel", job, req, task, chunks });
        }));
      const result = await kind.compute(m.params, ctx);
      if (m.finish) {
        // finished here: only the canonical bytes cross (transferred), never the object graph
        const finished = finishResult(result, m.finish.notes, m.finish.autoSave);
        self.postMessage({ type: "done", job, result: finished }, [finished.bytes.buffer]);
      } else {
        self.postMessage({ type: "done", job, result });
      }
    } catch (err) {
      self.postMessage({ type: "error", job, error: serialiseError(err) });
    }
  }
};
