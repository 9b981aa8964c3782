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
import type { HolderSpec, RunRecord, Store, StoredSeries, Viewer } from "../store/types.ts";
import { DEFAULT_HOLDER } from "../store/common.ts";
import { CancelledError, InputProblem, type RunContext, type RunKind } from "./kind.ts";
import type { OutputSeries, RunResult } from "./kind.ts";
import { SERIES_ID_PATTERN } from "../schemas/series_ref.ts";
import type { InlineSeries } from "../schemas/series_ref.ts";
import { ProblemError, toPointer } from "../problems.ts";
import { canonicalJson, sha256Hex } from "../canonical.ts";
import { toPlainJson } from "./json.ts";
import { SERVICE_VERSION } from "../version.ts";
import { TASKS } from "../workers/tasks.ts";

/** How inline and output series become stored series (implemented over api/ingest). */
export interface SeriesCodec {
  /** Normalise an inline series; throws ProblemError (422) with pointers under `pointer`. */
  fromInline(obj: InlineSeries, pointer: string): Promise<StoredSeries>;
  /** A stored series made from a run's output, with lineage. */
  fromOutput(o: OutputSeries, runId: string): Promise<StoredSeries>;
}

/** Executes a run kind's compute somewhere (a worker pool, or this thread). */
export interface ComputeExecutor {
  compute(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
    hooks: { progress(f: number): void; isCancelled(): boolean; onStart(): void },
  ): Promise<RunResult>;
  /** Map a named task over inputs (used by in-thread compute too). */
  parallel<I, O>(task: string, inputs: I[]): Promise<O[]>;
}

export type RunEvent =
  | { type: "progress"; id: string; status: string; progress: number; eta_seconds: number | null }
  | { type: "status"; id: string; status: string; progress: number };

/** Runs compute in this thread (tests, `SUNLAG_WORKERS=0`). */
export class InThreadExecutor implements ComputeExecutor {
  async compute(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
    hooks: { progress(f: number): void; isCancelled(): boolean; onStart(): void },
  ): Promise<RunResult> {
    hooks.onStart();
    const ctx = makeContext(inputs, hooks, (task, chunks) => this.parallel(task, chunks));
    return await kind.compute(params, ctx);
  }
  parallel<I, O>(task: string, inputs: I[]): Promise<O[]> {
    const fn = TASKS[task];
    if (!fn) throw new Error(`unknown worker task "${task}"`);
    return Promise.resolve(inputs.map((i) => fn(i) as O));
  }
}

