/**
 * A CF-1.10 dataset from a series-like result (a stored series, or a run output), on a chosen
 * CF calendar, ready for the NetCDF-3 writer (core/cf/netcdf3_write.ts):
 *
 * - `time` in "days since 1850-01-01 00:00:00" with its `calendar`, `axis: T`, and `bounds:
 *   time_bnds` for period means (daily, monthly, annual series), placed on the calendar by
 *   `calendarAxis` (core/cf), whose rule is stated in the global `calendar_conversion`;
 * - the values as a double variable with `long_name`, UDUNITS `units`, a CF `standard_name`
 *   where the table has one, `cell_methods: "time: mean"` for period means ("time: point" for
 *   instants) and `_FillValue` NaN for missing values;
 * - the one-sigma uncertainty, and the bounds of a stated interval, as ancillary variables
 *   (CF conventions 1.10, §3.4), the uncertainty with the `standard_error` modifier;
 * - optionally an ensemble: `realization` members × time (float), written one member at a time;
 * - global attributes: Conventions, title, source (sunlag and its version), history, references,
 *   comment (what the numbers are not), run id, result digest, warnings and cautions.
 *
 * @module
 */
import { calendarAxis } from "../../core/cf/calendar_axis.ts";
import { cfStandardName } from "../../core/cf/cf_standard_names.ts";
import { ncNumber, ncText, type NetcdfAttribute } from "../../core/cf/netcdf_model.ts";
import type { NetcdfWriteDataset, NetcdfWriteVariable } from "../../core/cf/netcdf3_write.ts";
import {
  type CfCalendar,
  cfDayNumber,
  inferResolution,
  type TimeResolution,
} from "../../core/time/mod.ts";
import { SERVICE_VERSION } from "../version.ts";

/** The series-like input: decimal-year times (proleptic Gregorian) and values. */
export interface SeriesLike {
  name: string;
  quantity: string;
  units: string;
  time: ArrayLike<number>;
  /** null or NaN where missing. */
  value: ArrayLike<number | null>;
  uncertainty?: ArrayLike<number | null> | null;
  lower?: ArrayLike<number | null> | null;
  upper?: ArrayLike<number | null> | null;
  /** What `lower`/`upper` bound, e.g. "95 % prediction interval". */
  interval?: string | null;
  description?: string | null;
  /** Inferred from `time` when absent. */
  resolution?: TimeResolution;
}

/** Members of an ensemble, streamed one at a time. */
export interface EnsembleSource {
  /** Number of members (the `realization` dimension). */
  members: number;
  /** Values of member `k` (0-based) on the input's time axis (same length as `time`). */
  member(k: number): ArrayLike<number>;
  /** Label of each member's number (default 1..members). */
  numbers?: ArrayLike<number>;
}

/** Where the data come from, for the global attributes. */
export interface Provenance {
  title: string;
  /** One line per event, oldest first; no timestamps unless they come from a record. */
  history: string[];
  references: string[];
  /** Run id and result digest, for run outputs. */
  runId?: string;
  resultDigest?: string;
  seriesId?: string;
  /** ISO 8601 creation time from the run record (never the clock). */
  dateCreated?: string;
  warnings: string[];
  cautions: string[];
  /** Further global text attributes (name, value), e.g. what an uncertainty band contains. */
  attributes?: [string, string][];
}

/** Options of {@link buildSeriesDataset}. */
export interface SeriesDatasetOptions {
  /** Target calendar (default standard). */
  calendar?: CfCalendar;
  /** Name of the data variable (default: from the quantity). */
  variable?: string;
  ensemble?: EnsembleSource;
}

/** The reference of every time axis sunlag writes. */
export const TIME_REFERENCE = { year: 1850, month: 1, day: 1 } as const;
/** The CF version the files declare. */
export const CF_CONVENTIONS = "CF-1.10";

/** What every file says about what its numbers are not (carried in `comment`). */
export const STANDING_CAUTIONS =
  "Correlation is not attribution; solar reconstructions before the satellite era are " +
  "model-dependent; these results do not replace peer-reviewed assessment.";

/** A CF-safe variable name from any label. */
export function cfVariableName(label: string, taken: Set<string> = new Set()): string {
  let s = label.normalize("NFKD").replace(/[^A-Za-z0-9_]+/g, "_").replace(/^_+|_+$/g, "");
  if (!/^[A-Za-z]/.test(s)) s = `v_${s}`;
  s = s.slice(0, 60) || "value";
  let out = s, k = 2;
  while (taken.has(out)) out = `${s}_${k++}`;
  return out;
}

