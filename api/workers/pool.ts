/**
 * A pool of Deno Web Workers that runs run-kind computations and named tasks off the request
 * thread, so the HTTP server stays responsive during heavy Monte Carlo runs. A run executing
 * in one worker can map a task over chunks (`ctx.parallel`); the chunks go to idle workers,
 * including the one that asked (it is idle while it waits). Results come back in input order,
 * so the numbers never depend on the pool size.
 *
 * Stopping (a cancel or the run time limit):
 * - Work waits in the pool, not in the workers: a worker is given one job at a time (besides
 *   runs waiting there for their chunks), so a stopped run's chunks that have not started are
 *   dropped at once, and runs take turns chunk by chunk (a light run does not wait for a
 *   heavy one's chunks).
 * - Each run has a stop flag in a `SharedArrayBuffer` that every worker computing for it can
 *   read while it is busy (`ctx.cancelled()`, a task's `shouldStop`); the long loops of the
 *   analyses poll it and stop within milliseconds.
 * - A worker still busy with a stopped run's work after a grace period (default 1 s) is
 *   terminated and replaced. The other jobs it held (a run waiting there for its chunks) are
 *   sent again to a fresh worker: jobs are pure functions of their inputs, so the result is
 *   the same and no other run is lost. Deno 2.9 does not interrupt a worker thread that is
 *   busy in a loop when it is terminated (the thread runs on until the loop returns; measured
 *   here, and reported upstream for Web Workers): replacing it gives the pool its capacity
 *   back at once, but only the cooperative checks free the CPU, which is why every long loop
 *   of the analyses polls the flag.
 *
 * Memory: a worker that has finished a run with a very large result (a daily reconstruction
 * over centuries: tens of MB of JSON) holds a heap grown to build it, which V8 keeps; once it
 * has been idle for a few seconds it is replaced by a fresh, warmed-up worker, so the process
 * returns that memory instead of keeping one such heap per worker.
 *
 * @module
 */
import type { RunInputs, RunKind, RunResult } from "../runs/kind.ts";
import { CancelledError, InputProblem } from "../runs/kind.ts";
import { InputError } from "../../core/errors.ts";
import type { ComputeExecutor, ComputeHooks } from "../runs/service.ts";
import type { FinishedResult } from "../runs/finish.ts";
import type { InheritedNote } from "../runs/inherit.ts";
import { plainResult } from "../store/result_text.ts";
import { type SerialisedError, transferablesOf } from "./messages.ts";
import type { BlasSetting } from "./openblas_product.ts";

/** Default time a stopped run's work may keep a worker busy before the worker is replaced. */
export const STOP_GRACE_MS = 1000;

/** A worker that finished a run with a result at least this large (bytes) is recycled. */
export const RECYCLE_RESULT_BYTES = 16 * 1024 * 1024;

/**
 * How long such a worker must stay idle before it is recycled, ms. A fresh worker has not
 * optimised the code of the run that grew it: recycling after every 38 MB daily reconstruction
 * made back-to-back ones 1.20 × slower through HTTP (test/bench/http_runs_ab.ts, 6 interleaved
 * rounds, load 3.7–3.9), so a burst of large runs keeps its workers and the memory is returned
 * once the burst pauses.
 */
export const RECYCLE_IDLE_MS = 5000;
/** How often a running computation's hooks are asked whether it must stop. */
const STOP_POLL_MS = 50;

interface Slot {
  index: number;
  worker: Worker;
  /** Jobs posted to this worker and not finished. */
  jobs: Set<Job>;
  /** The worker failed; a fresh one is started when the slot is next given a job. */
  dead: boolean;
  /** The worker has loaded the analyses (before that, nothing posted to it has begun). */
  ready: boolean;
  /** When the slot's current worker was started (`performance.now()`). */
  startedAt?: number;
  /** Milliseconds from the start of the slot's current worker to its `ready` message. */
  readyMs?: number;
  /** Replace the worker by a fresh one once it is idle (it built a very large result). */
  recycle?: boolean;
  /** The pending recycling of an idle worker (cleared when it is given a job). */
  recycleTimer?: ReturnType<typeof setTimeout>;
}

/** One run's stop flag, shared with every worker computing for it. */
interface RunControl {
  flag: Int32Array;
  stopped: boolean;
}

