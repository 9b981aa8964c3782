/**
 * The run machinery: turns a validated request for a run kind into a recorded run.
 *
 * Synchronous runs are computed first and stored only when they succeed, so a rejected
 * request (422) leaves the store unchanged. Asynchronous runs (asked for with
 * `Prefer: respond-async`, or estimated to take longer than the configured threshold) are
 * stored as `queued` with their inputs, then computed in the background; progress and the
 * final status are published to subscribers (Server-Sent Events).
 *
 * @module
 */
import { uuidv7 } from "uuidv7";
import type { RunRecord, Store, StoredSeries } from "../store/types.ts";
import { CancelledError, InputProblem, type RunContext, type RunKind, type Task } from "./kind.ts";
import { StoppedError } from "../../core/stop_signal.ts";
import { estimateRunSeconds } from "./estimate.ts";
import { loadedInputs } from "./loaded_inputs.ts";
import type { OutputSeries, RunResult } from "./kind.ts";
import { SERIES_ID_PATTERN } from "../schemas/series_ref.ts";
import type { InlineSeries } from "../schemas/series_ref.ts";
import { ProblemError, toPointer } from "../problems.ts";
import { canonicalJson, sha256Hex } from "../canonical.ts";
import { toPlainJson } from "./json.ts";
import { SERVICE_VERSION } from "../version.ts";
import { taskTable } from "../analyses/derive.ts";
import { RUN_KINDS } from "../analyses/registry.ts";
import { LocalEventBus, type RunEvent, type RunEventBus } from "../queue/events.ts";
import { InProcessQueue } from "../queue/in_process.ts";
import type { RunQueue } from "../queue/types.ts";
import type { ChunkRouter } from "../queue/chunks.ts";
import { TERMINAL } from "../store/types.ts";

/** How inline and output series become stored series (implemented over api/ingest). */
export interface SeriesCodec {
  /** Normalise an inline series; throws ProblemError (422) with pointers under `pointer`. */
  fromInline(obj: InlineSeries, pointer: string): Promise<StoredSeries>;
  /** A stored series made from a run's output, with lineage. */
  fromOutput(o: OutputSeries, runId: string): Promise<StoredSeries>;
}

/** What a computation reports to, and where its chunks go. */
export interface ComputeHooks {
  progress(f: number): void;
  isCancelled(): boolean;
  onStart(): void;
  /**
   * Where `ctx.parallel` sends its chunks (default: this executor's own workers). Set to
   * spread one run's chunks over the worker processes of several machines.
   */
  scatter?: <I, O>(task: string, chunks: I[]) => Promise<O[]>;
}

/** Executes a run kind's compute somewhere (a worker pool, or this thread). */
export interface ComputeExecutor {
  compute(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
    hooks: ComputeHooks,
  ): Promise<RunResult>;
  /** Map a named task over inputs (used by in-thread compute too). */
  parallel<I, O>(task: string, inputs: I[]): Promise<O[]>;
}

export type { RunEvent } from "../queue/events.ts";

/** Longest stretch of chunks an in-thread run computes before it lets other work in, ms. */
const IN_THREAD_SLICE_MS = 20;

/**
 * Runs compute in this thread (tests, `SUNLAG_WORKERS=0`). Chunks are computed one by one: a
 * run asked to stop is stopped before its next chunk (a cancel can only arrive between chunks,
 * since nothing else runs in this thread meanwhile; the time limit is seen inside a chunk too),
 * and the thread is handed back to other requests every {@link IN_THREAD_SLICE_MS} ms.
 */
