/**
 * The cost models of the estimates beside measured computing times: every case of
 * test/api/estimate_cases.ts computed in this thread (fastest of 3), in seconds on this machine
 * and in reference-machine seconds (divided by the machine-speed factor measured just before),
 * with the ratio measured / estimate. `deno run -A test/bench/estimate_calibration.ts [filter]`.
 *
 * @module
 */
import { makeTestApp } from "../api/helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { estimateCases, measureCase, storeCase } from "../api/estimate_cases.ts";

const filters = Deno.args.length ? Deno.args : [""];
const matches = (path: string) => filters.some((f) => path.includes(f));
const svc = await makeTestApp({ config: { asyncSeconds: 1e9 } });
await loadDemo(svc.store);
const runs: Record<string, string> = {};
const rows: string[] = [];
for (const c of await estimateCases(svc)) {
  const wanted = matches(c.path) || c.saveAs;
  if (wanted) {
    const m = await measureCase(svc, c, runs, 3);
    const row = [
      m.kind.padEnd(36),
      m.label.padEnd(36),
      m.measured.toFixed(4).padStart(9),
      (m.measured / m.factor).toFixed(4).padStart(9),
      (m.estimate / m.factor).toFixed(4).padStart(9),
      (m.measured / m.estimate).toFixed(2).padStart(6),
      m.factor.toFixed(2).padStart(6),
    ].join(" ");
    if (matches(c.path)) {
      rows.push(row);
      console.log(row);
    }
  }
  await storeCase(svc, c, runs);
}
await svc.close();