interface Job {
  id: number;
  type: "run" | "task";
  message: Record<string, unknown>;
  /** Buffers transferred with the message (then it cannot be sent again). */
  transfer: ArrayBuffer[];
  transferred: boolean;
  control: RunControl | null;
  /** Where the job is posted (null while it waits in the pool). */
  slot: Slot | null;
  /** The run job whose `ctx.parallel` asked for this task, and its attempt then. */
  parent?: { job: Job; attempt: number };
  /** Run jobs: `ctx.parallel` requests waiting for their chunks (the worker is idle then). */
  pending: Set<number>;
  /** Run jobs: bumped when sent again, so answers meant for an earlier attempt are dropped. */
  attempt: number;
  started: boolean;
  progress: number;
  resolve(v: unknown): void;
  reject(e: unknown): void;
  onProgress?(f: number): void;
  onStart?(): void;
  /** Where this run's chunks go instead of this pool (see `ComputeHooks.scatter`). */
  scatter?: <I, O>(task: string, chunks: I[]) => Promise<O[]>;
}

/** What the pool is doing (tests, metrics). */
export interface PoolStats {
  workers: number;
  /** Workers that have loaded their analyses (with the service's registry: the warm-up's). */
  ready: number;
  /** Workers computing something (not only holding runs that wait for their chunks). */
  busy: number;
  /** Jobs posted to workers and not finished. */
  in_flight: number;
  /** Jobs waiting in the pool for a free worker. */
  queued: number;
  /** Workers terminated and replaced because a stopped run's work did not stop in time. */
  replaced: number;
}

function revive(e: SerialisedError): Error {
  if (e.name === "InputProblem") return new InputProblem(e.pointer ?? "", e.message, e.extra);
  if (e.name === "RangeError") return new RangeError(e.message);
  if (e.name === "InputError" && e.input) return new InputError(e.message, e.input);
  if (e.name === "CancelledError" || e.name === "StoppedError") return new CancelledError();
  return Object.assign(new Error(e.message), { name: e.name });
}

/**
 * The inputs with each gridded field's values in a `SharedArrayBuffer` (one copy here): the
 * worker reads them without a copy of its own, and a run sent again to a fresh worker (see
 * `replace`) still has them, which a transferred buffer would not.
 */
function withSharedFields(inputs: RunInputs): RunInputs {
  // a result read from the store is parsed on first use (api/store/result_text.ts): parse it
  // here, since the object standing for it cannot be cloned
  const runs: RunInputs["runs"] = {};
  for (const [id, r] of Object.entries(inputs.runs)) {
    runs[id] = { ...r, result: plainResult(r.result) };
  }
  inputs = { ...inputs, runs };
  if (!inputs.fields) return inputs;
  const fields: NonNullable<RunInputs["fields"]> = {};
  for (const [id, f] of Object.entries(inputs.fields)) {
    const shared = new Float32Array(new SharedArrayBuffer(f.values.byteLength));
    shared.set(f.values);
    fields[id] = { ...f, values: shared };
  }
  return { ...inputs, fields };
}

/** A fresh stop flag. */
function newControl(): RunControl {
  return { flag: new Int32Array(new SharedArrayBuffer(4)), stopped: false };
}

/** A job's load on its worker: 0 while it is a run waiting for its chunks. */
const active = (j: Job) => j.pending.size === 0;

export class WorkerPool implements ComputeExecutor {
  private readonly slots: Slot[] = [];
  private readonly jobs = new Map<number, Job>();
  /** Jobs waiting for a worker, in arrival order (see `next`). */
  private readonly queue: Job[] = [];
  /** When each run (or the runless tasks, under null) last got a worker. */
  private readonly served = new Map<RunControl | null, number>();
  private dispatches = 0;
  private readonly timers = new Set<ReturnType<typeof setTimeout>>();
  private nextJob = 1;
  private terminated = false;
  private replaced = 0;
  readonly graceMs: number;
  readonly recycleBytes: number;
  readonly recycleIdleMs: number;
  /** Whether the workers may use OpenBLAS for float32 products (api/workers/openblas_product.ts). */
  readonly blas: BlasSetting;
  /** Workers replaced by fresh ones after a very large result. */
  recycled = 0;

