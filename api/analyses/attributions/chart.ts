/**
 * Chart of the "attributions" analysis: each regressor's contribution to the climate series
 * over time (β × the lagged regressor minus its mean), in the climate series' units, with each
 * regressor's lag and p-value in the legend and the solar max-minus-min estimate in the notes.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import { axisLabel, quantityLabel, unitsLabel } from "../../charts/labels.ts";
import type { AttributionResultOut } from "./result.ts";

const PREFIX = "contribution_";

function g3(v: number): string {
  return v.toPrecision(3);
}

/** p-value in a legend: "< 0.001" or three decimals. */
function pText(p: number): string {
  return p < 0.001 ? "< 0.001" : p.toFixed(3);
}

/** The solar p-values, saying which is naive and which pays for the lag search. */
function solarPText(s: NonNullable<AttributionResultOut["solar"]>): string {
  const l = s.lag_search_significance;
  if (l.method === "fixed_lag") return `p ${pText(l.p_naive)}, lag fixed`;
  const adjusted = l.method === "phase" ? l.p_search! : l.p_sidak;
  return `p ${pText(adjusted)} paying for the lag search, ${
    pText(l.p_naive)
  } if the lag were fixed`;
}

/** The note on the solar p-values: naive, Monte Carlo over the search, Šidák bound. */
function lagSearchNote(s: NonNullable<AttributionResultOut["solar"]>): string {
  const l = s.lag_search_significance;
  if (l.method === "fixed_lag") {
    return `Solar p-value ${g3(l.p_naive)} at the fixed lag ${s.lag} ${s.lag_unit}.`;
  }
  return `Solar p-values: ${
    l.p_search === null
      ? ""
      : `${
        g3(l.p_search)
      } paying for the AIC search over ${l.lags_searched} lags (${l.surrogates} phase surrogates); `
  }Šidák bound ${g3(l.p_sidak)}; naive (chosen lag taken as fixed, too small) ${g3(l.p_naive)}.`;
}

/** The note on the solar regressor's sensitivity and max-minus-min response. */
function solarNote(s: NonNullable<AttributionResultOut["solar"]>): string {
  return `Solar regressor ${s.regressor}: sensitivity ${g3(s.sensitivity)} ${s.sensitivity_units}` +
    `, solar max minus min ${g3(s.max_minus_min)} [${g3(s.max_minus_min_ci[0])}, ${
      g3(s.max_minus_min_ci[1])
    }] ${unitsLabel(s.max_minus_min_units) || ""} at lag ${s.lag} ${s.lag_unit}.`;
}

export const attributionsChart: KindChart<AttributionResultOut> = {
  build(run, r) {
    const contributions = Object.entries(r.outputs).filter(([k]) => k.startsWith(PREFIX));
    if (!contributions.length) return null;
    const layers: Layer[] = [{ type: "hline", y: 0, color: "foreground", dash: "solid" }];
    contributions.forEach(([key, o], i) => {
      const name = key.slice(PREFIX.length);
      const c = r.coefficients.find((q) => q.name === name);
      const lagText = c?.lag ? `, lag ${c.lag} ${r.lag_unit}` : "";
      const p = c?.p_value;
      const pLabel = r.solar && r.solar.regressor === name
        ? ` (${solarPText(r.solar)})`
        : p !== undefined
        ? ` (p ${pText(p)})`
        : "";
      layers.push({
        type: "line",
        label: `${name}${lagText}${pLabel}`,
        x: o.time,
        y: o.value,
        color: i,
      });
    });
    const first = contributions[0][1];
    return {
      title: runTitle(`Contributions to ${first.name.replace(/^.* contribution to /, "")}`, run),
      description: runDescription(
        run,
        `Contribution of each regressor (${
          contributions.map(([k]) => k.slice(PREFIX.length)).join(", ")
        }) to the climate series in a multiple regression, over the fitted sample.`,
      ),
      x: { label: "Year", kind: "year" },
      y: {
        label: `Contribution: ${
          axisLabel(quantityLabel(first.quantity), first.units, first.quantity)
        }`,
      },
      layers,
      ...runNotes(run, [
        ...(r.solar ? [solarNote(r.solar), lagSearchNote(r.solar)] : []),
        `R² of the regression ${r.r_squared.toFixed(3)}; errors: ${r.errors}.`,
      ]),
    };
  },
};
