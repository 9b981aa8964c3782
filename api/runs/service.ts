/**
 * The run machinery: turns a validated request for a run kind into a recorded run.
 *
 * Synchronous runs are computed first and stored only when they succeed, so a rejected
 * request (422) leaves the store unchanged. Asynchronous runs (asked for with
 * `Prefer: respond-async`, or estimated to take longer than the configured threshold) have
 * their inputs checked first (`preflight`: a request refused for its input is a 422 and is not
 * stored either), are then stored as `queued` with their inputs, and computed in the
 * background; progress and the final status are published to subscribers (Server-Sent Events).
 *
 * @module
 */
import { uuidv7 } from "uuidv7";
import type { HolderSpec, RunRecord, Store, StoredSeries, Viewer } from "../store/types.ts";
import { DEFAULT_HOLDER } from "../store/common.ts";
import {
  CancelledError,
  InputProblem,
  type LoadedField,
  type RunInputs,
  type RunKind,
  type Task,
} from "./kind.ts";
import type { OutputSeries, RunResult } from "./kind.ts";
import { StoppedError } from "../../core/stop_signal.ts";
import { estimateRunSeconds } from "./estimate.ts";
import { makeContext } from "./context.ts";
export { makeContext };
import { SERIES_ID_PATTERN } from "../schemas/series_ref.ts";
import type { InlineSeries } from "../schemas/series_ref.ts";
import { ProblemError, toPointer } from "../problems.ts";
import { canonicalJson, sha256Hex } from "../canonical.ts";
import { LARGE_RESULT_BYTES, lazyResult, resultBytesOf } from "../store/result_text.ts";
import { gatherInherited, type InheritedNote, type Lineage } from "./inherit.ts";
import { type FinishedResult, finishResult } from "./finish.ts";
import { SERVICE_VERSION } from "../version.ts";
import { taskTable } from "../analyses/derive.ts";
import { RUN_KINDS } from "../analyses/registry.ts";
import { LocalEventBus, type RunEvent, type RunEventBus } from "../queue/events.ts";
import { InProcessQueue } from "../queue/in_process.ts";
import type { RunQueue } from "../queue/types.ts";
import type { ChunkRouter } from "../queue/chunks.ts";
import { TERMINAL } from "../store/types.ts";
import { fieldMetaOf } from "../store/field_common.ts";

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
    inputs: RunInputs,
    hooks: ComputeHooks,
  ): Promise<RunResult>;
  /**
   * Compute, then finish the result where it was computed (api/runs/finish.ts): plain JSON
   * with the inherited `notes`, its canonical bytes and digest, and the auto-saved outputs.
   */
  computeFinished(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    hooks: ComputeHooks,
    notes: InheritedNote[],
  ): Promise<FinishedResult>;
  /**
   * Map a named task over inputs (used by in-thread compute too). With `isCancelled`, the
   * tasks' `shouldStop` turns true once it answers true (chunks of a run that may be stopped).
   */
  parallel<I, O>(
    task: string,
    inputs: I[],
    options?: { isCancelled?: () => boolean },
  ): Promise<O[]>;
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
    inputs: RunInputs,
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
  async computeFinished(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    hooks: ComputeHooks,
    notes: InheritedNote[],
  ): Promise<FinishedResult> {
    return finishResult(await this.compute(kind, params, inputs, hooks), notes, kind.autoSave);
  }
  parallel<I, O>(
    task: string,
    inputs: I[],
    options: { isCancelled?: () => boolean } = {},
  ): Promise<O[]> {
    return this.#map(task, inputs, options.isCancelled ?? (() => false));
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

/** Stops a preflight at the end of the input checks (the first progress report). */
class InputsChecked extends Error {
  constructor() {
    super("input checks done");
    this.name = "InputsChecked";
  }
}

/**
 * A run this process computes: its stop flag (set by a cancel, a lost lease or the time
 * limit), and whether the time limit set it.
 */
interface Active {
  cancelled: boolean;
  timedOut: boolean;
  started: number;
  /** A final status was recorded (cancel, time limit, or the outcome): write no other. */
  final: boolean;
}

/** A run's place under its owner's quotas (api/limits/quotas.ts). */
export interface RunTicket {
  /** Resolves when the owner may start computing (its concurrent-runs quota). */
  slot(): Promise<void>;
  /** The run stopped after computing for `seconds` (0 when it never started). */
  done(seconds: number): void;
}

/** Admits runs under per-owner quotas. */
export interface RunAdmission {
  /** Admit a run of `owner`; throws a 429 ProblemError when a quota is exceeded. */
  admit(owner: string, mode: "sync" | "async"): RunTicket;
}

/** Who submits a run, and whether quotas apply. */
export interface SubmitAccess {
  /** Only inputs this viewer may see can be used; none given = any (internal use). */
  viewer?: Viewer;
  /** The run, its inline inputs and saved outputs are held by this holder. */
  holder?: HolderSpec;
  /** True when the owner is under quotas. */
  limited?: boolean;
}

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
  /**
   * Set when a large synchronous result is still being stored: settles once the run is stored
   * (rejects if it could not be). Whoever answers the request sends the response meanwhile and
   * finishes it only once this resolves (api/routes/kinds.ts), so no client holds a whole
   * response for a run that is not stored.
   */
  stored?: Promise<void>;
}

