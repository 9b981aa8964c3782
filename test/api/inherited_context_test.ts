/**
 * Inherited context: a run carries the warnings and cautions of the runs it is built on (its
 * input runs, and the runs that made its input series), recursively, in its result, its CSV
 * `#` lines, its NetCDF attributes and its chart. Checked on the demo irradiance chain
 * (darkening → saved PSI series → model → reconstruction → forcing → energy balance, and a lag
 * correlation on the forcing), invented data (fixtures/demo).
 *
 * @module
 */
import assert from "node:assert/strict";
import { makeTestApp, type TestService } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO, demoIrradianceModel } from "./demo_inputs.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { runLabel } from "../../api/runs/label.ts";
import { gatherInherited, withInherited } from "../../api/runs/inherit.ts";
import type { RunRecord } from "../../api/store/types.ts";
import { noteText, squash } from "./svg_text.ts";

interface Note {
  run: string;
  kind: string;
  level: "warning" | "caution";
  text: string;
}
interface Run {
  id: string;
  kind: string;
  result_digest: string;
  result: { warnings?: string[]; cautions?: string[]; inherited?: Note[] };
}

async function created(svc: TestService, path: string, body: unknown): Promise<Run> {
  const res = await svc.post(path, body);
  const json = await res.json();
  assert.ok(res.status === 201 || res.status === 200, `${path}: ${JSON.stringify(json)}`);
  made.set(json.id, json);
  return json;
}

/** The demo chain up to an energy-balance response, with the runs of every step. */
async function chain(svc: TestService) {
  await loadDemo(svc.store);
  const { darkening, model } = await demoIrradianceModel(svc);
  made.set(darkening.id, darkening);
  made.set(model.id, model);
  const rec = await created(svc, "/v1/irradiance/reconstructions", {
    model: model.id,
    sunspot_number: DEMO.SSN,
    resolution: "annual",
    period: { start: "1700", end: "2025" },
    proxies: [],
  });
  const forcing = await created(svc, "/v1/forcing", {
    reconstruction: rec.id,
    reference: { kind: "period", period: { start: "1986", end: "1996" } },
  });
  const response = await created(svc, "/v1/energy-balance", { forcing_run: forcing.id });
  return { darkening: darkening as Run, model: model as Run, rec, forcing, response };
}

/** The texts a run states itself, by level. */
function own(run: Run): { level: "warning" | "caution"; text: string }[] {
  return [
    ...(run.result.warnings ?? []).map((text) => ({ level: "warning" as const, text })),
    ...(run.result.cautions ?? []).map((text) => ({ level: "caution" as const, text })),
  ];
}

/** Every run made by the tests, by id (to check whom an inherited text is attributed to). */
const made = new Map<string, Run>();

/**
 * Assert that `run` inherits every text of `from` it does not state itself, attributed to
 * `from` or to a nearer run that states the same text.
 */
function assertInherits(run: Run, from: Run) {
  const mine = new Set(own(run).map((n) => n.text));
  const inherited = run.result.inherited ?? [];
  for (const n of own(from)) {
    if (mine.has(n.text)) continue;
    const got = inherited.find((x) => x.text === n.text);
    assert.ok(got, `${run.kind} lacks "${n.text}" of ${from.kind}`);
    const source = made.get(got.run);
    assert.ok(source, `${run.kind}: "${n.text}" attributed to an unknown run ${got.run}`);
    assert.equal(got.kind, source.kind);
    assert.ok(own(source).some((x) => x.text === n.text && x.level === got.level));
    if (got.run !== from.id) assert.notEqual(source.id, run.id);
  }
}

Deno.test("a forcing run carries its reconstruction's warnings and cautions, and the response built on it both", async () => {
  const svc = await makeTestApp();
  try {
    const { darkening, model, rec, forcing, response } = await chain(svc);
    // the reconstruction states what a climate model's forcing file must still say
    const recTexts = own(rec).map((n) => n.text).join("\n");
    assert.match(recTexts, /before the satellite era \(1978\) are model-dependent/);
    assert.match(recTexts, /No secular background/);
    assertInherits(forcing, rec);
    assertInherits(rec, model);
    // the model's darkening term is a series saved from the darkening run (derived_from)
    assertInherits(model, darkening);
    // recursively: the response inherits the forcing, the reconstruction, the model, ...
    for (const from of [forcing, rec, model, darkening]) assertInherits(response, from);
    for (const run of [model, rec, forcing, response]) {
      const texts = (run.result.inherited ?? []).map((n) => n.text);
      assert.equal(new Set(texts).size, texts.length, `${run.kind}: an inherited text twice`);
      const mine = new Set(own(run).map((n) => n.text));
      assert.ok(texts.every((t) => !mine.has(t)), `${run.kind} repeats its own text`);
    }
    // a run built on nothing has no inherited part
    assert.equal("inherited" in darkening.result, false);

    // the CSV a climate model reads carries them, and so does the NetCDF file
    const csv = await (await svc.get(`/v1/runs/${forcing.id}/outputs/forcing?format=csv`)).text();
    for (const n of forcing.result.inherited!) {
      const line = `# ${n.level}: (from ${n.kind} run ${runLabel(n.run)}, ${n.run}) ${n.text}`;
      assert.ok(csv.includes(line), `CSV lacks: ${line}`);
    }
    const nc = new Uint8Array(
      await (await svc.get(`/v1/runs/${forcing.id}/outputs/forcing?format=netcdf`)).arrayBuffer(),
    );
    const ncText = new TextDecoder("latin1").decode(nc);
    assert.ok(ncText.includes("model-dependent"), "NetCDF cautions attribute");

    // the chart shows the inherited warnings whole (and the cautions or a pointer to the run)
    const svg = await (await svc.get(`/v1/runs/${forcing.id}/chart.svg`)).text();
    const shown = noteText(svg);
    for (const n of forcing.result.inherited!.filter((x) => x.level === "warning")) {
      assert.ok(shown.includes(squash(n.text)), `chart lacks warning "${n.text}"`);
    }

    // the inherited part is in the digest and replays
    for (const run of [rec, forcing, response]) {
      const rep = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
      assert.equal(rep.identical, true, `${run.kind}: ${rep.note}`);
    }
  } finally {
    await svc.close();
  }
});

