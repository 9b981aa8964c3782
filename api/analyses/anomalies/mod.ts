/**
 * Analysis "anomalies": differences from a stated base period, as one base mean or a
 * calendar-month climatology (core/series/anomalies_from_base_period.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { AnomalyRequest } from "./request.ts";
import { AnomalyResult } from "./result.ts";
import { computeAnomalies } from "./compute.ts";
import { estimateAnomaliesSeconds } from "./estimate.ts";

export const anomalyKind = defineAnalysis({
  kind: "anomalies",
  path: "/v1/anomalies",
  algorithmVersion: "1",
  tag: "Series operations",
  summary: "Anomalies relative to a stated base period",
  description: "Subtracts the base-period mean (or, for daily and monthly data, the " +
    "base-period mean of each calendar month) from every point. The base period must hold " +
    "data (every calendar month of it, for a monthly climatology). The result states the base " +
    "means and how many points each rests on; the `anomalies` output is saved as a new series. " +
    "Temperatures become temperature anomalies (K); other quantities keep their quantity.",
  request: AnomalyRequest,
  result: AnomalyResult,
  autoSave: ["anomalies"],
  estimateSeconds: estimateAnomaliesSeconds,
  compute: computeAnomalies,
});