export class RunService {
  /** Runs this process is computing. */
  readonly active = new Map<string, Active>();
  /** Runs this process accepted and queued: their holder and quota ticket, until computed. */
  readonly #accepted = new Map<string, { holder: HolderSpec; ticket: RunTicket | null }>();
  readonly transport: RunTransport;

  constructor(
    readonly store: Store,
    readonly kinds: readonly RunKind[],
    readonly codec: SeriesCodec,
    readonly executor: ComputeExecutor,
    readonly options: {
      asyncSeconds: number;
      /** Wall-time limit of one run's computation, seconds. @default Infinity */
      wallSeconds?: number;
      /** Per-owner run quotas; none = unlimited. */
      admission?: RunAdmission;
      /**
       * A synchronous result of at least this many bytes is stored while its response is sent
       * (see {@link SubmitOutcome.stored}); smaller ones are stored first.
       * @default LARGE_RESULT_BYTES
       */
      storeWhileSendingBytes?: number;
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

  /**
   * Take runs (and chunks of runs) from the queue and compute them here (worker role). A chunk
   * stops as its run's own work does: when a terminal status of its run is heard on the event
   * bus (a cancel from any instance, the time limit, a failure), when this process computes
   * the run and it must stop, or when the chunk router sees the run end.
   */
  async startWorking(chunkConcurrency = 1): Promise<void> {
    await this.transport.chunks?.work(async (task, input, chunk) => {
      let ended = false;
      const unsubscribe = this.transport.events.subscribe(chunk.runId, (e) => {
        if (e.type === "status" && TERMINAL.has(e.status as never)) ended = true;
      });
      try {
        const isCancelled = () =>
          ended || chunk.shouldStop() || this.active.get(chunk.runId)?.cancelled === true;
        return (await this.executor.parallel(task, [input], { isCancelled }))[0];
      } finally {
        unsubscribe();
      }
    }, chunkConcurrency);
    await this.transport.queue.work((id) => this.process(id));
  }

  get #wallMs(): number {
    return (this.options.wallSeconds ?? Infinity) * 1000;
  }

  kindOf(name: string): RunKind | undefined {
    return this.kinds.find((k) => k.kind === name);
  }

  /**
   * Resolve inline series and load every referenced series and run. With a viewer, a series
   * or run it may not see is reported exactly like one that is not stored.
   */
  async prepare(kind: RunKind, params: Record<string, unknown>, viewer?: Viewer) {
    const inline = new Map<string, StoredSeries>();
    const normalised = await extractInline(params, [], this.codec, inline) as Record<
      string,
      unknown
    >;
    const ids = collectSeriesIds(normalised);
    const series: Record<string, StoredSeries> = {};
    const missing: { pointer: string; message: string }[] = [];
    for (const [id, pointer] of ids) {
      const visible = inline.has(id) || !viewer || await this.store.seriesHolding(id, viewer);
      const s = inline.get(id) ?? (visible ? await this.store.getSeries(id) : null);
      if (!s) missing.push({ pointer, message: `no stored series has id ${id}` });
      else series[id] = s;
    }
    const runs: Record<string, RunRecord> = {};
    for (const rid of kind.runRefs?.(normalised) ?? []) {
      const visible = !viewer || await this.store.runHolding(rid, viewer);
      const r = visible ? await this.store.getRun(rid) : null;
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
    const fields = await this.#loadFields(kind, normalised, { series, runs }, viewer);
    return { params: normalised, series, runs, fields, inline };
  }

  /** Load the time steps each field reference needs (only the blocks that overlap). */
  async #loadFields(
    kind: RunKind,
    params: Record<string, unknown>,
    loaded: RunInputs,
    viewer?: Viewer,
  ): Promise<Record<string, LoadedField>> {
    if (!kind.fieldRefs) return {};
    const ctx = makeContext(loaded, { progress: () => {}, isCancelled: () => false }, () => {
      throw new Error("fieldRefs cannot map tasks");
    });
    let refs;
    try {
      refs = kind.fieldRefs(params as never, ctx);
    } catch (e) {
      throw asProblem(e);
    }
    const out: Record<string, LoadedField> = {};
    const errors: { pointer: string; message: string }[] = [];
    for (const ref of refs) {
      const visible = !viewer || await this.store.fieldHolding(ref.id, viewer);
      const f = visible ? await this.store.getField(ref.id) : null;
      if (!f) {
        errors.push({ pointer: ref.pointer, message: `no stored field has id ${ref.id}` });
        continue;
      }
      const from = ref.from ?? -Infinity, to = ref.to ?? Infinity;
      let a = 0, b = f.n_time;
      while (a < b && f.time[a] < from) a++;
      while (b > a && f.time[b - 1] > to) b--;
      if (ref.firstSteps !== undefined) b = Math.min(b, a + Math.max(1, ref.firstSteps));
      if (b <= a) {
        errors.push({
          pointer: ref.spanPointer ?? ref.pointer,
          message: `field ${ref.id} (${f.start.toFixed(3)}..${f.end.toFixed(3)}) has no time ` +
            `step in the span the other inputs cover (${from.toFixed(3)}..${to.toFixed(3)})`,
        });
        continue;
      }
      const prev = out[ref.id];
      if (prev && prev.stepStart <= a && prev.stepStart + prev.time.length >= b) continue;
      if (prev) {
        a = Math.min(a, prev.stepStart);
        b = Math.max(b, prev.stepStart + prev.time.length);
      }
      out[ref.id] = {
        meta: fieldMetaOf(f),
        lat: f.lat,
        lon: f.lon,
        lat_bounds: f.lat_bounds,
        lon_bounds: f.lon_bounds,
        stepStart: a,
        time: f.time.slice(a, b),
        values: await this.store.readFieldSteps(ref.id, a, b),
      };
    }
    if (errors.length) {
      throw new ProblemError(
        "validation",
        `The request's gridded field cannot be used: ${errors[0].message}`,
        { errors },
      );
    }
    return out;
  }

  /** Create a run. */
  async submit(
    kind: RunKind,
    rawParams: Record<string, unknown>,
    opts: { preferAsync: boolean } & SubmitAccess,
  ): Promise<SubmitOutcome> {
    const holder = opts.holder ?? DEFAULT_HOLDER;
    const prep = await this.prepare(kind, rawParams, opts.viewer);
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
      ...(Object.keys(prep.fields).length ? { input_fields: Object.keys(prep.fields).sort() } : {}),
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
    const admission = opts.limited ? this.options.admission : undefined;
    const ticket = admission?.admit(holder.owner, isAsync ? "async" : "sync") ?? null;
    if (isAsync) {
      // refused for its input: a 422 now, and nothing stored (as for a synchronous run)
      try {
        await this.preflight(kind, prep.params, prep);
      } catch (e) {
        ticket?.done(0);
        throw e;
      }
      try {
        for (const s of prep.inline.values()) await this.store.putSeries(s, holder);
        await this.store.putRun(run, holder);
        this.#accepted.set(run.id, { holder, ticket });
        await this.transport.queue.enqueue(run.id);
      } catch (e) {
        this.#accepted.delete(run.id);
        ticket?.done(0);
        throw e;
      }
      return { status: 202, run, saved_series: [] };
    }
    let computed: { done: RunRecord; outputs: Record<string, unknown> };
    const t0 = performance.now();
    try {
      await ticket?.slot();
      computed = await this.computeRun(kind, run, prep);
    } finally {
      ticket?.done((performance.now() - t0) / 1000);
    }
    const { done, outputs } = computed;
    // Only a successful synchronous run is stored (with its inline inputs).
    for (const s of prep.inline.values()) await this.store.putSeries(s, holder);
    // A large result with no outputs to save as series is stored while its response is sent:
    // the commit (100-120 ms for 38 MB, off the request thread in a file store) and sending it
    // overlap, and the response's last byte waits for the commit.
    const size = resultBytesOf(done.result)?.length ?? 0;
    const streamFrom = this.options.storeWhileSendingBytes ?? LARGE_RESULT_BYTES;
    if (size >= streamFrom && size > 0 && !kind.autoSave?.length) {
      const stored = this.store.putRun(done, holder);
      // observed by the response; a failure is also logged there
      stored.catch(() => {});
      return { status: 201, run: done, saved_series: [], stored };
    }
    await this.store.putRun(done, holder);
    const saved = await this.saveOutputs(kind, done, holder, outputs);
    return { status: 201, run: done, saved_series: saved };
  }

  /**
   * Check a request's inputs before an asynchronous run is stored: run the analysis' compute
   * in this thread up to its first progress report or parallel map, where by the contract of
   * `RunContext.progress` its input checks are done (an analysis without either is cheap and
   * runs to its end; the result is not kept). An input problem is thrown as the 422 the
   * synchronous path gives; the request is then not stored.
   */
  async preflight(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
  ): Promise<void> {
    const checked = () => {
      throw new InputsChecked();
    };
    const ctx = makeContext(inputs, { progress: checked, isCancelled: () => false }, checked);
    try {
      await kind.compute(params, ctx);
    } catch (e) {
      if (e instanceof InputsChecked) return;
      throw asProblem(e);
    }
  }

  /**
   * Compute a result from params and loaded inputs, without storing anything. The result
   * carries the warnings and cautions of the runs it is built on (`inherited`), looked up in
   * `lineage` (default: the store). A computation still going after the wall-time limit is
   * asked to stop and answered with a time-limit problem (computed in this thread, it is
   * refused once it returns). The result is finished where it was computed (api/runs/finish.ts)
   * and comes back as its canonical bytes, parsed here only if a field of it is read; `saved`
   * holds the outputs the kind saves as series.
   */
  async computeResult(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: RunInputs,
    lineage: Lineage = this.lineage(),
  ): Promise<{ result: Record<string, unknown>; digest: string; saved: Record<string, unknown> }> {
    let result: FinishedResult;
    let stop = false;
    let timer: ReturnType<typeof setTimeout> | undefined;
    const wallMs = this.#wallMs;
    const t0 = performance.now();
    const notes = await gatherInherited(inputs, lineage);
    try {
      const work = this.executor.computeFinished(kind, params, inputs, {
        progress: () => {},
        // computed in this thread, no timer fires while a loop runs: the clock is read too
        isCancelled: () => stop || performance.now() - t0 > wallMs,
        onStart: () => {},
      }, notes);
      if (Number.isFinite(wallMs)) {
        const late = new Promise<never>((_, reject) => {
          timer = setTimeout(() => {
            stop = true;
            reject(timeLimitProblem(this.options.wallSeconds!));
          }, wallMs);
        });
        work.catch(() => {});
        result = await Promise.race([work, late]);
      } else {
        result = await work;
      }
    } catch (e) {
      if (isStopped(e) && performance.now() - t0 > wallMs) {
        throw timeLimitProblem(this.options.wallSeconds!);
      }
      throw asProblem(e);
    } finally {
      clearTimeout(timer);
    }
    if (performance.now() - t0 > wallMs) throw timeLimitProblem(this.options.wallSeconds!);
    return { result: lazyResult(result.bytes), digest: result.digest, saved: result.saved };
  }

  /** The lineage of runs as the store holds it. */
  lineage(): Lineage {
    return {
      run: (id) => this.store.getRun(id),
      seriesOrigin: async (id) => (await this.store.getSeriesMeta(id))?.derived_from ?? null,
    };
  }

  /** Compute without storing; returns the finished record or throws the input problem. */
  private async computeRun(
    kind: RunKind,
    run: RunRecord,
    prep: RunInputs,
  ): Promise<{ done: RunRecord; outputs: Record<string, unknown> }> {
    const { result, digest, saved } = await this.computeResult(kind, run.params, prep);
    const done: RunRecord = {
      ...run,
      status: "succeeded",
      progress: 1,
      updated_at: new Date().toISOString(),
      result,
      result_digest: digest,
      eta_seconds: null,
    };
    return { done, outputs: saved };
  }

  /**
   * Compute a delivered run here, under a lease (worker role). A run that ended meanwhile is
   * left alone; one leased by a live worker elsewhere throws `LeaseHeldError` so the queue
   * delivers it again later. Every write is conditional on still holding the lease, so a
   * duplicated or recovered job never overwrites a newer state and writes its result once.
   * The owner's quota ticket (when the run was accepted by this process) holds a concurrency
   * slot while it computes; the wall-time limit fails it with its reason.
   */
  async process(runId: string): Promise<void> {
    const { store } = this;
    const { holder: lessee } = this.transport;
    const accepted = this.#accepted.get(runId);
    this.#accepted.delete(runId);
    const ticket = accepted?.ticket ?? null;
    let startedAt = 0;
    try {
      await ticket?.slot();
      const run = await store.claimRun(runId, lessee, LEASE_SECONDS);
      if (!run) {
        const now = await store.getRun(runId);
        if (!now || TERMINAL.has(now.status)) return;
        throw new LeaseHeldError(runId);
      }
      startedAt = Date.now();
      await this.#processLeased(run, accepted?.holder ?? await this.#ownerOf(runId));
    } finally {
      ticket?.done(startedAt ? (Date.now() - startedAt) / 1000 : 0);
    }
  }

  /** The holder of a run accepted by another process (its owner and visibility). */
  async #ownerOf(runId: string): Promise<HolderSpec> {
    const h = await this.store.runHolding(runId, { owner: null, group: null, admin: true });
    return h ? { owner: h.owner, visibility: h.visibility } : DEFAULT_HOLDER;
  }

