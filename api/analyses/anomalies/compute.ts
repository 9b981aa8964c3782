/**
 * Adapter of the "anomalies" analysis: the base period's bounds from the request, the
 * anomalies from core (core/series/anomalies_from_base_period.ts), coverage warnings and the
 * result.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import { anomaliesFromBasePeriod } from "../../../core/series/mod.ts";
import { formatIsoTime, parseIsoTime, periodBounds } from "../../../core/time/mod.ts";
import { withInputPointers } from "../common/input_problem.ts";
import type { AnomalyParams } from "./request.ts";
import type { AnomalyResultIn } from "./result.ts";

/** Under half a day in any year: steps back from an exclusive end into its last day. */
const HALF_DAY = 0.5 / 366;

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

/** A base-period bound as a decimal year: an ISO period's start, or its end for `end`. */
function bound(v: string | number, which: "start" | "end"): number {
  if (typeof v === "number") {
    if (!Number.isFinite(v)) {
      throw new InputProblem(`/base/${which}`, "must be a finite decimal year");
    }
    return v;
  }
  try {
    const p = parseIsoTime(v);
    return which === "start" ? p.start : p.end;
  } catch (e) {
    throw new InputProblem(`/base/${which}`, (e as Error).message);
  }
}

/** Subtract the base-period mean or calendar-month climatology from the series. */
export function computeAnomalies(params: AnomalyParams, ctx: RunContext): AnomalyResultIn {
  const s = ctx.series(refId(params.series));
  const start = bound(params.base.start, "start"), end = bound(params.base.end, "end");
  if (!(start < end)) {
    throw new InputProblem(
      "/base/end",
      `the base period must end after it starts (${start}..${end})`,
    );
  }
  const mode = params.climatology === "auto"
    ? (s.resolution === "monthly" || s.resolution === "daily" ? "monthly" : "mean")
    : params.climatology;
  const a = withInputPointers(
    { base: "/base", climatology: "/climatology", "*": "/series" },
    () => anomaliesFromBasePeriod(s, { start, end }, { climatology: mode }),
  );
  const warnings: string[] = [];
  // the periods the series' first and last points stand for (a monthly series covers its
  // first month from the month's start, not from its mid-month time stamp)
  const covStart = periodBounds(s.start, s.resolution).start;
  const covEnd = periodBounds(s.end, s.resolution).end;
  if (start < covStart - 1e-9 || end > covEnd + 1e-9) {
    warnings.push(
      `the base period ${formatIsoTime(start, "daily")} to ${
        formatIsoTime(end - HALF_DAY, "daily")
      } reaches beyond the series (${formatIsoTime(s.start, s.resolution)} to ${
        formatIsoTime(s.end, s.resolution)
      }); the base means rest on the part that has data`,
    );
  }
  if (mode === "monthly") {
    const most = Math.max(...a.baseCounts);
    const thin = [...a.baseCounts.keys()].filter((g) => a.baseCounts[g] < 0.8 * most);
    if (thin.length) {
      warnings.push(
        `calendar months with under 80 % of the base-period coverage of the best month: ${
          thin.map((g) => `${MONTHS[g]} (${a.baseCounts[g]})`).join(", ")
        }`,
      );
    }
  }
  if (a.value.length < 2) throw new InputProblem("/series", "needs at least 2 points");
  const quantity = s.quantity === "temperature" ? "temperature_anomaly" : s.quantity;
  const label = `${formatIsoTime(start, "daily")} to ${formatIsoTime(end - HALF_DAY, "daily")}`;
  return {
    input: { id: s.id, name: s.name, resolution: s.resolution, n: s.n },
    base: {
      start,
      end,
      start_date: formatIsoTime(start, "daily"),
      last_date: formatIsoTime(end - HALF_DAY, "daily"),
      climatology: mode,
      means: Array.from(a.baseMeans, (mean, g) => ({
        ...(mode === "monthly" ? { month: g + 1 } : {}),
        mean,
        count: a.baseCounts[g],
      })),
    },
    outputs: {
      anomalies: {
        name: `${s.name} (anomaly, base ${label})`,
        quantity,
        units: s.units,
        time: Array.from(s.time),
        value: Array.from(a.value),
        ...(s.uncertainty ? { uncertainty: Array.from(s.uncertainty) } : {}),
        description: `Anomalies of series ${s.id} relative to the ${
          mode === "monthly" ? "calendar-month climatology" : "mean"
        } of the base period ${label}.`,
      },
      baseline: {
        name: `${s.name} (base-period ${mode === "monthly" ? "climatology" : "mean"})`,
        quantity: s.quantity,
        units: s.units,
        time: Array.from(s.time),
        value: Array.from(a.baseline),
        description: `The value subtracted at each point (base period ${label}).`,
      },
    },
    warnings,
    cautions: [
      "Anomalies depend on the base period: compare only anomalies taken on the same base. " +
      "Point uncertainties are carried over unchanged; the uncertainty of the base mean is " +
      "not added.",
    ],
  };
}