export class InThreadExecutor implements ComputeExecutor {
  private readonly tasks: Record<string, Task>;
  /** `kinds`: the analyses whose worker tasks this executor can run (default: the registry). */
  constructor(kinds: readonly RunKind[] = RUN_KINDS) {
    this.tasks = taskTable(kinds);
  }
  async compute(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
    hooks: ComputeHooks,
  ): Promise<RunResult> {
    hooks.onStart();
    const ctx = makeContext(
      inputs,
      hooks,
      hooks.scatter ?? ((task, chunks) => this.#map(task, chunks, () => hooks.isCancelled())),
    );
    return await kind.compute(params, ctx);
  }
  parallel<I, O>(task: string, inputs: I[]): Promise<O[]> {
    return this.#map(task, inputs, () => false);
  }
  async #map<I, O>(task: string, inputs: I[], shouldStop: () => boolean): Promise<O[]> {
    const fn = this.tasks[task];
    if (!fn) throw new Error(`unknown worker task "${task}"`);
    const out: O[] = [];
    let slice = performance.now();
    for (const input of inputs) {
      if (shouldStop()) throw new CancelledError();
      out.push(fn(input, { shouldStop }) as O);
      if (performance.now() - slice > IN_THREAD_SLICE_MS) {
        await new Promise((r) => setTimeout(r, 0));
        slice = performance.now();
      }
    }
    return out;
  }
}

/** Build the RunContext seen by compute. */
export function makeContext(
  inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
  hooks: { progress(f: number): void; isCancelled(): boolean },
  parallel: <I, O>(task: string, chunks: I[]) => Promise<O[]>,
): RunContext {
  let reported = 0;
  return {
    ...loadedInputs(inputs),
    resultOf(kind, id, pointer) {
      const r = inputs.runs[id];
      if (!r) throw new InputProblem(pointer, `run ${id} was not loaded`);
      if (r.kind !== kind.kind) {
        throw new InputProblem(
          pointer,
          `run ${id} is a ${r.kind} run; a ${kind.kind} run is needed`,
          {
            kind: r.kind,
          },
        );
      }
      if (r.status !== "succeeded" || r.result === null) {
        throw new InputProblem(pointer, `run ${id} has no result (status ${r.status})`, {
          status: r.status,
        });
      }
      const parsed = kind.result.safeParse(r.result);
      if (!parsed.success) {
        throw new InputProblem(
          pointer,
          `run ${id} holds a ${kind.kind} result of an older shape; replay it or make a new one`,
          { algorithm_version: r.algorithm_version },
        );
      }
      return parsed.data;
    },
    // Progress never goes back (a kind may report 0.05 + 0.9·k/n, then 0.95, and float
    // rounding makes the second smaller than the first).
    progress: (f) => hooks.progress(reported = Math.max(reported, Math.min(1, Math.max(0, f)))),
    cancelled: () => hooks.isCancelled(),
    parallel: (task, chunks) => parallel(task, chunks),
  };
}

function isInlineSeries(v: unknown): v is InlineSeries {
  if (v === null || typeof v !== "object" || Array.isArray(v)) return false;
  const o = v as Record<string, unknown>;
  return Array.isArray(o.time) && Array.isArray(o.value) && typeof o.quantity === "string" &&
    typeof o.name === "string";
}

/** Replace inline series by stored ids (collecting them), deep. */
async function extractInline(
  value: unknown,
  path: (string | number)[],
  codec: SeriesCodec,
  found: Map<string, StoredSeries>,
): Promise<unknown> {
  if (isInlineSeries(value)) {
    const s = await codec.fromInline(value, toPointer(path));
    found.set(s.id, s);
    return s.id;
  }
  if (Array.isArray(value)) {
    const out = [];
    for (let i = 0; i < value.length; i++) {
      out.push(await extractInline(value[i], [...path, i], codec, found));
    }
    return out;
  }
  if (value !== null && typeof value === "object") {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value)) {
      out[k] = await extractInline(v, [...path, k], codec, found);
    }
    return out;
  }
  return value;
}