function column(xs: ArrayLike<number | null>, kept: Int32Array): Float64Array {
  return Float64Array.from(kept, (i) => {
    const v = xs[i];
    return v === null || v === undefined || !Number.isFinite(v) ? NaN : v;
  });
}

/** The CF time axis of a dataset: the placed axis, its variables and dimensions. */
export interface CfTimeAxisVariables {
  axis: ReturnType<typeof calendarAxis>;
  /** True for period means (with `time_bnds`). */
  bounded: boolean;
  /** The `cell_methods` of data on this axis: "time: mean" or "time: point". */
  period: string;
  /** `time` and, for period means, `time_bnds`. */
  variables: NetcdfWriteVariable[];
  /** `time` and, for period means, `bnds`. */
  dimensions: { name: string; size: number }[];
}

/**
 * The `time` coordinate (days since 1850-01-01 on `calendar`, `axis: T`) and, for period
 * means, its `time_bnds`, for decimal-year times placed on the calendar by `calendarAxis`.
 *
 * @throws {CfTimeError} when the calendar cannot hold the resolution
 */
export function timeAxisOf(
  time: ArrayLike<number>,
  resolution: TimeResolution | undefined,
  calendar: CfCalendar,
): CfTimeAxisVariables {
  const res = resolution ?? (time.length >= 2 ? inferResolution(time) : "irregular");
  const axis = calendarAxis(time, res, calendar);
  const refDay = cfDayNumber(
    calendar,
    TIME_REFERENCE.year,
    TIME_REFERENCE.month,
    TIME_REFERENCE.day,
  );
  const n = axis.kept.length;
  const bounded = axis.start !== null;
  const variables: NetcdfWriteVariable[] = [{
    name: "time",
    type: "double",
    dimensions: ["time"],
    attributes: [
      ncText("standard_name", "time"),
      ncText("long_name", "time"),
      ncText("units", "days since 1850-01-01 00:00:00"),
      ncText("calendar", calendar),
      ncText("axis", "T"),
      ...(bounded ? [ncText("bounds", "time_bnds")] : []),
    ],
    data: Float64Array.from(axis.time, (d) => d - refDay),
  }];
  const dimensions = [{ name: "time", size: n }];
  if (bounded) {
    const b = new Float64Array(2 * n);
    for (let k = 0; k < n; k++) {
      b[2 * k] = axis.start![k] - refDay;
      b[2 * k + 1] = axis.end![k] - refDay;
    }
    variables.push({ name: "time_bnds", type: "double", dimensions: ["time", "bnds"], data: b });
    dimensions.push({ name: "bnds", size: 2 });
  }
  return {
    axis,
    bounded,
    period: bounded ? "time: mean" : "time: point",
    variables,
    dimensions,
  };
}

/**
 * Build the CF dataset of a series on a calendar.
 *
 * @param s the series
 * @param prov provenance for the global attributes
 * @param options calendar, variable name, ensemble
 * @returns the dataset, the calendar-conversion text and the input indices dropped
 * @throws {CfTimeError} when the calendar cannot hold the series' resolution (see `calendarAxis`)
 */
