/**
 * The option that puts a sunspot-number series on another version before an analysis uses it:
 * the time-dependent published conversion, or a constant factor (warned about when it crosses
 * a change of the V2/V1 ratio). The science is core/series/sunspot_number_versions.ts; this is
 * the request schema and the adapter a run kind calls.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import {
  convertSunspotNumberVersion,
  SUNSPOT_DRIFT_CORRECTED_FROM,
  SUNSPOT_V2_PER_V1,
  sunspotVersionFactor,
  versionBreaksWithin,
} from "../../core/series/sunspot_number_versions.ts";
import { InputProblem } from "../runs/kind.ts";

const Published = z.object({
  method: z.literal("published").openapi({
    description: "Time-dependent conversion between versions 1 and 2 with the factors of the " +
      "version 2 recalibration (Clette et al. 2014; Clette & Lefèvre 2016): V2 = V1 / 0.6, " +
      "× 1.14 in 1849–1867, and V1 / (0.6 × 1.177) from 1947; the pilot-station drift " +
      "corrected after 1981 is not included (several percent)",
  }),
  note: z.string().max(400).optional(),
});

const Constant = z.object({
  method: z.literal("constant").default("constant").openapi({
    description: "One factor for every time (warned about when the series crosses 1947, " +
      "where the V2/V1 ratio changes by about 18 %)",
  }),
  factor: z.number().positive().max(10).openapi({
    description: "Multiply the sunspot series by this to put it on the target version",
  }),
  note: z.string().max(400).optional(),
});

/** `sunspot_conversion` of a request: `{ "method": "published" }` or `{ "factor": 1.667 }`. */
export const SunspotConversion = z.union([Published, Constant]).openapi("SunspotConversion", {
  description: 'How to put the sunspot series on the version needed: `{"method": "published"}` ' +
    'for the time-dependent conversion, or `{"factor": f}` for a constant factor',
});

export type SunspotConversion = z.output<typeof SunspotConversion>;

/** A converted sunspot series, the conversion in words, and warnings for the result. */
export interface ConvertedSunspots {
  value: Float64Array;
  label: string;
  warnings: string[];
}

/**
 * Put a sunspot series on another version.
 *
 * @param series the series (decimal-year times, values in version `from`)
 * @param from version of the series, as declared
 * @param to version needed
 * @param conversion the request's option
 * @param pointer where the option sits in the request, for problems
 * @throws {InputProblem} when the published conversion is asked between other versions
 */
export function applySunspotConversion(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  from: string,
  to: string,
  conversion: SunspotConversion,
  pointer: string,
): ConvertedSunspots {
  const note = conversion.note ? ` (${conversion.note})` : "";
  if (conversion.method === "constant") {
    const f = conversion.factor;
    return {
      value: Float64Array.from(series.value, (v) => v * f),
      label: `sunspot version ${from} × ${f} → version ${to}${note}`,
      warnings: constantFactorWarnings(series, f),
    };
  }
  if (!isVersion(from) || !isVersion(to)) {
    throw new InputProblem(
      `${pointer}/method`,
      `the published conversion is between versions "1" and "2" of the international ` +
        `sunspot number; here it would be from "${from}" to "${to}": give a constant factor`,
    );
  }
  const warnings: string[] = [];
  const last = lastFinite(series);
  if (last !== null && last >= SUNSPOT_DRIFT_CORRECTED_FROM) {
    warnings.push(
      `the published sunspot-number conversion leaves out the pilot-station drift that ` +
        `version 2 corrects after ${SUNSPOT_DRIFT_CORRECTED_FROM} (Clette et al. 2016): ` +
        "converted values after it can differ from version 2 by several percent.",
    );
  }
  const factors = SUNSPOT_V2_PER_V1.map((s) =>
    `${segmentLabel(s.start, s.end)} ×${round3(from === "1" ? s.v2PerV1 : 1 / s.v2PerV1)}`
  ).join(", ");
  return {
    value: convertSunspotNumberVersion(series.time, series.value, from, to),
    label: `sunspot version ${from} → version ${to} by the published time-dependent factors ` +
      `(${factors}; Clette et al. 2014; Clette & Lefèvre 2016)${note}`,
    warnings,
  };
}

/** Warnings for a constant factor applied across a change of the V2/V1 ratio. */
function constantFactorWarnings(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  f: number,
): string[] {
  const first = firstFinite(series), last = lastFinite(series);
  if (first === null || last === null) return [];
  return versionBreaksWithin(first, last).map((b) => {
    const before = sunspotVersionFactor(b - 1e-9, "1", "2");
    const after = sunspotVersionFactor(b, "1", "2");
    const step = Math.round((Math.max(before, after) / Math.min(before, after) - 1) * 100);
    return `the constant sunspot conversion factor ${f} is applied across ${b}, where the ` +
      `ratio of version 2 to version 1 changes by about ${step} % (Clette & Lefèvre 2016): ` +
      "the converted series has a step there. Use the published time-dependent conversion " +
      '(sunspot_conversion {"method": "published"}).';
  });
}

function isVersion(v: string): v is "1" | "2" {
  return v === "1" || v === "2";
}

function firstFinite(s: { time: ArrayLike<number>; value: ArrayLike<number> }): number | null {
  for (let i = 0; i < s.time.length; i++) if (Number.isFinite(s.value[i])) return s.time[i];
  return null;
}

function lastFinite(s: { time: ArrayLike<number>; value: ArrayLike<number> }): number | null {
  for (let i = s.time.length - 1; i >= 0; i--) if (Number.isFinite(s.value[i])) return s.time[i];
  return null;
}

function segmentLabel(start: number, end: number): string {
  if (start === -Infinity) return `before ${end}`;
  if (end === Infinity) return `from ${start}`;
  return `${start}–${end - 1}`;
}

function round3(x: number): number {
  return Math.round(x * 1000) / 1000;
}