/** Every series id in params, with the pointer of its first occurrence. */
export function collectSeriesIds(
  value: unknown,
  path: (string | number)[] = [],
  out = new Map<string, string>(),
): Map<string, string> {
  if (typeof value === "string" && SERIES_ID_PATTERN.test(value)) {
    if (!out.has(value)) out.set(value, toPointer(path));
  } else if (Array.isArray(value)) {
    value.forEach((v, i) => collectSeriesIds(v, [...path, i], out));
  } else if (value !== null && typeof value === "object") {
    for (const [k, v] of Object.entries(value)) collectSeriesIds(v, [...path, k], out);
  }
  return out;
}

/** The digest of a result: hex SHA-256 of its RFC 8785 canonical JSON. */
export async function resultDigest(result: unknown): Promise<string> {
  return await sha256Hex(canonicalJson(result));
}

/**
 * A run this process computes: its stop flag (set by a cancel, a lost lease or the time
 * limit), and whether the time limit set it.
 */
interface Active {
  cancelled: boolean;
  timedOut: boolean;
  started: number;
}

/** Default wall-time limit of one run, seconds (`SUNLAG_RUN_WALL_SECONDS`). */
export const DEFAULT_RUN_WALL_SECONDS = 3600;

/** The problem of a run stopped by the wall-time limit. */
export function timeLimitProblem(seconds: number): ProblemError {
  return new ProblemError(
    "time-limit",
    `The run was still computing after the wall-time limit of ${seconds} s ` +
      "(SUNLAG_RUN_WALL_SECONDS) and was stopped; ask for less work (fewer surrogates, a " +
      "shorter period or a coarser grid)",
    { limit_seconds: seconds },
  );
}

/** True for the errors of a computation that stopped on request (api or core). */
function isStopped(e: unknown): boolean {
  return e instanceof CancelledError || e instanceof StoppedError ||
    (e as { name?: string })?.name === "StoppedError";
}

/** Seconds a worker's lease on a run lasts without renewal (renewed every third of it). */
export const LEASE_SECONDS = 15;

/** A delivered run is leased by a live worker elsewhere: the queue retries the delivery later. */
export class LeaseHeldError extends Error {
  constructor(readonly runId: string) {
    super(`run ${runId} is being computed by another worker`);
    this.name = "LeaseHeldError";
  }
}

/** Where runs go and how their events travel (defaults: this process only). */
export interface RunTransport {
  queue: RunQueue;
  events: RunEventBus;
  /** This process' name as a lease holder. */
  holder: string;
  /** Where a run's chunks go (default: the executor's own workers). */
  chunks?: ChunkRouter;
}

/** A holder name unique to this process. */
export function processHolder(): string {
  return `${Deno.hostname()}:${Deno.pid}:${uuidv7().slice(-12)}`;
}

export interface SubmitOutcome {
  status: 201 | 202;
  run: RunRecord;
  saved_series: { output: string; id: string }[];
}

export class RunService {
  /** Runs this process is computing. */
  readonly active = new Map<string, Active>();
  readonly transport: RunTransport;

  constructor(
    readonly store: Store,
    readonly kinds: readonly RunKind[],
    readonly codec: SeriesCodec,
    readonly executor: ComputeExecutor,
    readonly options: {
      asyncSeconds: number;
      /** Wall-time limit of one run, seconds. @default DEFAULT_RUN_WALL_SECONDS */
      wallSeconds?: number;
    },
    transport?: Partial<RunTransport>,
  ) {
    this.transport = {
      ...transport,
      queue: transport?.queue ?? new InProcessQueue(),
      events: transport?.events ?? new LocalEventBus(),
      holder: transport?.holder ?? processHolder(),
    };
  }

  /** Take runs (and chunks of runs) from the queue and compute them here (worker role). */
  async startWorking(chunkConcurrency = 1): Promise<void> {
    await this.transport.chunks?.work(
      async (task, input) => (await this.executor.parallel(task, [input]))[0],
      chunkConcurrency,
    );
    await this.transport.queue.work((id) => this.process(id));
  }

  /** The wall-time limit of one run, seconds. */
  get wallSeconds(): number {
    return this.options.wallSeconds ?? DEFAULT_RUN_WALL_SECONDS;
  }

