/**
 * Bundle import trusts nothing: every field of every record is checked with the API's own
 * schemas (422 naming the field), what is stored is what the service recomputed, `stored` is
 * true only when written, and headers built from stored values are encoded.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, type TestService } from "../helpers.ts";
import { RUN_KINDS } from "../../../api/analyses/registry.ts";
import { meanKind } from "../test_kinds.ts";
import { smallSeries } from "./shared_instance.ts";

const KINDS = [...RUN_KINDS, meanKind];

async function aBundle(svc: TestService, replicates = 3) {
  const run = await (await svc.post("/v1/test-mean", { series: smallSeries("b"), replicates }))
    .json();
  const res = await svc.get(`/v1/runs/${run.id}/bundle`);
  return { run, res, bundle: await res.json() };
}

Deno.test("bundle import: malformed ids, times and unknown fields are 422, nothing stored", async () => {
  const a = await makeTestApp({ kinds: KINDS });
  const b = await makeTestApp({ kinds: KINDS });
  try {
    const { bundle } = await aBundle(a);
    const cases: [string, (x: typeof bundle) => void, RegExp][] = [
      ["CR/LF in a run id", (x) => x.run.id = `${x.run.id}\r\nX-Injected: 1`, /\/run\/id/],
      ["non-Latin-1 run id", (x) => x.run.id = "ранний-запуск", /\/run\/id/],
      ["NUL in a series id", (x) => x.series[0].id = "sha256:\u0000", /\/series\/0\/id/],
      ["a date that is not ISO 8601", (x) => x.run.created_at = "yesterday", /\/run\/created_at/],
      [
        "a lineage that is not a run id",
        (x) => x.series[0].derived_from = "../../etc",
        /derived_from/,
      ],
      ["an unknown field", (x) => x.run.owner = "someone", /\/run\/owner/],
      ["an unknown quantity", (x) => x.series[0].quantity = "mood", /\/series\/0\/quantity/],
      ["a version with a line break", (x) => x.run.service_version = "1\n2", /service_version/],
    ];
    for (const [what, edit, where] of cases) {
      const x = structuredClone(bundle);
      edit(x);
      const problem = await assertProblem(await b.post("/v1/bundles", x), 422);
      assert.match(JSON.stringify(problem.errors), where, what);
    }
    assert.equal((await b.store.listRuns({ limit: 5, offset: 0 })).total, 0);
    assert.equal((await b.store.listSeries({ limit: 5, offset: 0 })).total, 0);
  } finally {
    await a.close();
    await b.close();
  }
});

Deno.test("bundle import: parameters are checked by the kind's schema, and stored as parsed", async () => {
  const a = await makeTestApp({ kinds: KINDS });
  const b = await makeTestApp({ kinds: KINDS });
  try {
    const { run, bundle } = await aBundle(a);
    const extra = structuredClone(bundle);
    extra.run.params.sneaky = true;
    const r1 = await (await b.post("/v1/bundles", extra)).json();
    assert.deepEqual([r1.verified, r1.stored], [false, false]);
    assert.match(JSON.stringify(r1.differences), /does not take: \/sneaky/);
    const wrongInputs = structuredClone(bundle);
    wrongInputs.run.input_series = [];
    const r2 = await (await b.post("/v1/bundles", wrongInputs)).json();
    assert.equal(r2.stored, false);
    const lie = structuredClone(bundle);
    lie.series[0].resolution = "annual";
    const r3 = await (await b.post("/v1/bundles", lie)).json();
    assert.match(JSON.stringify(r3.differences), /the points are monthly/);
    assert.equal((await b.store.listRuns({ limit: 5, offset: 0 })).total, 0);
    const ok = await (await b.post("/v1/bundles", bundle)).json();
    assert.deepEqual([ok.verified, ok.stored], [true, true]);
    const stored = (await b.store.getRun(run.id))!;
    assert.deepEqual(stored.params, run.params);
    assert.equal(stored.result_digest, run.result_digest);
    // The same run id with other content is refused, and stored stays false.
    const c = await makeTestApp({ kinds: KINDS });
    try {
      const other = await aBundle(c, 4);
      const clash = structuredClone(other.bundle);
      clash.run.id = run.id;
      const r4 = await (await b.post("/v1/bundles", clash)).json();
      assert.equal(r4.verified, true, JSON.stringify(r4.differences));
      assert.equal(r4.stored, false);
      assert.match(JSON.stringify(r4.differences), /already used by a different run/);
    } finally {
      await c.close();
    }
  } finally {
    await a.close();
    await b.close();
  }
});

Deno.test("bundle export: Content-Disposition carries an encoded filename* (RFC 6266, 8187)", async () => {
  const a = await makeTestApp({ kinds: KINDS });
  try {
    const { run, res } = await aBundle(a);
    assert.equal(
      res.headers.get("content-disposition"),
      `attachment; filename="sunlag-run-${run.id}.json"; filename*=UTF-8''sunlag-run-${run.id}.json`,
    );
  } finally {
    await a.close();
  }
});

Deno.test("CSV output: a series named like a formula gives no formula cell", async () => {
  const svc = await makeTestApp({ kinds: KINDS });
  try {
    const hostile = { ...smallSeries("f"), name: 'x,=HYPERLINK("http://evil.example","click")' };
    const up = await (await svc.post("/v1/series", hostile)).json();
    const csv = await (await svc.get(`/v1/series/${up.series.id}?format=csv`)).text();
    const run = await (await svc.post("/v1/test-mean", { series: up.series.id })).json();
    const out = await (await svc.get(`/v1/runs/${run.id}/outputs/doubled?format=csv`)).text();
    for (const text of [csv, out]) {
      for (const line of text.split("\n")) {
        // Split as a spreadsheet would (on , and ;): no cell may start a formula.
        for (const cell of line.split(/[,;]/).slice(1)) {
          assert.doesNotMatch(cell.trimStart(), /^[=+@]/, line);
          if (/^\s*-/.test(cell)) assert.match(cell.trim(), /^-?[\d.e+-]+$/, `text cell: ${line}`);
        }
      }
    }
    // The export still reads back to the same content.
    const again = await svc.app.request("/v1/series", {
      method: "POST",
      headers: { "content-type": "text/csv" },
      body: csv,
    });
    assert.equal((await again.json()).series.id, up.series.id);
  } finally {
    await svc.close();
  }
});
