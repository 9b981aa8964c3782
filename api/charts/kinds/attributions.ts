/**
 * Chart of an "attributions" run: each regressor's contribution to the climate series over
 * time (β × the lagged regressor minus its mean), in the climate series' units, with each
 * regressor's lag and coefficient interval in the legend and the solar max-minus-min estimate
 * in the notes.
 *
 * @module
 */
import type { RunRecord } from "../../store/types.ts";
import type { ChartSpec, Layer } from "../chart.ts";
import { runDescription, runNotes } from "../run_common.ts";
import { numOrNull, obj, objects, outputsOf, str } from "../read.ts";
import { axisLabel, quantityLabel, unitsLabel } from "../labels.ts";

function g3(v: number | null): string {
  return v === null ? "n/a" : v.toPrecision(3);
}

/** Chart spec, or null when the result has no contribution outputs. */
export function attributionsChart(run: RunRecord): ChartSpec | null {
  const r = run.result;
  if (!r) return null;
  const contributions = outputsOf(r).filter(([k]) => k.startsWith("contribution_"));
  if (!contributions.length) return null;
  const coefs = objects(r.coefficients) ?? [];
  const unit = str(r.lag_unit) ?? "";
  const layers: Layer[] = [{ type: "hline", y: 0, color: "foreground", dash: "solid" }];
  contributions.forEach(([key, o], i) => {
    const name = key.slice("contribution_".length);
    const c = coefs.find((q) => q.name === name);
    const lag = numOrNull(c?.lag);
    const lagText = lag !== null && lag !== 0 ? `, lag ${lag} ${unit}` : "";
    const p = numOrNull(c?.p_value);
    layers.push({
      type: "line",
      label: `${name}${lagText}${p !== null ? ` (p ${p < 0.001 ? "< 0.001" : p.toFixed(3)})` : ""}`,
      x: o.time,
      y: o.value,
      color: i,
    });
  });
  const first = contributions[0][1];
  const solar = obj(r.solar);
  const notes: string[] = [];
  if (solar) {
    const mm = numOrNull(solar.max_minus_min);
    const ci = Array.isArray(solar.max_minus_min_ci) ? solar.max_minus_min_ci.map(numOrNull) : [];
    const sens = numOrNull(solar.sensitivity);
    notes.push(
      `Solar regressor ${str(solar.regressor) ?? ""}: sensitivity ${g3(sens)} ${
        str(solar.sensitivity_units) ?? ""
      }` +
        `, solar max minus min ${g3(mm)} [${g3(ci[0] ?? null)}, ${g3(ci[1] ?? null)}] ` +
        `${unitsLabel(str(solar.max_minus_min_units) ?? "") || ""}` +
        `${
          numOrNull(solar.lag) !== null
            ? ` at lag ${numOrNull(solar.lag)} ${str(solar.lag_unit) ?? ""}`
            : ""
        }.`,
    );
  }
  const r2 = numOrNull(r.r_squared);
  if (r2 !== null) {
    notes.push(`R² of the regression ${r2.toFixed(3)}; errors: ${str(r.errors) ?? "n/a"}.`);
  }
  return {
    title: `Contributions to ${first.name.replace(/^.* contribution to /, "")} · run ${
      run.id.slice(0, 8)
    }`,
    description: runDescription(
      run,
      `Contribution of each regressor (${contributions.map(([k]) => k.slice(13)).join(", ")}) ` +
        "to the climate series in a multiple regression, over the fitted sample.",
    ),
    x: { label: "Year", kind: "year" },
    y: {
      label: `Contribution: ${
        axisLabel(quantityLabel(first.quantity), first.units, first.quantity)
      }`,
    },
    layers,
    notes: [...notes, ...runNotes(run)],
  };
}