  kindOf(name: string): RunKind | undefined {
    return this.kinds.find((k) => k.kind === name);
  }

  /** Resolve inline series and load every referenced series and run. */
  async prepare(kind: RunKind, params: Record<string, unknown>) {
    const inline = new Map<string, StoredSeries>();
    const normalised = await extractInline(params, [], this.codec, inline) as Record<
      string,
      unknown
    >;
    const ids = collectSeriesIds(normalised);
    const series: Record<string, StoredSeries> = {};
    const missing: { pointer: string; message: string }[] = [];
    for (const [id, pointer] of ids) {
      const s = inline.get(id) ?? await this.store.getSeries(id);
      if (!s) missing.push({ pointer, message: `no stored series has id ${id}` });
      else series[id] = s;
    }
    const runs: Record<string, RunRecord> = {};
    for (const rid of kind.runRefs?.(normalised) ?? []) {
      const r = await this.store.getRun(rid);
      if (!r) {
        missing.push({ pointer: findPointer(normalised, rid), message: `no run has id ${rid}` });
      } else if (r.status !== "succeeded") {
        missing.push({
          pointer: findPointer(normalised, rid),
          message: `run ${rid} has status ${r.status}; only succeeded runs can be used`,
        });
      } else runs[rid] = r;
    }
    if (missing.length) {
      throw new ProblemError(
        "validation",
        "The request refers to series or runs that cannot be used",
        {
          errors: missing,
        },
      );
    }
    return { params: normalised, series, runs, inline };
  }

  /** Create a run. */
  async submit(
    kind: RunKind,
    rawParams: Record<string, unknown>,
    opts: { preferAsync: boolean },
  ): Promise<SubmitOutcome> {
    const prep = await this.prepare(kind, rawParams);
    const now = new Date().toISOString();
    const seed = typeof prep.params.seed === "number" ? prep.params.seed : null;
    const run: RunRecord = {
      id: uuidv7(),
      kind: kind.kind,
      created_at: now,
      updated_at: now,
      status: "queued",
      progress: 0,
      params: prep.params,
      input_series: Object.keys(prep.series).sort(),
      input_runs: Object.keys(prep.runs).sort(),
      service_version: SERVICE_VERSION,
      algorithm_version: kind.algorithmVersion,
      seed,
      result: null,
      result_digest: null,
      error: null,
      eta_seconds: null,
    };
    const estimate = estimateRunSeconds(kind, prep.params, prep);
    const isAsync = opts.preferAsync || estimate > this.options.asyncSeconds;
    if (isAsync) {
      for (const s of prep.inline.values()) await this.store.putSeries(s);
      await this.store.putRun(run);
      await this.transport.queue.enqueue(run.id);
      return { status: 202, run, saved_series: [] };
    }
    const done = await this.computeRun(kind, run, prep);
    // Only a successful synchronous run is stored (with its inline inputs).
    for (const s of prep.inline.values()) await this.store.putSeries(s);
    await this.store.putRun(done);
    const saved = await this.saveOutputs(kind, done);
    return { status: 201, run: done, saved_series: saved };
  }

  /**
   * Compute a result from params and loaded inputs, without storing anything (a synchronous
   * run, a replay). A computation still going at the wall-time limit is stopped and answered
   * with a time-limit problem.
   */
  async computeResult(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
  ): Promise<{ result: Record<string, unknown>; digest: string }> {
    let result: RunResult;
    const deadline = performance.now() + this.wallSeconds * 1000;
    const late = () => performance.now() >= deadline;
    try {
      result = await this.executor.compute(kind, params, inputs, {
        progress: () => {},
        isCancelled: late,
        onStart: () => {},
      });
    } catch (e) {
      if (isStopped(e) && late()) throw timeLimitProblem(this.wallSeconds);
      throw asProblem(e);
    }
    if (late()) throw timeLimitProblem(this.wallSeconds);
    const plain = toPlainJson(result) as Record<string, unknown>;
    return { result: plain, digest: await resultDigest(plain) };
  }