  async #processLeased(run: RunRecord, holder: HolderSpec): Promise<void> {
    const { store } = this;
    const { events, holder: lessee } = this.transport;
    const runId = run.id;
    const active: Active = { cancelled: false, timedOut: false, started: Date.now(), final: false };
    this.active.set(runId, active);
    const stop = events.subscribe(runId, (e) => {
      if (e.type === "status" && e.status === "cancelled") active.cancelled = true;
    });
    const renew = setInterval(() => {
      store.renewLease(runId, lessee, LEASE_SECONDS).then((held) => {
        // Cancelled (the state left `running`) or taken over after a stall: stop computing.
        if (!held) active.cancelled = true;
      }, () => {});
    }, (LEASE_SECONDS * 1000) / 3);
    const publish = (e: RunEvent) => events.publish(e);
    const fail = async (status: "failed" | "cancelled", error: Record<string, unknown> | null) => {
      if (active.final) return;
      active.final = true;
      const written = await store.updateLeased(runId, lessee, {
        status,
        error,
        eta_seconds: null,
        updated_at: new Date().toISOString(),
      }).catch(() => false);
      if (written) publish({ type: "status", id: runId, status, progress: 0 });
    };
    const wallMs = this.#wallMs;
    const limit = Number.isFinite(wallMs)
      ? setTimeout(() => {
        active.timedOut = true;
        active.cancelled = true;
        fail("failed", timeLimitProblem(this.options.wallSeconds!).problem).catch(() => {});
      }, wallMs)
      : undefined;
    try {
      const kind = this.kindOf(run.kind);
      if (!kind) throw new ProblemError("conflict", `run kind "${run.kind}" no longer exists`);
      const prep = await this.prepare(kind, run.params);
      const t0 = performance.now();
      // Computed in this thread, no timer fires while a loop runs: the clock is read too.
      const overTime = () => {
        if (!active.timedOut && performance.now() - t0 > wallMs) {
          active.timedOut = true;
          active.cancelled = true;
        }
        return active.timedOut;
      };
      await this.#computeLeased(kind, run, prep, active, publish, holder, overTime);
    } catch (e) {
      if (active.timedOut) {
        await fail("failed", timeLimitProblem(this.options.wallSeconds!).problem);
      } else {
        const cancelled = active.cancelled || isStopped(e);
        await fail(cancelled ? "cancelled" : "failed", cancelled ? null : asProblem(e).problem);
      }
    } finally {
      clearTimeout(limit);
      clearInterval(renew);
      stop();
      this.active.delete(runId);
      await this.transport.chunks?.release(runId);
    }
  }

  async #computeLeased(
    kind: RunKind,
    run: RunRecord,
    prep: RunInputs,
    active: Active,
    publish: (e: RunEvent) => void,
    owner: HolderSpec,
    overTime: () => boolean,
  ): Promise<void> {
    const { store } = this;
    const { holder } = this.transport;
    let lastWrite = 0;
    let startedAt = Date.now();
    const mustStop = () => overTime() || active.cancelled;
    const notes = await gatherInherited(prep, this.lineage());
    const finishedResult = await this.executor.computeFinished(kind, run.params, prep, {
      onStart: () => {
        startedAt = Date.now();
        publish({ type: "status", id: run.id, status: "running", progress: 0 });
      },
      progress: (f) => {
        if (active.final) return;
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
    }, notes);
    if (mustStop()) throw new CancelledError();
    const { digest, saved: outputs } = finishedResult;
    const result = lazyResult(finishedResult.bytes);
    if (active.final) return;
    active.final = true;
    const written = await store.updateLeased(run.id, holder, {
      status: "succeeded",
      progress: 1,
      result,
      result_digest: digest,
      eta_seconds: null,
      updated_at: new Date().toISOString(),
    });
    if (!written) return;
    const finished = await store.getRun(run.id);
    if (finished) await this.saveOutputs(kind, finished, owner, outputs);
    publish({ type: "status", id: run.id, status: "succeeded", progress: 1 });
  }

  /** Store the kind's auto-saved outputs as series derived from the run. */
  async saveOutputs(
    kind: RunKind,
    run: RunRecord,
    holder: HolderSpec = DEFAULT_HOLDER,
    outputs?: Record<string, unknown>,
  ): Promise<{ output: string; id: string }[]> {
    const saved: { output: string; id: string }[] = [];
    // the auto-saved outputs as the compute finished them, else read from the result
    const from = (outputs ?? run.result?.outputs ?? {}) as Record<string, OutputSeries>;
    for (const name of kind.autoSave ?? []) {
      const o = from[name];
      if (!o) continue;
      saved.push({ output: name, id: await this.saveOutput(run, name, holder, o) });
    }
    return saved;
  }

  /** Save one output of a finished run as a stored series held by `holder`; returns its id. */
  async saveOutput(
    run: RunRecord,
    name: string,
    holder: HolderSpec = DEFAULT_HOLDER,
    output?: OutputSeries,
  ): Promise<string> {
    const o = output ?? (run.result?.outputs as Record<string, OutputSeries> | undefined)?.[name];
    if (!o) {
      throw new ProblemError("not-found", `run ${run.id} has no output named "${name}"`);
    }
    const s = await this.codec.fromOutput(o, run.id);
    await this.store.putSeries(s, holder);
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
    const { done: again } = await this.computeRun(kind, run, prep);
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
        : await onlyInheritedAdded(run.result, again.result)
        ? "The recomputed result equals the stored one except for its `inherited` part (the " +
          "warnings and cautions of the runs it is built on), which results carry since a " +
          "later service version than the one that made this run."
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

/** True when `again` is `stored` plus an `inherited` part that `stored` lacks. */
async function onlyInheritedAdded(
  stored: Record<string, unknown> | null,
  again: Record<string, unknown> | null,
): Promise<boolean> {
  if (!stored || !again || "inherited" in stored || !("inherited" in again)) return false;
  const { inherited: _, ...rest } = again;
  return await resultDigest(rest) === await resultDigest(stored);
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
