/**
 * Keying a long daily axis by calendar period, and the bounds of its days: the calendar
 * conversion per instant (`periodKey`, `periodOfKey`) against the remembered year and period
 * (`periodKeyer`, `dailyBounds`, core/series/period_key.ts), on 153,000 days (1610-2029, the
 * span of a daily reconstruction). Usage: deno bench -A test/bench/calendar_keys_bench.ts
 *
 * @module
 */
import { dailyBounds, periodKey, periodKeyer, periodOfKey } from "../../core/series/period_key.ts";
import { decimalYearFromEpochDays } from "../../core/time/mod.ts";

const N = 153_000, FIRST = -130_000;
const time = Float64Array.from({ length: N }, (_, i) => decimalYearFromEpochDays(FIRST + i + 0.5));
let sink = 0;

for (const resolution of ["daily", "monthly", "annual"] as const) {
  Deno.bench(`periodKey, ${resolution}`, { group: `keys ${resolution}`, baseline: true }, () => {
    for (let i = 0; i < N; i++) sink += periodKey(time[i], resolution);
  });
  Deno.bench(`periodKeyer, ${resolution}`, { group: `keys ${resolution}` }, () => {
    const keyOf = periodKeyer(resolution);
    for (let i = 0; i < N; i++) sink += keyOf(time[i]);
  });
}
Deno.bench("periodOfKey per day", { group: "bounds", baseline: true }, () => {
  for (let k = 0; k < N; k++) sink += periodOfKey(FIRST + k, "daily").middle;
});
Deno.bench("dailyBounds", { group: "bounds" }, () => {
  sink += dailyBounds(FIRST, N).middle[N - 1];
});
globalThis.addEventListener("unload", () => sink === 0.5 && console.log(sink));