  /** Compute without storing; returns the finished record or throws the input problem. */
  private async computeRun(
    kind: RunKind,
    run: RunRecord,
    prep: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
  ): Promise<RunRecord> {
    const { result, digest } = await this.computeResult(kind, run.params, prep);
    return {
      ...run,
      status: "succeeded",
      progress: 1,
      updated_at: new Date().toISOString(),
      result,
      result_digest: digest,
      eta_seconds: null,
    };
  }

  /**
   * Compute a delivered run here, under a lease (worker role). A run that ended meanwhile is
   * left alone; one leased by a live worker elsewhere throws `LeaseHeldError` so the queue
   * delivers it again later. Every write is conditional on still holding the lease, so a
   * duplicated or recovered job never overwrites a newer state and writes its result once.
   */
  async process(runId: string): Promise<void> {
    const { store } = this;
    const { events, holder } = this.transport;
    const run = await store.claimRun(runId, holder, LEASE_SECONDS);
    if (!run) {
      const now = await store.getRun(runId);
      if (!now || TERMINAL.has(now.status)) return;
      throw new LeaseHeldError(runId);
    }
    const active: Active = { cancelled: false, timedOut: false, started: Date.now() };
    this.active.set(runId, active);
    const stop = events.subscribe(runId, (e) => {
      if (e.type === "status" && e.status === "cancelled") active.cancelled = true;
    });
    const renew = setInterval(() => {
      store.renewLease(runId, holder, LEASE_SECONDS).then((held) => {
        // Cancelled (the state left `running`) or taken over after a stall: stop computing.
        if (!held) active.cancelled = true;
      }, () => {});
    }, (LEASE_SECONDS * 1000) / 3);
    const publish = (e: RunEvent) => events.publish(e);
    // The time limit: the run fails at once with its reason (a write conditional on the lease,
    // so a run that ended meanwhile keeps its state) and its work is stopped like a cancel's.
    const limit = setTimeout(() => {
      active.timedOut = true;
      active.cancelled = true;
      this.#fail(runId, timeLimitProblem(this.wallSeconds), publish);
    }, this.wallSeconds * 1000);
    try {
      const kind = this.kindOf(run.kind);
      if (!kind) throw new ProblemError("conflict", `run kind "${run.kind}" no longer exists`);
      const prep = await this.prepare(kind, run.params);
      await this.#computeLeased(kind, run, prep, active, publish);
    } catch (e) {
      if (active.timedOut) {
        await this.#fail(runId, timeLimitProblem(this.wallSeconds), publish);
      } else if (active.cancelled || isStopped(e)) {
        const written = await store.updateLeased(runId, holder, {
          status: "cancelled",
          eta_seconds: null,
          updated_at: new Date().toISOString(),
        }).catch(() => false);
        if (written) publish({ type: "status", id: runId, status: "cancelled", progress: 0 });
      } else {
        await this.#fail(runId, asProblem(e), publish);
      }
    } finally {
      clearTimeout(limit);
      clearInterval(renew);
      stop();
      this.active.delete(runId);
      await this.transport.chunks?.release(runId);
    }
  }

