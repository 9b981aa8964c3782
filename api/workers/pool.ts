/**
 * A pool of Deno Web Workers that runs run-kind computations and named tasks off the request
 * thread, so the HTTP server stays responsive during heavy Monte Carlo runs. A run executing
 * in one worker can map a task over chunks (`ctx.parallel`); the chunks go to whichever
 * workers are least loaded, including the one that asked (it is idle while it waits). Results
 * come back in input order, so the numbers never depend on the pool size.
 *
 * @module
 */
import type { RunInputs, RunKind, RunResult } from "../runs/kind.ts";
import { CancelledError, InputProblem } from "../runs/kind.ts";
import { InputError } from "../../core/errors.ts";
import type { ComputeExecutor, ComputeHooks } from "../runs/service.ts";
import { type SerialisedError, transferablesOf } from "./messages.ts";

interface Slot {
  worker: Worker;
  load: number;
  index: number;
  /** The worker failed; a fresh one is started when the slot is next used. */
  dead: boolean;
}

interface Job {
  slot: Slot;
  resolve(v: unknown): void;
  reject(e: unknown): void;
  onProgress?(f: number): void;
  onStart?(): void;
  isRun: boolean;
  /** Where this run's chunks go instead of this pool (see `ComputeHooks.scatter`). */
  scatter?: <I, O>(task: string, chunks: I[]) => Promise<O[]>;
}

function revive(e: SerialisedError): Error {
  if (e.name === "InputProblem") return new InputProblem(e.pointer ?? "", e.message, e.extra);
  if (e.name === "RangeError") return new RangeError(e.message);
  if (e.name === "InputError" && e.input) return new InputError(e.message, e.input);
  if (e.name === "CancelledError") return new CancelledError();
  return Object.assign(new Error(e.message), { name: e.name });
}

export class WorkerPool implements ComputeExecutor {
  private readonly slots: Slot[] = [];
  private readonly jobs = new Map<number, Job>();
  private nextJob = 1;
  private terminated = false;

  /**
   * `registry`: URL of the module whose `RUN_KINDS` the workers serve (default: the service's
   * registry); an app built with other analyses passes its own.
   */
  constructor(
    readonly size: number,
    readonly registry: string = new URL("../analyses/registry.ts", import.meta.url).href,
  ) {
    if (!Number.isInteger(size) || size < 1) {
      throw new RangeError(
        `Cannot create worker pool: size must be a positive integer, current value is ${size}`,
      );
    }
    for (let i = 0; i < size; i++) {
      const slot: Slot = { worker: this.spawn(i), load: 0, index: i, dead: false };
      this.attach(slot, i);
      this.slots.push(slot);
    }
  }

  /** Start one worker (overridable in tests). */
  protected spawn(_index: number): Worker {
    return new Worker(new URL("./worker.ts", import.meta.url).href, {
      type: "module",
      name: this.registry,
    });
  }

  /**
   * Wire a slot's worker. An uncaught error in a worker (a module that fails to load, a crash)
   * fails every job it held, so no run waits for ever, and the slot gets a fresh worker.
   */
  private attach(slot: Slot, index: number): void {
    slot.worker.onmessage = (e) => this.onMessage(slot, e.data);
    slot.worker.onerror = (e) => {
      e.preventDefault();
      console.error(JSON.stringify({ level: "error", worker: index, error: e.message }));
      for (const [id, job] of this.jobs) {
        if (job.slot !== slot) continue;
        this.jobs.delete(id);
        job.reject(new Error(`compute worker ${index} failed: ${e.message}`));
      }
      slot.load = 0;
      slot.dead = true;
      slot.worker.terminate();
    };
  }

  private pick(): Slot {
    let best = this.slots[0];
    for (const s of this.slots) if (s.load < best.load) best = s;
    if (best.dead && !this.terminated) {
      best.worker = this.spawn(best.index);
      best.dead = false;
      this.attach(best, best.index);
    }
    return best;
  }