Deno.test("a lag correlation inherits through solar_run and through a series saved from a run", async () => {
  const svc = await makeTestApp();
  try {
    const { rec, forcing } = await chain(svc);
    const viaRun = await created(svc, "/v1/lag-correlations", {
      solar_run: forcing.id,
      climate: DEMO.TEMP,
      resolution: "annual",
      significance: "none",
    });
    assertInherits(viaRun, forcing);
    assertInherits(viaRun, rec);
    const saved = await (await svc.post(`/v1/runs/${forcing.id}/outputs/forcing/series`, {}))
      .json();
    const viaSeries = await created(svc, "/v1/lag-correlations", {
      solar: saved.id,
      climate: DEMO.TEMP,
      resolution: "annual",
      significance: "none",
    });
    assertInherits(viaSeries, forcing);
    assertInherits(viaSeries, rec);
    // the JSON of one output carries the run's warnings and inherited part too
    const out = await (await svc.get(`/v1/runs/${viaSeries.id}/outputs/solar_preprocessed`))
      .json();
    assert.deepEqual(out.inherited, viaSeries.result.inherited);
    assert.ok(Array.isArray(out.warnings));
  } finally {
    await svc.close();
  }
});

Deno.test("every analysis publishes the inherited part in its OpenAPI result schema", async () => {
  const svc = await makeTestApp();
  try {
    const doc = await (await svc.get("/v1/openapi.json")).json();
    // deno-lint-ignore no-explicit-any
    const deref = (s: any): any =>
      s?.$ref ? deref(doc.components.schemas[s.$ref.split("/").pop()]) : s;
    // deno-lint-ignore no-explicit-any
    const objects = (s: any): any[] => {
      const d = deref(s);
      const alts = d?.anyOf ?? d?.oneOf;
      if (Array.isArray(alts)) return alts.flatMap(objects);
      const t = [d?.type].flat();
      return t.includes("object") ? [d] : [];
    };
    for (const kind of RUN_KINDS) {
      const run = deref(
        doc.paths[kind.path].post.responses["201"].content["application/json"].schema,
      );
      // the run schema of an analysis: the generic run, extended with its typed result
      // deno-lint-ignore no-explicit-any
      const own = (run.allOf ?? [run]).find((p: any) => p.properties?.result);
      const results = objects(own.properties.result);
      assert.ok(results.length >= 1, kind.kind);
      for (const r of results) {
        const p = deref(r.properties.inherited);
        assert.equal(p?.type, "array", `${kind.kind}: no inherited part`);
        assert.equal(deref(p.items).properties.level.enum.join(), "warning,caution");
      }
    }
  } finally {
    await svc.close();
  }
});

Deno.test("withInherited() keeps each text once, nearest run first, and leaves out the run's own", async () => {
  const run = (id: string, kind: string, result: Record<string, unknown>, inputs: string[] = []) =>
    ({
      id,
      kind,
      input_runs: inputs,
      input_series: [],
      result,
    }) as unknown as RunRecord;
  const base = run("r-base", "irradiance-reconstructions", {
    warnings: ["amplitude low"],
    cautions: ["before 1978 model-dependent", "shared caution"],
  });
  const mid = run("r-mid", "forcing", { warnings: [], cautions: ["shared caution"] }, [
    "r-base",
  ]);
  const lineage = {
    run: (id: string) => Promise.resolve(id === "r-base" ? base : null),
    seriesOrigin: () => Promise.resolve(null),
  };
  const notes = await gatherInherited({ runs: { "r-mid": mid }, series: {} }, lineage);
  const out = withInherited({ warnings: [], cautions: ["own caution", "amplitude low"] }, notes);
  assert.deepEqual(out.inherited, [
    { run: "r-mid", kind: "forcing", level: "caution", text: "shared caution" },
    {
      run: "r-base",
      kind: "irradiance-reconstructions",
      level: "caution",
      text: "before 1978 model-dependent",
    },
  ]);
  assert.deepEqual(withInherited({ warnings: ["x"] }, []), { warnings: ["x"] });
});
