/**
 * The contract every analysis ("run kind") implements. The generic machinery in
 * `api/runs/` validates the request with `request`, stores inline series and replaces them by
 * their ids, loads every referenced series and run, calls `compute`, and records the run
 * (parameters with defaults, input ids, versions, seed, result, result digest). Replay,
 * bundles, async execution in workers and charts all work from this contract, so `compute`
 * must be a pure function of (params, loaded inputs): no clock, no store, no global state.
 *
 * @module
 */
import type { z } from "@hono/zod-openapi";
import type { FieldMeta, RunRecord, StoredSeries } from "../store/types.ts";
import type { ChartSpec } from "../charts/chart.ts";
import type { StopOptions } from "../../core/stop_signal.ts";
import type { MapChartSpec } from "../charts/map_chart.ts";

/** A series-like part of a result; fetchable as JSON/CSV and savable as a stored series. */
export interface OutputSeries {
  name: string;
  quantity: string;
  units: string;
  /** Decimal years (proleptic Gregorian). */
  time: number[];
  /** null where the value is undefined (e.g. the ends of a 13-month smoothing). */
  value: (number | null)[];
  uncertainty?: (number | null)[];
  /** Lower/upper bounds of a stated interval (e.g. 95 % prediction interval). */
  lower?: (number | null)[];
  upper?: (number | null)[];
  /** Human description of the interval, e.g. "95 % prediction interval". */
  interval?: string;
  /**
   * What `time` measures. Default `decimal_year` (calendar time). `years_from_epoch` (a
   * superposed-epoch composite) and `model_years` (years from the start of an idealised
   * experiment) are not calendar times: such outputs have no ISO dates and cannot be saved as
   * stored series.
   */
  time_axis?: "decimal_year" | "years_from_epoch" | "model_years";
  description?: string;
}

/** What `compute` returns. Everything must be JSON (no NaN/Infinity: use null). */
export interface RunResult {
  [key: string]: unknown;
  /** Series-like outputs by name. */
  outputs?: Record<string, OutputSeries>;
  /** Plausibility or data warnings, never silent. */
  warnings?: string[];
  /** Scientific cautions shown beside the numbers. */
  cautions?: string[];
}

/**
 * A stored gridded field as an analysis sees it: its metadata and coordinates, and the values
 * of the time steps the analysis asked for (see `RunKind.fieldRefs`), loaded before compute.
 * Structured-clonable; its typed arrays are transferred to the worker that computes.
 */
export interface LoadedField {
  meta: FieldMeta;
  lat: Float64Array;
  lon: Float64Array;
  lat_bounds: Float64Array | null;
  lon_bounds: Float64Array | null;
  /** Index in the stored field of the first loaded time step. */
  stepStart: number;
  /** Decimal years of the loaded steps. */
  time: Float64Array;
  /** Loaded steps × n_lat × n_lon values, time-major, latitude-major; NaN where missing. */
  values: Float32Array;
}

/**
 * A field a request uses, and the span of time the analysis needs from it (decimal years,
 * inclusive; default the whole field). Only the stored blocks that overlap are read.
 */
export interface FieldRef {
  id: string;
  /** JSON Pointer of the field id in the request. */
  pointer: string;
  from?: number;
  to?: number;
  /** Load at most this many steps from the start of the span (e.g. 1 for a mask). */
  firstSteps?: number;
  /** Where the span came from, for the problem when the field has no step in it. */
  spanPointer?: string;
}

/** The loaded inputs of a run. */
export interface RunInputs {
  series: Record<string, StoredSeries>;
  runs: Record<string, RunRecord>;
  fields?: Record<string, LoadedField>;
}

export interface RunContext {
  /** A loaded input series by id (every series id found in params is preloaded). */
  series(id: string): StoredSeries;
  /** A loaded input run by id (those listed by `RunKind.runRefs`). */
  run(id: string): RunRecord;
  /** A loaded gridded field by id (those listed by `RunKind.fieldRefs`). */
  field(id: string): LoadedField;
  /**
   * The result of a loaded input run, parsed with the result schema of the analysis that made
   * it: typed, and refused (a problem at `pointer`) when the run is of another kind or has no
   * result. Use this instead of reading `run(id).result` by field-name strings.
   */
  resultOf<K extends RunKind>(kind: K, id: string, pointer: string): ResultOf<K>;
  /**
   * Report progress in [0, 1]. Cheap; call it as often as you like.
   *
   * The first report (or the first `parallel` map) also marks the end of the input checks: an
   * asynchronous request is checked before it is stored by running `compute` up to that point
   * (`RunService.preflight`), so a run refused for its input is never stored. An analysis
   * therefore checks its inputs before it reports progress, and reports progress before work
   * that may take long.
   */
  progress(fraction: number): void;
  /**
   * True once the run must stop: it was cancelled, or it ran past the run time limit. Long
   * loops check it and throw `new CancelledError()`; core functions with long loops take it
   * as their `shouldStop` option (core/stop_signal.ts), and their `StoppedError` counts as a
   * cancellation. In a worker it reads a flag shared with the pool, so it turns true while
   * the computation runs.
   */
  cancelled(): boolean;
  /**
   * Map a worker task (declared in an analysis' `tasks`) over chunks of work, on the
   * service's pool of Web Workers when there is one, else in this thread. Results come back in
   * input order, so the answer never depends on the number of workers. Typed arrays inside
   * inputs are transferred, not copied, when `transfer` is true.
   */
  parallel<I, O>(task: string, inputs: I[], options?: { transfer?: boolean }): Promise<O[]>;
}