  private onMessage(slot: Slot, m: Record<string, unknown>) {
    const job = this.jobs.get(m.job as number);
    if (!job) return;
    switch (m.type) {
      case "started":
        job.onStart?.();
        return;
      case "progress":
        job.onProgress?.(m.fraction as number);
        return;
      case "parallel": {
        // The asking worker is idle while it waits for its chunks.
        slot.load -= 1;
        const scatter = job.scatter ?? ((t: string, c: unknown[]) => this.parallel(t, c));
        scatter(m.task as string, m.chunks as unknown[]).then(
          (results) => {
            slot.load += 1;
            slot.worker.postMessage(
              { type: "parallel-result", req: m.req, results },
              transferablesOf(results),
            );
          },
          (err) => {
            slot.load += 1;
            slot.worker.postMessage({
              type: "parallel-result",
              req: m.req,
              error: {
                name: err?.name ?? "Error",
                message: err?.message ?? String(err),
                pointer: err?.pointer,
              },
            });
          },
        );
        return;
      }
      case "done":
        this.jobs.delete(m.job as number);
        slot.load -= 1;
        job.resolve(m.result);
        return;
      case "error":
        this.jobs.delete(m.job as number);
        slot.load -= 1;
        job.reject(revive(m.error as SerialisedError));
        return;
    }
  }

  compute(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    hooks: ComputeHooks,
  ): Promise<RunResult> {
    const id = this.nextJob++;
    const slot = this.pick();
    slot.load += 1;
    return new Promise<RunResult>((resolve, reject) => {
      const timer = setInterval(() => {
        if (hooks.isCancelled()) {
          slot.worker.postMessage({ type: "cancel", job: id });
          clearInterval(timer);
        }
      }, 100);
      this.jobs.set(id, {
        slot,
        isRun: true,
        resolve: (v) => {
          clearInterval(timer);
          resolve(v as RunResult);
        },
        reject: (e) => {
          clearInterval(timer);
          reject(e);
        },
        onProgress: hooks.progress,
        onStart: hooks.onStart,
        scatter: hooks.scatter,
      });
      // a field's values go to the worker without a copy (the caller does not reuse them)
      slot.worker.postMessage(
        { type: "run", job: id, kind: kind.kind, params, inputs },
        inputs.fields ? transferablesOf(inputs.fields) : [],
      );
    });
  }

  parallel<I, O>(task: string, inputs: I[], options: { transfer?: boolean } = {}): Promise<O[]> {
    return Promise.all(inputs.map((input) =>
      new Promise<O>((resolve, reject) => {
        const id = this.nextJob++;
        const slot = this.pick();
        slot.load += 1;
        this.jobs.set(id, { slot, isRun: false, resolve: resolve as (v: unknown) => void, reject });
        slot.worker.postMessage(
          { type: "task", job: id, task, input },
          options.transfer ? transferablesOf(input) : [],
        );
      })
    ));
  }

  /**
   * Warm every worker up (a small run of the hot analyses, api/workers/warm_up.ts) so that
   * the first user's run does not pay for compiling their code. Does not block: call it after
   * the pool is made; a run sent meanwhile waits for its worker's warm-up. Resolves with each
   * worker's timings (and errors, which never reject).
   */
  warmUp(): Promise<unknown[]> {
    return Promise.all(this.slots.map((slot) =>
      new Promise<unknown>((resolve) => {
        const id = this.nextJob++;
        slot.load += 1;
        this.jobs.set(id, { slot, isRun: false, resolve, reject: (e) => resolve({ error: e }) });
        slot.worker.postMessage({ type: "warm", job: id });
      })
    ));
  }

  /** Stop every worker; pending jobs are rejected. */
  terminate(): void {
    this.terminated = true;
    for (const s of this.slots) s.worker.terminate();
    for (const j of this.jobs.values()) j.reject(new Error("worker pool terminated"));
    this.jobs.clear();
  }
}