  /**
   * `registry`: URL of the module whose `RUN_KINDS` the workers serve (default: the service's
   * registry); an app built with other analyses passes its own. `options.graceMs`: how long a
   * stopped run's work may keep a worker busy before the worker is replaced.
   * `options.recycleBytes`: a worker that finished a run whose finished result is at least
   * this many bytes is replaced once idle for `options.recycleIdleMs` (defaults
   * {@link RECYCLE_RESULT_BYTES}, {@link RECYCLE_IDLE_MS}). `options.blas`: the product
   * engine setting each worker is given first (default `auto`).
   */
  constructor(
    readonly size: number,
    readonly registry: string = new URL("../analyses/registry.ts", import.meta.url).href,
    options: {
      graceMs?: number;
      recycleBytes?: number;
      recycleIdleMs?: number;
      blas?: BlasSetting;
    } = {},
  ) {
    if (!Number.isInteger(size) || size < 1) {
      throw new RangeError(
        `Cannot create worker pool: size must be a positive integer, current value is ${size}`,
      );
    }
    this.graceMs = options.graceMs ?? STOP_GRACE_MS;
    this.recycleBytes = options.recycleBytes ?? RECYCLE_RESULT_BYTES;
    this.recycleIdleMs = options.recycleIdleMs ?? RECYCLE_IDLE_MS;
    this.blas = options.blas ?? "auto";
    for (let i = 0; i < size; i++) {
      const slot: Slot = {
        index: i,
        worker: this.spawn(i),
        jobs: new Set(),
        dead: false,
        ready: false,
      };
      this.attach(slot);
      this.slots.push(slot);
    }
  }

  /** Start one worker (overridable in tests). */
  protected spawn(_index: number): Worker {
    const worker = new Worker(new URL("./worker.ts", import.meta.url).href, {
      type: "module",
      name: this.registry,
    });
    // the worker's settings come first, before any job
    worker.postMessage({ type: "configure", blas: this.blas });
    return worker;
  }

  /**
   * Wire a slot's worker. An uncaught error in a worker (a module that fails to load, a crash)
   * fails every job it held, so no run waits for ever, and the slot gets a fresh worker when
   * it is next used.
   */
  private attach(slot: Slot): void {
    const worker = slot.worker;
    slot.startedAt = performance.now();
    slot.readyMs = undefined;
    worker.onmessage = (e) => {
      if (slot.worker === worker) this.onMessage(slot, e.data);
    };
    worker.onerror = (e) => {
      e.preventDefault();
      if (slot.worker !== worker) return;
      console.error(JSON.stringify({ level: "error", worker: slot.index, error: e.message }));
      for (const job of [...slot.jobs]) {
        this.finish(
          job,
          () => job.reject(new Error(`compute worker ${slot.index} failed: ${e.message}`)),
        );
      }
      slot.dead = true;
      worker.terminate();
      this.pump();
    };
  }

  /** An idle worker: one without jobs first, then one holding only runs that wait. */
  private idleSlot(): Slot | null {
    let best: Slot | null = null;
    for (const s of this.slots) {
      if ([...s.jobs].some(active)) continue;
      if (s.jobs.size === 0) return s;
      best ??= s;
    }
    return best;
  }

  /**
   * The next job to give a worker: the first waiting job of the run served longest ago, so that
   * runs take turns chunk by chunk (a light run submitted behind a heavy one starts as soon as
   * one chunk ends, not after all the chunks queued before it).
   */
  private next(): Job | null {
    let best = -1, bestServed = Infinity;
    for (let i = 0; i < this.queue.length; i++) {
      const served = this.served.get(this.queue[i].control) ?? -1;
      if (served < bestServed) {
        best = i;
        bestServed = served;
      }
    }
    return best < 0 ? null : this.queue.splice(best, 1)[0];
  }

  /** Give waiting jobs to idle workers. */
  private pump(): void {
    while (!this.terminated && this.queue.length) {
      const slot = this.idleSlot();
      if (!slot) return;
      const job = this.next()!;
      this.served.set(job.control, ++this.dispatches);
      if (slot.dead) {
        slot.worker = this.spawn(slot.index);
        slot.dead = false;
        slot.ready = false;
        this.attach(slot);
      }
      job.slot = slot;
      slot.jobs.add(job);
      // a transferred buffer is gone from this side: such a job cannot be sent twice
      job.transferred = job.transfer.length > 0;
      // given work: not recycled now (again once idle)
      this.cancelRecycling(slot);
      slot.worker.postMessage(job.message, job.transfer);
    }
  }

  private enqueue(job: Job, front = false): void {
    this.jobs.set(job.id, job);
    if (front) this.queue.unshift(job);
    else this.queue.push(job);
  }