export class CancelledError extends Error {
  constructor() {
    super("run cancelled");
    this.name = "CancelledError";
  }
}

/**
 * A domain input problem found while computing (a 422 for the user, naming the field).
 * `pointer` is a JSON Pointer into the request body, e.g. "/window".
 */
export class InputProblem extends Error {
  constructor(readonly pointer: string, message: string, readonly extra?: Record<string, unknown>) {
    super(message);
    this.name = "InputProblem";
  }
}

/**
 * A named pure worker task: structured-clonable input and output (typed arrays transferred).
 * The second argument carries `shouldStop`, which turns true when the run that asked for the
 * task is cancelled or out of time: a task with a long loop polls it (core functions take it
 * as their `StopOptions`) so that the worker is free again within milliseconds.
 */
// deno-lint-ignore no-explicit-any
export type Task = (input: any, control?: StopOptions) => any;

/** What an estimate may look at: the loaded inputs of the run (their sizes, their times). */
export interface EstimateInputs {
  /** A loaded input series by id (every series id found in params). */
  series(id: string): StoredSeries;
  /** A loaded input run by id (those listed by `RunKind.runRefs`). */
  run(id: string): RunRecord;
  /** A loaded gridded field by id (those listed by `RunKind.fieldRefs`; its loaded steps). */
  field(id: string): LoadedField;
  /** The result of a loaded input run, typed (as `RunContext.resultOf`). */
  resultOf<K extends RunKind>(kind: K, id: string, pointer: string): ResultOf<K>;
}

/** An analysis' chart, typed on its result. */
export interface KindChart<T> {
  /** True when the chart draws the run's input series too (the chart route loads them). */
  needsInputs?: boolean;
  /** The chart, or null to fall back to the generic chart of the run's outputs. */
  build(run: RunRecord, result: T, inputs: StoredSeries[]): ChartSpec | MapChartSpec | null;
  /**
   * Other charts of the same result, chosen with `?view=<name>` on the chart route (names in
   * snake_case); null from `build` means the result has nothing to draw in that view.
   */
  views?: Record<string, {
    description: string;
    build(run: RunRecord, result: T, inputs: StoredSeries[]): ChartSpec | MapChartSpec | null;
  }>;
}

/** The typed (parsed) result of an analysis. */
// deno-lint-ignore no-explicit-any
export type ResultOf<K extends RunKind> = K extends RunKind<any, infer R> ? z.output<R> : never;

/**
 * An analysis ("run kind"). Each lives in one folder `api/analyses/<kind>/` (request schema,
 * result schema, thin adapter calling core, chart, worker tasks) and is listed once in
 * `api/analyses/registry.ts`; routes, OpenAPI, replay, bundles, workers, charts and the page
 * derive from that list.
 */
// deno-lint-ignore no-explicit-any
export interface RunKind<S extends z.ZodType = any, R extends z.ZodType = any> {
  /** Stable machine name, e.g. "smoothing". */
  kind: string;
  /** POST path that creates the run, e.g. "/v1/smoothing". */
  path: string;
  /** Bump when numbers may change for the same inputs. */
  algorithmVersion: string;
  /** OpenAPI tag, e.g. "Solar cycles". */
  tag: string;
  /** Listed first among the page's analyses (the main questions a researcher asks). */
  featured?: boolean;
  summary: string;
  description: string;
  /** Request body schema; defaults filled by parsing. Series references use `seriesRef()`. */
  request: S;
  /** Ids of runs the params refer to (loaded into the context), default none. */
  runRefs?(params: z.output<S>): string[];
  /**
   * Gridded fields the params use and the time span needed from each (loaded into the
   * context after the series and runs, which `inputs` holds, so the span can follow them).
   */
  fieldRefs?(params: z.output<S>, inputs: RunContext): FieldRef[];
  /**
   * The run's computing time in seconds on one core of the reference machine, from a cost
   * model of its real work (points × grid × replicates ...; see api/runs/estimate.ts). The
   * service scales it by the measured speed of the machine and runs a request asynchronously
   * (cancellable) when the result exceeds `SUNLAG_ASYNC_SECONDS`. Tested against measured
   * times to within a factor of three.
   */
  estimateSeconds?(params: z.output<S>, inputs: EstimateInputs): number;
  /** Names of outputs saved automatically as new series with lineage. */
  autoSave?: string[];
  /**
   * Schema of the result as stored and served (JSON: arrays of numbers, null for a documented
   * undefined value). Published in OpenAPI; tests parse every kind's result with it.
   */
  result: R;
  compute(params: z.output<S>, ctx: RunContext): Promise<z.input<R>> | z.input<R>;
  /** The specialised chart; without it the generic chart of the outputs is drawn. */
  chart?: KindChart<z.output<R>>;
  /** Worker tasks this analysis maps over chunks with `ctx.parallel`, by globally unique name. */
  tasks?: Record<string, Task>;
}

/** Declare an analysis with its request and result types inferred from its schemas. */
export function defineAnalysis<S extends z.ZodType, R extends z.ZodType>(
  def: RunKind<S, R>,
): RunKind<S, R> {
  return def;
}