  /** Record a leased run's failure with its problem (once: the write needs the lease). */
  async #fail(runId: string, problem: ProblemError, publish: (e: RunEvent) => void) {
    const written = await this.store.updateLeased(runId, this.transport.holder, {
      status: "failed",
      error: problem.problem,
      eta_seconds: null,
      updated_at: new Date().toISOString(),
    }).catch(() => false);
    if (written) publish({ type: "status", id: runId, status: "failed", progress: 0 });
  }

  async #computeLeased(
    kind: RunKind,
    run: RunRecord,
    prep: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
    active: Active,
    publish: (e: RunEvent) => void,
  ): Promise<void> {
    const { store } = this;
    const { holder } = this.transport;
    let lastWrite = 0;
    let startedAt = Date.now();
    const deadline = active.started + this.wallSeconds * 1000;
    // Computed in this thread, a run sees the time limit by the clock (no timer fires while a
    // chunk computes); in a worker pool the flag set by the timer reaches it.
    const mustStop = () => {
      if (!active.cancelled && Date.now() >= deadline) {
        active.timedOut = true;
        active.cancelled = true;
      }
      return active.cancelled;
    };
    const result = await this.executor.compute(kind, run.params, prep, {
      onStart: () => {
        startedAt = Date.now();
        publish({ type: "status", id: run.id, status: "running", progress: 0 });
      },
      progress: (f) => {
        const elapsed = (Date.now() - startedAt) / 1000;
        const eta = f > 0.01 ? Math.max(0, elapsed * (1 - f) / f) : null;
        publish({ type: "progress", id: run.id, status: "running", progress: f, eta_seconds: eta });
        const t = Date.now();
        if (t - lastWrite > 250) {
          lastWrite = t;
          store.updateLeased(run.id, holder, {
            progress: f,
            eta_seconds: eta === null ? null : Math.round(eta * 10) / 10,
            updated_at: new Date().toISOString(),
          }).then((held) => {
            if (!held) active.cancelled = true;
          }, () => {});
        }
      },
      isCancelled: mustStop,
      scatter: this.transport.chunks
        ? (task, chunks) => this.transport.chunks!.map(run.id, task, chunks, mustStop)
        : undefined,
    });
    if (mustStop()) throw new CancelledError();
    const plain = toPlainJson(result) as Record<string, unknown>;
    const digest = await resultDigest(plain);
    const written = await store.updateLeased(run.id, holder, {
      status: "succeeded",
      progress: 1,
      result: plain,
      result_digest: digest,
      eta_seconds: null,
      updated_at: new Date().toISOString(),
    });
    if (!written) return;
    const finished = await store.getRun(run.id);
    if (finished) await this.saveOutputs(kind, finished);
    publish({ type: "status", id: run.id, status: "succeeded", progress: 1 });
  }

  /** Store the kind's auto-saved outputs as series derived from the run. */
  async saveOutputs(kind: RunKind, run: RunRecord): Promise<{ output: string; id: string }[]> {
    const saved: { output: string; id: string }[] = [];
    const outputs = (run.result?.outputs ?? {}) as Record<string, OutputSeries>;
    for (const name of kind.autoSave ?? []) {
      const o = outputs[name];
      if (!o) continue;
      saved.push({ output: name, id: await this.saveOutput(run, name) });
    }
    return saved;
  }

  /** Save one output of a finished run as a stored series; returns its id. */
  async saveOutput(run: RunRecord, name: string): Promise<string> {
    const o = (run.result?.outputs as Record<string, OutputSeries> | undefined)?.[name];
    if (!o) {
      throw new ProblemError("not-found", `run ${run.id} has no output named "${name}"`);
    }
    const s = await this.codec.fromOutput(o, run.id);
    await this.store.putSeries(s);
    return s.id;
  }

  /** Recompute a stored run from its stored inputs and compare digests. */
  async replay(run: RunRecord) {
    const kind = this.kindOf(run.kind);
    if (!kind) throw new ProblemError("conflict", `run kind "${run.kind}" no longer exists`);
    if (run.status !== "succeeded" || !run.result_digest) {
      throw new ProblemError(
        "conflict",
        `run ${run.id} has status ${run.status}; only succeeded runs can be replayed`,
      );
    }
    const reparsed = kind.request.safeParse(run.params);
    if (!reparsed.success) {
      throw new ProblemError(
        "conflict",
        `the stored parameters of run ${run.id} no longer validate for kind ${kind.kind}`,
      );
    }
    const prep = await this.prepare(kind, reparsed.data as Record<string, unknown>);
    const again = await this.computeRun(kind, run, prep);
    const identical = again.result_digest === run.result_digest;
    const versionChanged = kind.algorithmVersion !== run.algorithm_version;
    return {
      run_id: run.id,
      kind: run.kind,
      identical,
      stored_digest: run.result_digest,
      replay_digest: again.result_digest,
      algorithm_version: { recorded: run.algorithm_version, current: kind.algorithmVersion },
      algorithm_version_changed: versionChanged,
      service_version: { recorded: run.service_version, current: SERVICE_VERSION },
      note: identical
        ? "The recomputed result is byte-identical (same RFC 8785 canonical JSON digest)."
        : versionChanged
        ? `The algorithm of "${run.kind}" changed since this run (${run.algorithm_version} → ${kind.algorithmVersion}); the results differ.`
        : "The recomputed result differs from the stored one although the algorithm version is unchanged.",
      result: again.result,
    };
  }

  /**
   * Cancel a queued or running run: the stored state changes at once (on any instance) and
   * the worker holding it hears of it through the event bus (or at its next lease renewal).
   */
  async cancel(id: string): Promise<RunRecord | null> {
    const after = await this.store.cancelRun(id);
    if (after === null) return null;
    const run = await this.store.getRun(id);
    if (!after.changed || !run) {
      throw new ProblemError(
        "conflict",
        `run ${id} has status ${after.status} and cannot be cancelled`,
      );
    }
    const local = this.active.get(id);
    if (local) local.cancelled = true;
    this.transport.events.publish({
      type: "status",
      id,
      status: "cancelled",
      progress: run.progress,
    });
    return run;
  }

  /** Follow one run's events (from whichever instance computes it). */
  subscribe(id: string, fn: (e: RunEvent) => void): () => void {
    return this.transport.events.subscribe(id, fn);
  }

  /** Wait for all background runs (tests, shutdown). */
  async settle(): Promise<void> {
    await this.transport.queue.settle();
  }
}

