/**
 * Test helper: the synthetic demo sunspot record (fixtures/demo, SYNTHETIC, generated with a
 * fixed seed by fixtures/demo/generate.ts) and its true cycle parameters (manifest.json).
 * Invented data: used for recovery tests only.
 */
import {
  cycleTable,
  findCycleExtrema,
  smoothed13Month,
  toRegularGrid,
} from "../../../core/cycles/mod.ts";

const here = (p: string) => new URL(`../../../fixtures/demo/${p}`, import.meta.url);

export interface TrueCycle {
  t0_decimal_year: number;
  a: number;
  b_months: number;
  maximum_v2: number;
  peak_decimal_year: number;
  in_progress: boolean;
}

export function loadDemo() {
  const lines = Deno.readTextFileSync(here("sunspot_number_monthly.csv")).split("\n")
    .filter((l) => l && !l.startsWith("#"));
  const head = lines[0].split(",");
  const iT = head.indexOf("decimal_year"), iV = head.indexOf("sunspot_number");
  const rows = lines.slice(1).map((l) => l.split(","));
  const time = rows.map((r) => Number(r[iT])), value = rows.map((r) => Number(r[iV]));
  const manifest = JSON.parse(Deno.readTextFileSync(here("manifest.json")));
  const truth: TrueCycle[] = manifest.truth.cycles.list;
  const g = toRegularGrid(time, value, "monthly");
  const smoothed = smoothed13Month(g.value);
  const table = cycleTable(g.time, findCycleExtrema(g.time, smoothed), { activity: g.value });
  /** The true cycle whose t0 is nearest a time. */
  const nearest = (t: number) =>
    truth.reduce((b, c) =>
      Math.abs(c.t0_decimal_year - t) < Math.abs(b.t0_decimal_year - t) ? c : b
    );
  const index = (t: number) => Math.round((t - g.time[0]) * 12);
  return { grid: g, smoothed, table, truth, manifest, nearest, index };
}
