/**
 * Warnings never fall off charts: every warning of a run (own and inherited) is shown whole,
 * at every size, the chart growing taller than asked when they need the room; cautions and
 * notes are shortened, when room is short, to a line pointing to the run by its label. (The
 * charts of a run of every analysis on the demo data are checked the same way in
 * chart_snapshots_test.ts.)
 *
 * @module
 */
import assert from "node:assert/strict";
import { renderChart } from "../../api/charts/chart.ts";
import { defaultRunChart } from "../../api/charts/default_chart.ts";
import { runLabel } from "../../api/runs/label.ts";
import type { RunRecord } from "../../api/store/types.ts";
import { noteText, squash } from "./svg_text.ts";

const ID = "01a2360b-1c2d-7e3f-8a4b-5c6d7e8f9a0b";
const OTHER = "01a2360b-0000-7000-8000-0123456789ab";

const words = (k: number, n: number) =>
  `number ${k}: ` + Array.from({ length: n }, (_, i) => `word${i}`).join(" ");

/** A finished run with many long warnings and cautions, own and inherited. */
function run(): RunRecord {
  const time = Array.from({ length: 40 }, (_, i) => 1980.5 + i);
  return {
    id: ID,
    kind: "forcing",
    created_at: "2025-01-01T00:00:00.000Z",
    updated_at: "2025-01-01T00:00:00.000Z",
    status: "succeeded",
    progress: 1,
    params: {},
    input_series: [],
    input_runs: [OTHER],
    service_version: "0",
    algorithm_version: "1",
    seed: null,
    result: {
      outputs: {
        forcing: {
          name: "forcing",
          quantity: "radiative_forcing",
          units: "W m-2",
          time,
          value: time.map((t) => Math.sin(t)),
        },
      },
      warnings: [1, 2, 3, 4, 5].map((k) => `own warning ${words(k, 25)}`),
      cautions: [1, 2, 3, 4].map((k) => `own caution ${words(k, 25)}`),
      inherited: [
        {
          run: OTHER,
          kind: "irradiance-reconstructions",
          level: "warning",
          text: `amplitude ${words(9, 20)} with an id sha256:${"ab".repeat(32)} inside`,
        },
        { run: OTHER, kind: "irradiance-reconstructions", level: "caution", text: words(8, 30) },
      ],
    },
    result_digest: "0".repeat(64),
    error: null,
    eta_seconds: null,
  };
}

const SIZES: [number, number][] = [[800, 400], [480, 300], [240, 160], [1200, 500], [4000, 3000]];

Deno.test("run charts show every warning whole and grow rather than cut one", () => {
  const r = run();
  const spec = defaultRunChart(r);
  assert.ok(spec.title.endsWith(`· run ${runLabel(ID)}`), spec.title);
  for (const [width, height] of SIZES) {
    const svg = renderChart(spec, { width, height, theme: "light" });
    const shown = noteText(svg);
    const warnings = [
      ...(r.result!.warnings as string[]),
      ...(r.result!.inherited as { level: string; text: string }[])
        .filter((n) => n.level === "warning").map((n) => n.text),
    ];
    for (const w of warnings) assert.ok(shown.includes(squash(w)), `${width}x${height}: ${w}`);
    assert.ok(shown.includes(squash(`from irradiance-reconstructions run ${runLabel(OTHER)}`)));
    const h = Number(/<svg[^>]* height="([\d.]+)"/.exec(svg)![1]);
    assert.ok(h >= height, `${width}x${height}: ${h}`);
    // every note line lies inside the chart
    const ys = [...svg.matchAll(/<text x="12" y="([\d.]+)"[^>]*font-size="10.5"/g)].map((m) =>
      Number(m[1])
    );
    assert.ok(ys.length > 0 && Math.max(...ys) <= h, `${width}x${height}: notes below ${h}`);
    const cautions = r.result!.cautions as string[];
    const allCautions = cautions.every((c) => shown.includes(squash(c)));
    if (!allCautions) {
      // cut cautions are replaced by a pointer to the run, never cut mid-sentence
      assert.ok(
        shown.includes(squash(`: see run ${runLabel(ID)}.`)),
        `${width}x${height}: no pointer`,
      );
      for (const c of cautions) {
        const head = squash(c).slice(0, 30);
        assert.ok(!shown.includes(head) || shown.includes(squash(c)), `cut mid-way: ${c}`);
      }
    }
  }
  // at the smallest size the warnings need more than the asked height
  const small = renderChart(spec, { width: 240, height: 160, theme: "light" });
  assert.ok(Number(/<svg[^>]* height="([\d.]+)"/.exec(small)![1]) > 160);
});

Deno.test("run charts keep the asked size when their notes fit", () => {
  const r = run();
  r.result = { ...r.result, warnings: ["one short warning"], cautions: [], inherited: [] };
  const svg = renderChart(defaultRunChart(r), { width: 800, height: 400, theme: "dark" });
  assert.match(svg, /<svg[^>]* height="400"/);
  assert.ok(noteText(svg).includes("Warning:oneshortwarning"));
});
