/**
 * Chart rendering cost (deno bench): SVG of a monthly series (3,000 points), of a daily series
 * (100,000 points, M4-decimated to the pixel columns) and of a lag-correlation table with its
 * envelope. Run: deno bench -A test/bench/charts_bench.ts
 */
import { renderChart } from "../../api/charts/chart.ts";
import { seriesChartSpec } from "../../api/charts/series_chart.ts";
import type { StoredSeries } from "../../api/store/types.ts";

function series(n: number, step: number): StoredSeries {
  const time = new Float64Array(n), value = new Float64Array(n), unc = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    time[i] = 1750 + i * step;
    value[i] = 1360.8 + 0.5 * Math.sin((2 * Math.PI * time[i]) / 11) + 0.1 * Math.sin(i * 1.7);
    unc[i] = 0.1;
  }
  return {
    id: "sha256:" + "0".repeat(64),
    name: "Bench TSI",
    quantity: "tsi",
    units: "W m-2",
    description: null,
    source: null,
    version: null,
    resolution: step < 0.01 ? "daily" : "monthly",
    n,
    start: time[0],
    end: time[n - 1],
    derived_from: null,
    created_at: "2026-01-01T00:00:00Z",
    time,
    value,
    uncertainty: unc,
  };
}

const monthly = series(3000, 1 / 12), daily = series(100_000, 1 / 365.25);
const opts = { width: 800, height: 400, theme: "light" as const };

Deno.bench("series chart, 3,000 monthly points with a ±1σ band", {
  group: "charts",
  baseline: true,
}, () => {
  renderChart(seriesChartSpec(monthly), opts);
});

Deno.bench(
  "series chart, 100,000 daily points with a band (M4 decimation)",
  { group: "charts" },
  () => {
    renderChart(seriesChartSpec(daily), opts);
  },
);

Deno.bench("series chart, 100,000 daily points, one decade shown", { group: "charts" }, () => {
  renderChart(seriesChartSpec(daily), { ...opts, from: 1900, to: 1910 });
});
