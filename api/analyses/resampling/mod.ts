/**
 * Analysis "resampling": calendar-period means (daily → monthly → annual) with a
 * minimum-coverage rule, reported per output period (core/series/resample_means.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { ResampleRequest } from "./request.ts";
import { ResampleResult } from "./result.ts";
import { computeResampling } from "./compute.ts";
import { estimateResamplingSeconds } from "./estimate.ts";

export const resampleKind = defineAnalysis({
  kind: "resampling",
  path: "/v1/resampling",
  algorithmVersion: "1",
  tag: "Series operations",
  summary: "Calendar-period means with a minimum-coverage rule",
  description: "Averages a series into monthly or annual means (daily to monthly to annual; " +
    "daily to annual in two stages). A period with too few values (default: fewer than 20 " +
    "days for a month, 10 months for a year) is a gap (null), never a mean of too few values. " +
    "Each output period reports its count, the count it needed, and whether it was covered. " +
    "Uncertainties, when the input has them, combine as independent errors and exclude " +
    "sampling error. The `resampled` output is saved as a new series derived from the run.",
  request: ResampleRequest,
  result: ResampleResult,
  autoSave: ["resampled"],
  estimateSeconds: estimateResamplingSeconds,
  compute: computeResampling,
});