export function buildSeriesDataset(
  s: SeriesLike,
  prov: Provenance,
  options: SeriesDatasetOptions = {},
): { dataset: NetcdfWriteDataset; method: string; dropped: number[] } {
  const calendar = options.calendar ?? "standard";
  const t = timeAxisOf(s.time, s.resolution, calendar);
  const { axis, period } = t;
  const n = axis.kept.length;
  const taken = new Set(["time", "time_bnds", "bnds", "realization"]);
  const name = options.variable ??
    cfVariableName(s.quantity === "other" ? s.name : s.quantity, taken);
  taken.add(name);
  const sn = cfStandardName(s.quantity);
  const vars: NetcdfWriteVariable[] = [...t.variables];
  const ancillary: string[] = [];
  const extra: NetcdfWriteVariable[] = [];
  const fill = ncNumber("_FillValue", "double", NaN);
  if (s.uncertainty) {
    const u = cfVariableName(`${name}_uncertainty`, taken);
    taken.add(u);
    ancillary.push(u);
    extra.push({
      name: u,
      type: "double",
      dimensions: ["time"],
      attributes: [
        fill,
        ncText("long_name", `standard uncertainty (1 sigma) of ${s.name}`),
        ncText("units", s.units),
        ...(sn ? [ncText("standard_name", `${sn} standard_error`)] : []),
        ncText("cell_methods", period),
      ],
      data: column(s.uncertainty, axis.kept),
    });
  }
  for (const [key, arr] of [["lower", s.lower], ["upper", s.upper]] as const) {
    if (!arr) continue;
    const b = cfVariableName(`${name}_${key}`, taken);
    taken.add(b);
    ancillary.push(b);
    extra.push({
      name: b,
      type: "double",
      dimensions: ["time"],
      attributes: [
        fill,
        ncText("long_name", `${key} bound of the ${s.interval ?? "stated interval"} of ${s.name}`),
        ncText("units", s.units),
        ncText("cell_methods", period),
      ],
      data: column(arr, axis.kept),
    });
  }
  const dims = [...t.dimensions];
  const ens = options.ensemble;
  if (ens) {
    const e = cfVariableName(`${name}_realizations`, taken);
    taken.add(e);
    dims.push({ name: "realization", size: ens.members });
    extra.push({
      name: "realization",
      type: "int",
      dimensions: ["realization"],
      attributes: [ncText("standard_name", "realization"), ncText("long_name", "ensemble member")],
      data: ens.numbers ?? Int32Array.from({ length: ens.members }, (_, k) => k + 1),
    });
    extra.push({
      name: e,
      type: "float",
      dimensions: ["realization", "time"],
      attributes: [
        ncNumber("_FillValue", "float", NaN),
        ncText("long_name", `${s.name}: ensemble members`),
        ncText("units", s.units),
        ...(sn ? [ncText("standard_name", sn)] : []),
        ncText("cell_methods", period),
      ],
      data: {
        rows: ens.members,
        row: (k) => {
          const m = ens.member(k);
          const out = new Float32Array(n);
          for (let j = 0; j < n; j++) {
            const v = m[axis.kept[j]];
            out[j] = Number.isFinite(v) ? v : NaN;
          }
          return out;
        },
      },
    });
  }
  const dataAttrs: NetcdfAttribute[] = [
    fill,
    ncText("long_name", s.name),
    ncText("units", s.units),
    ...(sn ? [ncText("standard_name", sn)] : []),
    ncText("cell_methods", period),
    ...(ancillary.length ? [ncText("ancillary_variables", ancillary.join(" "))] : []),
    ...(s.description ? [ncText("comment", s.description)] : []),
  ];
  vars.push({
    name,
    type: "double",
    dimensions: ["time"],
    attributes: dataAttrs,
    data: column(s.value, axis.kept),
  });
  vars.push(...extra);
  const global = provenanceAttributes(prov, [ncText("calendar_conversion", axis.method)]);
  return {
    dataset: { dimensions: dims, attributes: global, variables: vars },
    method: axis.method,
    dropped: axis.dropped,
  };
}

/**
 * The global attributes of a file sunlag writes: Conventions, title, source, history,
 * references, the standing cautions (comment), then `extra`, then the ids, digest, creation
 * time, warnings and cautions of the provenance.
 *
 * @param prov where the data come from
 * @param extra attributes placed after the comment (e.g. calendar_conversion)
 * @returns the attributes in a fixed order (the bytes of a file depend only on its content)
 */
export function provenanceAttributes(
  prov: Provenance,
  extra: NetcdfAttribute[] = [],
): NetcdfAttribute[] {
  return [
    ncText("Conventions", CF_CONVENTIONS),
    ncText("title", prov.title),
    ncText("source", `sunlag ${SERVICE_VERSION}`),
    ncText("history", prov.history.join("\n")),
    ncText("references", prov.references.join("\n")),
    ncText("comment", STANDING_CAUTIONS),
    ...extra,
    ...(prov.seriesId ? [ncText("series_id", prov.seriesId)] : []),
    ...(prov.runId ? [ncText("run_id", prov.runId)] : []),
    ...(prov.resultDigest ? [ncText("result_digest", prov.resultDigest)] : []),
    ...(prov.dateCreated ? [ncText("date_created", prov.dateCreated)] : []),
    ncText("warnings", prov.warnings.length ? prov.warnings.join("\n") : "none"),
    ncText("cautions", prov.cautions.length ? prov.cautions.join("\n") : "none"),
    ...(prov.attributes ?? []).map(([k, v]) => ncText(k, v)),
  ];
}
