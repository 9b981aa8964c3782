/**
 * Analysis "solar-signal-maps": where, how strongly and at what lag a gridded field follows a
 * solar series, cell by cell, with the map's field significance by the false discovery rate
 * and by Monte Carlo (core/field).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import { seriesSpan } from "../common/field_axis.ts";
import { SolarSignalMapRequest } from "./request.ts";
import { SolarSignalMapResult } from "./result.ts";
import { computeSolarSignalMap, predictorOf } from "./compute.ts";
import { solarSignalMapChart } from "./chart.ts";
import { solarSignalMapTasks } from "./tasks.ts";
import { estimateSolarSignalMapsSeconds } from "./estimate.ts";

export const solarSignalMapKind = defineAnalysis({
  kind: "solar-signal-maps",
  path: "/v1/solar-signal-maps",
  algorithmVersion: "1",
  tag: "Gridded fields",
  summary: "Map of the solar signal in a gridded field, with field significance",
  description: "Brings the field (POST /v1/fields) and the solar series onto the field's " +
    "monthly or annual axis, removes the chosen trend (and each calendar month's mean from the " +
    "field), and at every cell and lag k of the window (k > 0: the field follows the Sun) " +
    "computes Pearson r, the regression slope in field units per unit of the solar series " +
    "with its standard error, the lag-1 autocorrelations of both, the effective sample size " +
    "(Bretherton et al. 1999) and the analytic p, optionally as partial statistics given " +
    "controls (ENSO, volcanic aerosol, a trend). Each cell is reported at its best lag. The " +
    "map as a whole is tested two ways: the false discovery rate (Benjamini & Hochberg 1995) " +
    "at α_FDR = 2·α_global (Wilks 2016), and a Monte Carlo test after Livezey & Chen (1983) " +
    "in which the same phase-randomised surrogate of the solar series is correlated with every " +
    "cell, counting the area-weighted fraction of locally significant cells (seeded; the " +
    "answer does not depend on the number of workers). Download the map as NetCDF-CF or CSV " +
    "from /v1/runs/{id}/map.",
  request: SolarSignalMapRequest,
  result: SolarSignalMapResult,
  runRefs: (p) => (p.solar_run ? [p.solar_run] : []),
  fieldRefs(p, ctx) {
    const series = [predictorOf(p, ctx), ...p.controls.map((c) => ctx.series(refId(c.series)))];
    const { from, to } = seriesSpan(series);
    return [{
      id: p.field,
      pointer: "/field",
      from,
      to,
      spanPointer: p.solar_run ? "/solar_run" : "/solar",
    }];
  },
  estimateSeconds: estimateSolarSignalMapsSeconds,
  compute: computeSolarSignalMap,
  chart: solarSignalMapChart,
  tasks: solarSignalMapTasks,
});