/** Build the RunContext seen by compute. */
export function makeContext(
  inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
  hooks: { progress(f: number): void; isCancelled(): boolean },
  parallel: <I, O>(task: string, chunks: I[]) => Promise<O[]>,
): RunContext {
  return {
    series(id) {
      const s = inputs.series[id];
      if (!s) throw new InputProblem("", `series ${id} was not loaded`);
      return s;
    },
    run(id) {
      const r = inputs.runs[id];
      if (!r) throw new InputProblem("", `run ${id} was not loaded`);
      return r;
    },
    progress: (f) => hooks.progress(Math.min(1, Math.max(0, f))),
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

interface Active {
  cancelled: boolean;
  listeners: Set<(e: RunEvent) => void>;
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
  );
}

export interface SubmitOutcome {
  status: 201 | 202;
  run: RunRecord;
  saved_series: { output: string; id: string }[];
}

export class RunService {
  readonly active = new Map<string, Active>();
  /** Background executions in flight (awaited by tests and on shutdown). */
  readonly pending = new Set<Promise<void>>();

  constructor(
    readonly store: Store,
    readonly kinds: RunKind[],
    readonly codec: SeriesCodec,
    readonly executor: ComputeExecutor,
    readonly options: {
      asyncSeconds: number;
      /** Wall-time limit of one run's computation, seconds. @default Infinity */
      wallSeconds?: number;
      /** Per-owner run quotas; none = unlimited. */
      admission?: RunAdmission;
    },
  ) {}

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
    return { params: normalised, series, runs, inline };
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
      service_version: SERVICE_VERSION,
      algorithm_version: kind.algorithmVersion,
      seed,
      result: null,
      result_digest: null,
      error: null,
      eta_seconds: null,
    };
    const estimate = kind.estimateSeconds?.(prep.params as never) ?? 0;
    const isAsync = opts.preferAsync || estimate > this.options.asyncSeconds;
    const admission = opts.limited ? this.options.admission : undefined;
    const ticket = admission?.admit(holder.owner, isAsync ? "async" : "sync") ?? null;
    if (isAsync) {
      try {
        for (const s of prep.inline.values()) await this.store.putSeries(s, holder);
        await this.store.putRun(run, holder);
      } catch (e) {
        ticket?.done(0);
        throw e;
      }
      const p = this.execute(kind, run, prep, holder, ticket).then(() => {}, () => {});
      this.pending.add(p);
      p.finally(() => this.pending.delete(p));
      return { status: 202, run, saved_series: [] };
    }
    let done: RunRecord;
    const t0 = performance.now();
    try {
      await ticket?.slot();
      done = await this.computeRun(kind, run, prep);
    } finally {
      ticket?.done((performance.now() - t0) / 1000);
    }
    // Only a successful synchronous run is stored (with its inline inputs).
    for (const s of prep.inline.values()) await this.store.putSeries(s, holder);
    await this.store.putRun(done, holder);
    const saved = await this.saveOutputs(kind, done, holder);
    return { status: 201, run: done, saved_series: saved };
  }

  /**
   * Compute a result from params and loaded inputs, without storing anything. A computation
   * still going after the wall-time limit is asked to stop and answered with a time-limit
   * problem (computed in this thread, it is refused once it returns).
   */
  async computeResult(
    kind: RunKind,
    params: Record<string, unknown>,
    inputs: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
  ): Promise<{ result: Record<string, unknown>; digest: string }> {
    let result: RunResult;
    let stop = false;
    let timer: ReturnType<typeof setTimeout> | undefined;
    const wallMs = this.#wallMs;
    const t0 = performance.now();
    try {
      const work = this.executor.compute(kind, params, inputs, {
        progress: () => {},
        isCancelled: () => stop,
        onStart: () => {},
      });
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
      throw asProblem(e);
    } finally {
      clearTimeout(timer);
    }
    if (performance.now() - t0 > wallMs) throw timeLimitProblem(this.options.wallSeconds!);
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

  private async execute(
    kind: RunKind,
    run: RunRecord,
    prep: { series: Record<string, StoredSeries>; runs: Record<string, RunRecord> },
    holder: HolderSpec,
    ticket: RunTicket | null,
  ): Promise<void> {
    const active: Active = {
      cancelled: false,
      listeners: new Set(),
      started: Date.now(),
      final: false,
    };
    this.active.set(run.id, active);
    let lastWrite = 0;
    let startedAt = 0;
    let timer: ReturnType<typeof setTimeout> | undefined;
    const publish = (e: RunEvent) => active.listeners.forEach((l) => l(e));
    /** Record the final status once; later outcomes (a run finishing after its limit) are dropped. */
    const finish = async (
      status: "succeeded" | "failed" | "cancelled",
      patch: Partial<RunRecord>,
    ): Promise<boolean> => {
      if (active.final) return false;
      active.final = true;
      await this.store.updateRun(run.id, {
        status,
        eta_seconds: null,
        updated_at: new Date().toISOString(),
        ...patch,
      });
      publish({ type: "status", id: run.id, status, progress: status === "succeeded" ? 1 : 0 });
      return true;
    };
    try {
      await ticket?.slot();
      if (active.cancelled) throw new CancelledError();
      const wallMs = this.#wallMs;
      if (Number.isFinite(wallMs)) {
        timer = setTimeout(() => {
          active.cancelled = true;
          finish("failed", { error: timeLimitProblem(this.options.wallSeconds!).problem })
            .catch(() => {});
        }, wallMs);
      }
      const t0 = performance.now();
      const result = await this.executor.compute(kind, run.params, prep, {
        onStart: () => {
          startedAt = Date.now();
          if (active.cancelled) return;
          this.store.updateRun(run.id, {
            status: "running",
            updated_at: new Date().toISOString(),
          }).catch(() => {});
          publish({ type: "status", id: run.id, status: "running", progress: 0 });
        },
        progress: (f) => {
          if (active.final) return;
          const elapsed = (Date.now() - startedAt) / 1000;
          const eta = f > 0.01 ? Math.max(0, elapsed * (1 - f) / f) : null;
          publish({
            type: "progress",
            id: run.id,
            status: "running",
            progress: f,
            eta_seconds: eta,
          });
          const t = Date.now();
          if (t - lastWrite > 250) {
            lastWrite = t;
            this.store.updateRun(run.id, {
              progress: f,
              eta_seconds: eta === null ? null : Math.round(eta * 10) / 10,
              updated_at: new Date().toISOString(),
            }).catch(() => {});
          }
        },
        isCancelled: () => active.cancelled,
      });
      if (performance.now() - t0 > wallMs) {
        // Computed in this thread, the timer could not fire before the computation returned.
        await finish("failed", { error: timeLimitProblem(this.options.wallSeconds!).problem });
        return;
      }
      if (active.cancelled) throw new CancelledError();
      const plain = toPlainJson(result) as Record<string, unknown>;
      const digest = await resultDigest(plain);
      if (
        await finish("succeeded", { progress: 1, result: plain, result_digest: digest })
      ) {
        const finished = await this.store.getRun(run.id);
        if (finished) await this.saveOutputs(kind, finished, holder);
      }
    } catch (e) {
      const cancelled = active.cancelled || e instanceof CancelledError;
      const status = cancelled ? "cancelled" : "failed";
      const problem = cancelled ? null : asProblem(e).problem;
      await finish(status, { error: problem });
    } finally {
      clearTimeout(timer);
      ticket?.done(startedAt ? (Date.now() - startedAt) / 1000 : 0);
      this.active.delete(run.id);
    }
  }

  /** Store the kind's auto-saved outputs as series derived from the run. */
  async saveOutputs(
    kind: RunKind,
    run: RunRecord,
    holder: HolderSpec = DEFAULT_HOLDER,
  ): Promise<{ output: string; id: string }[]> {
    const saved: { output: string; id: string }[] = [];
    const outputs = (run.result?.outputs ?? {}) as Record<string, OutputSeries>;
    for (const name of kind.autoSave ?? []) {
      const o = outputs[name];
      if (!o) continue;
      saved.push({ output: name, id: await this.saveOutput(run, name, holder) });
    }
    return saved;
  }

  /** Save one output of a finished run as a stored series held by `holder`; returns its id. */
  async saveOutput(
    run: RunRecord,
    name: string,
    holder: HolderSpec = DEFAULT_HOLDER,
  ): Promise<string> {
    const o = (run.result?.outputs as Record<string, OutputSeries> | undefined)?.[name];
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

  /** Ask a queued or running run to stop. */
  async cancel(id: string): Promise<RunRecord | null> {
    const run = await this.store.getRun(id);
    if (!run) return null;
    if (run.status !== "queued" && run.status !== "running") {
      throw new ProblemError(
        "conflict",
        `run ${id} has status ${run.status} and cannot be cancelled`,
      );
    }
    const a = this.active.get(id);
    if (a) {
      if (a.final) {
        throw new ProblemError("conflict", `run ${id} has just finished and cannot be cancelled`);
      }
      a.cancelled = true;
      a.final = true;
    }
    await this.store.updateRun(id, {
      status: "cancelled",
      eta_seconds: null,
      updated_at: new Date().toISOString(),
    });
    a?.listeners.forEach((l) =>
      l({ type: "status", id, status: "cancelled", progress: run.progress })
    );
    return await this.store.getRun(id);
  }

  subscribe(id: string, fn: (e: RunEvent) => void): (() => void) | null {
    const a = this.active.get(id);
    if (!a) return null;
    a.listeners.add(fn);
    return () => a.listeners.delete(fn);
  }

  /** Wait for all background runs (tests, shutdown). */
  async settle(): Promise<void> {
    while (this.pending.size) await Promise.all([...this.pending]);
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

/** Map an exception from compute to a problem: InputProblem and RangeError → 422. */
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
    const msg = (e as Error).message;
    return new ProblemError("validation", msg, { errors: [{ pointer: "", message: msg }] });
  }
  if (e instanceof CancelledError) return new ProblemError("conflict", "run cancelled");
  console.error(e);
  return new ProblemError(
    "internal",
    "The analysis failed unexpectedly; the error was logged with this request id.",
  );
}