  /** Forget a job (posted or waiting) and settle it with `settle`. */
  private finish(job: Job, settle: () => void): void {
    if (!this.jobs.delete(job.id)) return;
    job.slot?.jobs.delete(job);
    job.slot = null;
    const i = this.queue.indexOf(job);
    if (i >= 0) this.queue.splice(i, 1);
    if (job.type === "run" && job.control) this.served.delete(job.control);
    settle();
  }

  private onMessage(slot: Slot, m: Record<string, unknown>) {
    if (m.type === "ready") {
      slot.ready = true;
      slot.readyMs = Math.round(performance.now() - (slot.startedAt ?? 0));
      return;
    }
    const job = this.jobs.get(m.job as number);
    if (!job || job.slot !== slot) return;
    switch (m.type) {
      case "started":
        if (!job.started) {
          job.started = true;
          job.onStart?.();
        }
        return;
      case "progress":
        // a run sent again starts from 0: report only progress beyond what was reported
        if ((m.fraction as number) > job.progress) {
          job.progress = m.fraction as number;
          job.onProgress?.(job.progress);
        }
        return;
      case "parallel":
        this.serveParallel(slot, job, m);
        return;
      case "done": {
        const bytes = (m.result as { bytes?: unknown } | undefined)?.bytes;
        if (
          job.type === "run" && bytes instanceof Uint8Array && bytes.length >= this.recycleBytes
        ) {
          slot.recycle = true;
        }
        this.finish(job, () => job.resolve(m.result));
        this.pump();
        this.recycleWhenIdle(slot);
        return;
      }
      case "error":
        this.finish(job, () => job.reject(revive(m.error as SerialisedError)));
        this.pump();
        this.recycleWhenIdle(slot);
        return;
    }
  }

  /** Map a run's chunks (the worker that asked is idle meanwhile) and answer its worker. */
  private serveParallel(slot: Slot, job: Job, m: Record<string, unknown>) {
    const req = m.req as number;
    const attempt = job.attempt;
    job.pending.add(req);
    const chunks = m.chunks as unknown[];
    const work = job.scatter
      ? job.scatter(m.task as string, chunks)
      : this.map(m.task as string, chunks, job.control, { job, attempt }, false);
    this.pump();
    const answer = (reply: Record<string, unknown>, transfer: ArrayBuffer[] = []) => {
      // sent again meanwhile, or finished: the answer is for a computation that is gone
      if (job.attempt !== attempt || !job.pending.delete(req) || job.slot !== slot) return;
      slot.worker.postMessage({ type: "parallel-result", req, ...reply }, transfer);
    };
    work.then(
      (results) => answer({ results }, transferablesOf(results)),
      (err) =>
        answer({
          error: {
            name: err?.name ?? "Error",
            message: err?.message ?? String(err),
            pointer: err?.pointer,
          },
        }),
    );
  }

  /** Map a task over inputs in the pool, as jobs of a run's control (or none). */
  private map<I, O>(
    task: string,
    inputs: I[],
    control: RunControl | null,
    parent: Job["parent"],
    transfer: boolean,
  ): Promise<O[]> {
    if (control?.stopped) return Promise.reject(new CancelledError());
    const kind = parent?.job.message.kind;
    const batch: Job[] = [];
    const all = Promise.all(inputs.map((input) =>
      new Promise<O>((resolve, reject) => {
        const id = this.nextJob++;
        const job: Job = {
          id,
          type: "task",
          // with the analysis whose chunk it is: a worker that has not loaded it loads only it
          message: { type: "task", job: id, task, input, stop: control?.flag, kind },
          transfer: transfer ? transferablesOf(input) : [],
          transferred: false,
          control,
          slot: null,
          parent,
          pending: new Set(),
          attempt: 0,
          started: false,
          progress: 0,
          resolve: resolve as (v: unknown) => void,
          reject,
        };
        batch.push(job);
        this.enqueue(job);
      })
    ));
    this.pump();
    // one chunk failed: its siblings that have not started are not needed any more
    all.catch(() => {
      for (const j of batch) {
        if (j.slot === null) {
          this.finish(j, () => j.reject(new CancelledError()));
        }
      }
    });
    return all;
  }

  compute(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    hooks: ComputeHooks,
  ): Promise<RunResult> {
    return this.run<RunResult>(kind, params, inputs, hooks, null);
  }