function findPointer(params: unknown, needle: string): string {
  let found = "";
  const walk = (v: unknown, path: (string | number)[]) => {
    if (found) return;
    if (v === needle) found = toPointer(path);
    else if (Array.isArray(v)) v.forEach((x, i) => walk(x, [...path, i]));
    else if (v && typeof v === "object") {
      for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
    }
  };
  walk(params, []);
  return found;
}

/**
 * Map an exception from compute to a problem.
 *
 * - InputProblem: the kind named the field; a 422 with its pointer.
 * - RangeError: a precondition of a core function that the kind did not check on its
 *   request, so no field can be named. The input did trigger it, so it is a 422 and not a
 *   500, but without a made-up pointer: the problem says that no field could be named, and
 *   the error is logged so the missing check can be added. (A problem with an empty pointer
 *   and a core function's wording is what users saw before; test/api/problems_scan_test.ts
 *   scans bad requests for it.)
 * - anything else: a 500, logged.
 */
export function asProblem(e: unknown): ProblemError {
  if (e instanceof ProblemError) return e;
  if (e instanceof InputProblem || (e as { name?: string })?.name === "InputProblem") {
    const ip = e as InputProblem;
    return new ProblemError("validation", ip.message, {
      errors: [{ pointer: ip.pointer ?? "", message: ip.message }],
      ...(ip.extra ?? {}),
    });
  }
  if (e instanceof RangeError || (e as { name?: string })?.name === "RangeError") {
    console.error(JSON.stringify({ level: "warn", unchecked_input: (e as Error).message }));
    return new ProblemError(
      "validation",
      "The analysis cannot use this combination of inputs, and the request checks did not " +
        `name the field at fault (logged with this request id): ${(e as Error).message}`,
    );
  }
  if (isStopped(e)) return new ProblemError("conflict", "run cancelled");
  console.error(e);
  return new ProblemError(
    "internal",
    "The analysis failed unexpectedly; the error was logged with this request id.",
  );
}
