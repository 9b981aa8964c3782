/**
 * A compute worker: runs whole run-kind computations and named tasks off the request thread.
 * Messages (structured clone; typed-array buffers in task results are transferred):
 *
 * - in  `{ type: "run", job, kind, params, inputs, stop, finish }` → out `started`, `progress`,
 *   `parallel` (a request to map a task over chunks on the pool), then `done` or `error`;
 *   with `finish` (`{ notes, autoSave }`), `done` carries the finished result
 *   (api/runs/finish.ts: canonical bytes, transferred, digest and auto-saved outputs)
 * - in  `{ type: "task", job, task, input, stop?, kind? }` → out `done` or `error` (`kind`: the
 *   analysis whose chunk this is, loaded first if it is not yet)
 * - in  `{ type: "configure", blas }` (the pool's first message) → no answer: the product engine
 *   setting of the field-significance chunks (api/workers/openblas_product.ts)
 * - in  `{ type: "warm", job }` → out `done` with the warm-up's timings (api/workers/warm_up.ts),
 *   the milliseconds it waited for the warm-up's analyses to load (`load_ms`) and the product
 *   engine this worker uses
 * - in  `{ type: "parallel-result", req, results | error }`
 * - out `{ type: "ready" }` once the analyses are loaded: with the service's registry, those of
 *   the warm-up (each other analysis loads on first use)
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
import { makeContext } from "../runs/context.ts";
import { taskTable } from "../analyses/derive.ts";
import { serialiseError, transferablesOf } from "./messages.ts";
import { WARM_UP_KINDS, warmUp } from "./warm_up.ts";
import { finishResult } from "../runs/finish.ts";
import { productEngine, setProductEngineSetting } from "./openblas_product.ts";

/**
 * The analyses come from the registry module the pool names in the worker's `name` (a module
 * URL exporting `RUN_KINDS`), so a pool serves the same analyses as the app that made it.
 *
 * With the service's own registry (api/analyses/registry.ts) an analysis is loaded on its first
 * use, from its own folder (`api/analyses/<kind, with "_" for "-">/mod.ts`, a module exporting
 * that RunKind), so a worker is ready once the warm-up's two are loaded. A task of no loaded
 * analysis loads the analysis named in its message, then, failing that, the whole registry.
 * Any other registry is loaded whole.
 */
const lazy = self.name === new URL("../analyses/registry.ts", import.meta.url).href;
/**
 * The request and result schemas' package, loaded first and on its own: Deno then loads the
 * analyses' modules (some 70 of which import it) much faster. Measured in a fresh worker (load
 * 0.6, 4 runs): the whole registry 0.76–0.81 s in one import, 0.46–0.48 s after this one. It
 * depends on none of our modules, so loading it earlier changes no result.
 */
const schemasPackage: Promise<unknown> = import("@hono/zod-openapi");
const loaded: RunKind[] = [];
/** The worker tasks of the analyses loaded so far (see taskTable). */
let tasks: Record<string, Task> = {};
let whole: Promise<readonly RunKind[]> | null = null;
const single = new Map<string, Promise<RunKind | undefined>>();

function add(kinds: readonly RunKind[]): void {
  const fresh = kinds.filter((k) => !loaded.includes(k));
  if (fresh.length === 0) return;
  loaded.push(...fresh);
  tasks = taskTable(loaded);
}

/** Every analysis of the registry. */
function wholeRegistry(): Promise<readonly RunKind[]> {
  whole ??= schemasPackage.then(() => import(self.name)).then(
    (m: { RUN_KINDS: readonly RunKind[] }) => {
      add(m.RUN_KINDS);
      return m.RUN_KINDS;
    },
  );
  return whole;
}

function isKind(v: unknown, name: string): v is RunKind {
  const k = v as RunKind | null;
  return typeof k === "object" && k !== null && k.kind === name && typeof k.compute === "function";
}

/** The analysis of a kind name (undefined when the registry has none). */
function kindNamed(name: string): Promise<RunKind | undefined> {
  if (!lazy || !/^[a-z][a-z0-9]*(-[a-z0-9]+)*$/.test(name)) {
    return wholeRegistry().then((ks) => ks.find((k) => k.kind === name));
  }
  let found = single.get(name);
  if (!found) {
    const url = new URL(`../analyses/${name.replaceAll("-", "_")}/mod.ts`, import.meta.url).href;
    found = schemasPackage.then(() => import(url)).then(
      (m: Record<string, unknown>) => Object.values(m).find((v) => isKind(v, name)),
      () => undefined,
    ).then(async (k) => {
      if (k) add([k]);
      return k ?? (await wholeRegistry()).find((x) => x.kind === name);
    });
    single.set(name, found);
  }
  return found;
}

/** Load analyses one after another (each import after the last: loads less at once). */
async function loadInTurn(names: readonly string[]): Promise<void> {
  for (const name of names) await kindNamed(name);
}

/** A worker task, loading `kind` (the analysis whose chunk it is), or else every analysis. */
async function taskNamed(name: string, kind: unknown): Promise<Task | undefined> {
  if (!tasks[name] && typeof kind === "string") await kindNamed(kind);
  if (!tasks[name]) await wholeRegistry();
  return tasks[name];
}

// the pool knows from here on that this worker computes what it is given (with the service's
// registry: once the warm-up's analyses are loaded, the others load on first use)
(lazy ? loadInTurn(WARM_UP_KINDS) : wholeRegistry()).then(() =>
  self.postMessage({ type: "ready" })
);

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
  if (m.type === "warm") {
    const t0 = performance.now();
    const kinds = await Promise.all(WARM_UP_KINDS.map(kindNamed));
    const loadMs = Math.round(performance.now() - t0);
    const timings = await warmUp(kinds.filter((k) => k !== undefined), tasks);
    // the engine is loaded now rather than in the first run (it is not part of any result)
    const result = { ...timings, load_ms: loadMs, product_engine: productEngine().name };
    self.postMessage({ type: "done", job: m.job, result });
    return;
  }
  if (m.type === "task") {
    try {
      const fn = await taskNamed(m.task, m.kind);
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
      const kind = await kindNamed(m.kind);
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
        // finished here: only the canonical bytes cross (transferred, or shared when large),
        // never the object graph
        const finished = finishResult(result, m.finish.notes, m.finish.autoSave);
        const buffer = finished.bytes.buffer;
        self.postMessage(
          { type: "done", job, result: finished },
          buffer instanceof ArrayBuffer ? [buffer] : [],
        );
      } else {
        self.postMessage({ type: "done", job, result });
      }
    } catch (err) {
      self.postMessage({ type: "error", job, error: serialiseError(err) });
    }
  }
};