  /**
   * Compute, then finish the result in the worker (plain JSON, inherited notes, canonical
   * bytes and digest): only the bytes (transferred) and the auto-saved outputs come back.
   */
  computeFinished(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    hooks: ComputeHooks,
    notes: InheritedNote[],
  ): Promise<FinishedResult> {
    return this.run<FinishedResult>(kind, params, inputs, hooks, {
      notes,
      autoSave: kind.autoSave ?? [],
    });
  }

  private run<T>(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    hooks: ComputeHooks,
    finish: { notes: InheritedNote[]; autoSave: string[] } | null,
  ): Promise<T> {
    const id = this.nextJob++;
    const control = newControl();
    return new Promise<T>((resolve, reject) => {
      const done = this.watch(control, hooks.isCancelled);
      this.enqueue({
        id,
        type: "run",
        message: {
          type: "run",
          job: id,
          kind: kind.kind,
          params,
          inputs: withSharedFields(inputs),
          stop: control.flag,
          finish,
        },
        transfer: [],
        transferred: false,
        control,
        slot: null,
        pending: new Set(),
        attempt: 0,
        started: false,
        progress: 0,
        resolve: (v) => {
          done();
          resolve(v as T);
        },
        reject: (e) => {
          done();
          reject(e);
        },
        onProgress: hooks.progress,
        onStart: hooks.onStart,
        scatter: hooks.scatter,
      });
      this.pump();
    });
  }

  /**
   * Map a task over inputs in the pool. With `options.isCancelled` (chunks of a run computed
   * for another process), the chunks get a stop flag of their own, raised when it answers
   * true, and are stopped as a stopped run's work is.
   */
  parallel<I, O>(
    task: string,
    inputs: I[],
    options: { transfer?: boolean; isCancelled?: () => boolean } = {},
  ): Promise<O[]> {
    const transfer = options.transfer ?? false;
    if (!options.isCancelled) return this.map(task, inputs, null, undefined, transfer);
    const control = newControl();
    const done = this.watch(control, options.isCancelled);
    const out = this.map<I, O>(task, inputs, control, undefined, transfer);
    const end = () => {
      done();
      this.served.delete(control);
    };
    out.then(end, end);
    return out;
  }

  /** Ask `isCancelled` every {@link STOP_POLL_MS} and stop the control's work when it says so;
   * returns the function that ends the watch. */
  private watch(control: RunControl, isCancelled: () => boolean): () => void {
    const poll = setInterval(() => {
      if (isCancelled()) this.stop(control);
    }, STOP_POLL_MS);
    return () => clearInterval(poll);
  }

  /**
   * Stop a run's work: raise its flag, drop its jobs that have not started, and after the grace
   * period replace every worker still busy with its work.
   */
  private stop(control: RunControl): void {
    if (control.stopped) return;
    control.stopped = true;
    Atomics.store(control.flag, 0, 1);
    for (const job of [...this.queue]) {
      if (job.control === control) this.finish(job, () => job.reject(new CancelledError()));
    }
    const timer = setTimeout(() => {
      this.timers.delete(timer);
      for (const slot of this.slots) {
        const mine = [...slot.jobs].filter((j) => j.control === control);
        if (slot.ready && mine.some(active)) this.replace(slot);
        else {
          // a run still waiting for chunks that went elsewhere, or jobs of a worker still
          // loading (it will see the flag before it begins them): let go of them
          for (const j of mine) this.detach(j);
        }
      }
      this.pump();
    }, this.graceMs);
    this.timers.add(timer);
  }

  /** Give up on a waiting run job: cancelled, and its worker told its chunks failed. */
  private detach(job: Job): void {
    const slot = job.slot;
    const reqs = [...job.pending];
    this.finish(job, () => job.reject(new CancelledError()));
    for (const req of reqs) {
      slot?.worker.postMessage({
        type: "parallel-result",
        req,
        error: { name: "CancelledError", message: "run cancelled" },
      });
    }
  }

  /**
   * Terminate a slot's worker and start a fresh one. Jobs of stopped runs are cancelled; the
   * others are sent again, first in line (a run restarts from its beginning: same result).
   */
  private replace(slot: Slot): void {
    slot.worker.terminate();
    this.replaced++;
    console.error(JSON.stringify({
      level: "warn",
      event: "worker_replaced",
      worker: slot.index,
      reason: `stopped work still running after ${this.graceMs} ms`,
    }));
    slot.worker = this.spawn(slot.index);
    slot.dead = false;
    slot.ready = false;
    this.attach(slot);
    const held = [...slot.jobs];
    slot.jobs.clear();
    for (const job of held) {
      job.slot = null;
      if (job.control?.stopped) this.finish(job, () => job.reject(new CancelledError()));
      else this.requeue(job);
    }
  }

