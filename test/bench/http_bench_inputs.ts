/**
 * The invented inputs the HTTP benchmarks post (http_peers.ts, http_runs_ab.ts): 3,000 months of
 * an activity record for a cycles run, daily sunspot numbers for a reconstruction, and the demo
 * series' ids on a running service.
 *
 * @module
 */
import { periodKeyRange, periodSequence } from "../../core/series/mod.ts";
import { demoFileEntries } from "../../api/demo.ts";

/** Demo ids by file name, from the committed demo (content ids are stable). */
export async function demoIds(base: string): Promise<Record<string, string>> {
  const entries = await demoFileEntries();
  const list = await (await fetch(`${base}/v1/series?limit=200`)).json();
  const out: Record<string, string> = {};
  for (const e of entries) {
    const hit = list.items.find((s: { name: string }) => s.name === e.upload.name);
    if (hit) out[e.file] = hit.id;
  }
  return out;
}

/** 3,000 months of an invented activity record (as test/bench/cycles_case.ts). */
export function months3000(name = "bench months") {
  const time: string[] = [], value: number[] = [];
  for (let i = 0; i < 3000; i++) {
    time.push(`${1750 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, "0")}`);
    const cyc = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / 131);
    const amp = 120 + 60 * Math.sin((2 * Math.PI * i) / 1000);
    value.push(Math.max(0, amp * cyc ** 1.5 + 15 * Math.sin(0.7331 * i) * Math.sin(1.913 * i)));
  }
  return { name, quantity: "sunspot_number", units: "1", version: "2", time, value };
}

/**
 * The "first heavy run" of the start-up benches: a lag correlation of the demo's monthly
 * sunspot numbers and temperature anomalies, lags ±36, 1,000 surrogates.
 */
export function firstRunLag(ids: Record<string, string>) {
  return {
    solar: ids["sunspot_number_monthly.csv"],
    climate: ids["temperature_anomaly_monthly.csv"],
    max_lag: 36,
    surrogates: 1000,
    seed: 1,
  };
}

/** Synthetic (invented) daily sunspot numbers 1610–2029 with an 11-year cycle. */
export function dailySpots(phase = 0, name = `bench daily sunspots ${phase}`) {
  const days = periodKeyRange(1610, 2030, "daily");
  const time = Array.from(periodSequence(days.first, days.last, "daily").middle);
  const value = time.map((t) => Math.max(0, 100 * (1 + Math.sin((2 * Math.PI * t) / 11 + phase))));
  return { name, quantity: "sunspot_number", units: "1", version: "2", time, value };
}