  /** Recycle a marked slot once it has been idle for `recycleIdleMs`. */
  private recycleWhenIdle(slot: Slot): void {
    if (!slot.recycle || slot.jobs.size > 0 || slot.recycleTimer || this.terminated) return;
    const timer = setTimeout(() => {
      this.timers.delete(timer);
      slot.recycleTimer = undefined;
      if (slot.recycle && slot.jobs.size === 0 && !this.terminated) this.recycle(slot);
    }, this.recycleIdleMs);
    slot.recycleTimer = timer;
    this.timers.add(timer);
  }

  private cancelRecycling(slot: Slot): void {
    if (!slot.recycleTimer) return;
    clearTimeout(slot.recycleTimer);
    this.timers.delete(slot.recycleTimer);
    slot.recycleTimer = undefined;
  }

  /** Replace an idle slot's worker by a fresh one, warmed up before it takes work. */
  private recycle(slot: Slot): void {
    slot.recycle = false;
    slot.worker.terminate();
    this.recycled++;
    slot.worker = this.spawn(slot.index);
    slot.dead = false;
    slot.ready = false;
    this.attach(slot);
    this.warmSlot(slot);
  }

  /** Send a job again (a run from its start; its chunks not yet started are dropped). */
  private requeue(job: Job): void {
    if (job.transferred) {
      this.finish(
        job,
        () => job.reject(new Error("compute worker replaced while holding a transferred chunk")),
      );
      return;
    }
    if (job.type === "run") {
      job.attempt++;
      job.pending.clear();
      for (const t of [...this.queue]) {
        if (t.parent?.job === job) this.finish(t, () => t.reject(new CancelledError()));
      }
    }
    this.jobs.delete(job.id);
    this.enqueue(job, true);
  }

  /** What the pool is doing now. */
  stats(): PoolStats {
    let busy = 0, inFlight = 0;
    for (const s of this.slots) {
      inFlight += s.jobs.size;
      if ([...s.jobs].some(active)) busy++;
    }
    return {
      workers: this.slots.length,
      ready: this.slots.filter((s) => s.ready && !s.dead).length,
      busy,
      in_flight: inFlight,
      queued: this.queue.length,
      replaced: this.replaced,
    };
  }

  /**
   * Warm every worker up (a small run of the hot analyses, api/workers/warm_up.ts) so that
   * the first user's run does not pay for compiling their code. Does not block: call it after
   * the pool is made; a run sent meanwhile waits for its worker's warm-up. Resolves with each
   * worker's timings (and errors, which never reject), and `ready_ms`: the milliseconds from
   * the worker's start to its `ready` message (loading its modules).
   */
  warmUp(): Promise<unknown[]> {
    return Promise.all(this.slots.filter((s) => !s.dead).map((slot) => this.warmSlot(slot)));
  }

  /** Warm one worker up; it is busy (takes no other job) until warm. */
  private warmSlot(slot: Slot): Promise<unknown> {
    return new Promise<unknown>((resolve) => {
      const id = this.nextJob++;
      const job: Job = {
        id,
        type: "task",
        message: { type: "warm", job: id },
        transfer: [],
        transferred: false,
        control: null,
        slot,
        pending: new Set(),
        attempt: 0,
        started: false,
        progress: 0,
        // with the time the worker took to load its modules (`ready_ms`)
        resolve: (r) => resolve({ ...(r as object), ready_ms: slot.readyMs ?? null }),
        reject: (e) => resolve({ error: e, ready_ms: slot.readyMs ?? null }),
      };
      // posted to this very worker (not through the queue): it is busy until warm
      this.jobs.set(id, job);
      slot.jobs.add(job);
      slot.worker.postMessage(job.message);
    });
  }

  /** Stop every worker; pending jobs are rejected. */
  terminate(): void {
    this.terminated = true;
    for (const t of this.timers) clearTimeout(t);
    this.timers.clear();
    for (const s of this.slots) s.worker.terminate();
    for (const j of [...this.jobs.values()]) {
      this.finish(j, () => j.reject(new Error("worker pool terminated")));
    }
  }
}
