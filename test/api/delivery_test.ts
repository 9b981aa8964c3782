/**
 * Delivery to scripts and dashboards: CSV of series and of run outputs read back by real CSV
 * readers (Debian's python3-pandas `read_csv(comment="#")` and R's
 * `read.csv(comment.char = "#")`, run live on the HTTP response), HTTP caching of immutable
 * resources (strong ETag, immutable Cache-Control, 304 on If-None-Match) and CORS on and off.
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, type TestService, uploadSeries } from "./helpers.ts";
import { putFinishedRun } from "./run_fixture.ts";
import { readConfig } from "../../api/config.ts";

const PYTHON = "/usr/bin/python3";
const RSCRIPT = "/usr/bin/Rscript";

function works(cmd: string, args: string[]): boolean {
  try {
    return new Deno.Command(cmd, { args, stdout: "null", stderr: "null" }).outputSync().success;
  } catch {
    return false;
  }
}
const HAS_PANDAS = works(PYTHON, ["-c", "import pandas"]);
const HAS_R = works(RSCRIPT, ["-e", "invisible(read.csv)"]);
if (!HAS_PANDAS) {
  console.warn("delivery_test: /usr/bin/python3 with pandas is absent; pandas readings skipped");
}
if (!HAS_R) console.warn("delivery_test: /usr/bin/Rscript is absent; R readings skipped");

type Table = {
  columns: string[];
  values: Record<string, (number | string | null)[]>;
  rows: number;
};

async function withFile<T>(csv: string, f: (path: string) => Promise<T>): Promise<T> {
  const path = await Deno.makeTempFile({ suffix: ".csv" });
  try {
    await Deno.writeTextFile(path, csv);
    return await f(path);
  } finally {
    await Deno.remove(path);
  }
}

/** pandas 1.5 (Debian 12) read_csv(path, comment="#"), round-trip float parser. */
function readPandas(csv: string): Promise<Table> {
  const script = `
import json, math, sys, pandas
d = pandas.read_csv(sys.argv[1], comment="#", float_precision="round_trip")
def cell(v):
    if isinstance(v, float) and math.isnan(v): return None
    return v.item() if hasattr(v, "item") else v
print(json.dumps({"columns": list(d.columns), "rows": len(d),
  "values": {c: [cell(v) for v in d[c]] for c in d.columns}}))
`;
  return withFile(csv, async (path) => {
    const out = await new Deno.Command(PYTHON, { args: ["-c", script, path] }).output();
    const err = new TextDecoder().decode(out.stderr);
    assert.ok(out.success, `pandas failed: ${err}`);
    assert.equal(err.trim(), "", `pandas warned: ${err}`);
    return JSON.parse(new TextDecoder().decode(out.stdout));
  });
}

/** R read.csv(path, comment.char = "#"), numbers printed with 17 significant digits. */
function readR(csv: string): Promise<Table> {
  const script = `
d <- read.csv(commandArgs(TRUE)[1], comment.char = "#", stringsAsFactors = FALSE)
cat(nrow(d), "\\n", sep = "")
for (n in names(d)) {
  v <- d[[n]]
  s <- if (is.numeric(v)) ifelse(is.na(v), "NA", sprintf("%.17g", v)) else ifelse(is.na(v), "NA", paste0("s:", v))
  cat(n, s, sep = "\\t"); cat("\\n")
}`;
  return withFile(csv, async (path) => {
    const out = await new Deno.Command(RSCRIPT, { args: ["-e", script, path] }).output();
    const err = new TextDecoder().decode(out.stderr);
    assert.ok(out.success, `R failed: ${err}`);
    assert.equal(err.trim(), "", `R warned: ${err}`);
    const lines = new TextDecoder().decode(out.stdout).trim().split("\n");
    const rows = Number(lines[0]);
    const values: Table["values"] = {};
    const columns: string[] = [];
    for (const l of lines.slice(1)) {
      const [name, ...cells] = l.split("\t");
      columns.push(name);
      values[name] = cells.map((
        c,
      ) => (c === "NA" ? null : c.startsWith("s:") ? c.slice(2) : Number(c)));
    }
    return { columns, values, rows };
  });
}

const READERS: { name: string; read: (csv: string) => Promise<Table>; ignore: boolean }[] = [
  { name: "pandas", read: readPandas, ignore: !HAS_PANDAS },
  { name: "R", read: readR, ignore: !HAS_R },
];

/** A run with a reconstruction-like output: nulls, an interval, cautions with awkward text. */
async function runWithOutput(svc: TestService) {
  const time = Array.from({ length: 36 }, (_, i) => 1996 + (i + 0.5) / 12);
  const value: (number | null)[] = time.map((
    t,
    i,
  ) => (i < 2 ? null : 1360.8 + 0.5 * Math.sin(t) + 1e-9 * i));
  const lower = value.map((v) => (v === null ? null : v - 0.25));
  const upper = value.map((v) => (v === null ? null : v + 0.25));
  const run = await putFinishedRun(svc.store, "reconstruction_test", {
    outputs: {
      tsi: {
        name: "TSI, reconstructed",
        quantity: "tsi",
        units: "W m-2",
        time,
        value,
        lower,
        upper,
        interval: "95 % prediction interval",
      },
    },
    cautions: [
      'Reconstructions before the satellite era are model-dependent, "not measured"; # not a column',
      "Results do not replace\npeer-reviewed assessment (σ, W m⁻²).",
    ],
    warnings: ["Cycle amplitude 0.06 % is below 0.07–0.12 %."],
  });
  return { run, time, value, lower, upper };
}

for (const reader of READERS) {
  Deno.test({
    name: `GET /v1/runs/{id}/outputs/{name}?format=csv is read as is by ${reader.name}`,
    ignore: reader.ignore,
    async fn() {
      const svc = await makeTestApp();
      try {
        const { run, time, value, lower, upper } = await runWithOutput(svc);
        const res = await svc.get(`/v1/runs/${run.id}/outputs/tsi?format=csv`);
        assert.equal(res.status, 200);
        assert.match(res.headers.get("content-type") ?? "", /^text\/csv/);
        const csv = await res.text();
        // The metadata header carries run id, digest, units, method and cautions.
        assert.ok(csv.includes(`# run_id: ${run.id}`));
        assert.ok(csv.includes(`# result_digest: sha256:${run.result_digest}`));
        assert.ok(csv.includes("# units: W m-2"));
        assert.ok(csv.includes("# run_kind: reconstruction_test (algorithm 1"));
        assert.ok(csv.includes("# interval: 95 % prediction interval"));
        assert.ok(/# caution: Reconstructions before the satellite era/.test(csv));
        const t = await reader.read(csv);
        // the same column vocabulary as a stored series' CSV (api/export/columns.ts)
        assert.deepEqual(t.columns, ["time", "decimal_year", "value", "lower", "upper"]);
        assert.equal(t.rows, time.length);
        assert.deepEqual(t.values.decimal_year, time);
        assert.deepEqual(t.values.value, value);
        assert.deepEqual(t.values.lower, lower);
        assert.deepEqual(t.values.upper, upper);
        assert.equal(t.values.time[0], "1996-01");
        // Accept: text/csv gives the same bytes as ?format=csv
        const viaAccept = await svc.get(`/v1/runs/${run.id}/outputs/tsi`, { Accept: "text/csv" });
        assert.equal(await viaAccept.text(), csv);
      } finally {
        await svc.close();
      }
    },
  });

  Deno.test({
    name: `GET /v1/series/{id} as CSV (Accept: text/csv) is read as is by ${reader.name}`,
    ignore: reader.ignore,
    async fn() {
      const svc = await makeTestApp();
      try {
        const s = monthlySeries(
          'Station "North" TSI, daily-mean, #2',
          "tsi",
          "W m-2",
          2001,
          24,
          (i) => 1361 + i / 7,
          {
            uncertainty: Array.from({ length: 24 }, (_, i) => 0.1 + i / 1000),
            description: "line one, with comma",
          },
        );
        const id = await uploadSeries(svc, s);
        const json = await (await svc.get(`/v1/series/${id}`)).json();
        const res = await svc.get(`/v1/series/${id}`, { Accept: "text/csv" });
        assert.match(res.headers.get("content-type") ?? "", /^text\/csv/);
        const t = await reader.read(await res.text());
        assert.deepEqual(t.columns, ["time", "decimal_year", "value", "uncertainty"]);
        assert.equal(t.rows, 24);
        assert.deepEqual(t.values.decimal_year, json.time);
        assert.deepEqual(t.values.value, json.value);
        assert.deepEqual(t.values.uncertainty, json.uncertainty);
        assert.deepEqual(t.values.time, json.date);
      } finally {
        await svc.close();
      }
    },
  });
}

async function assertCached(svc: TestService, path: string, headers: Record<string, string> = {}) {
  const first = await svc.get(path, headers);
  assert.equal(first.status, 200, `${path}: ${first.status}`);
  await first.body?.cancel();
  const etag = first.headers.get("etag");
  assert.ok(etag && /^"[^"]+"$/.test(etag), `${path}: strong ETag, got ${etag}`);
  assert.equal(first.headers.get("cache-control"), "public, max-age=31536000, immutable", path);
  const nm = await svc.get(path, { ...headers, "If-None-Match": etag });
  assert.equal(nm.status, 304, `${path}: 304 expected`);
  assert.equal(await nm.text(), "");
  assert.equal(nm.headers.get("etag"), etag);
  assert.equal(nm.headers.get("cache-control"), "public, max-age=31536000, immutable");
  const other = await svc.get(path, { ...headers, "If-None-Match": `"something-else"` });
  assert.equal(other.status, 200, `${path}: a different tag gets the body`);
  await other.body?.cancel();
  return etag;
}

Deno.test("immutable resources: strong ETag, one-year immutable caching and 304 on If-None-Match", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(
      svc,
      monthlySeries("Spots", "sunspot_number", "1", 2000, 24, (i) => 10 + i),
    );
    const { run } = await runWithOutput(svc);
    const tags = new Set<string>();
    for (
      const [path, headers] of [
        [`/v1/series/${id}`, {}],
        [`/v1/series/${id}?format=csv`, {}],
        [`/v1/series/${id}/chart.svg`, {}],
        [`/v1/series/${id}/chart.svg?theme=dark&from=2000-06`, {}],
        [`/v1/runs/${run.id}`, {}],
        [`/v1/runs/${run.id}/outputs/tsi`, {}],
        [`/v1/runs/${run.id}/outputs/tsi?format=csv`, {}],
        [`/v1/runs/${run.id}/chart.svg`, {}],
        [`/v1/runs/${run.id}/chart.svg?width=1200&height=600`, {}],
      ] as [string, Record<string, string>][]
    ) {
      tags.add(await assertCached(svc, path, headers));
    }
    assert.equal(tags.size, 9, "every representation has its own tag");
    // Accept-negotiated CSV has the same tag as ?format=csv and says it varies on Accept.
    const a = await svc.get(`/v1/series/${id}`, { Accept: "text/csv" });
    await a.body?.cancel();
    const b = await svc.get(`/v1/series/${id}?format=csv`);
    await b.body?.cancel();
    assert.equal(a.headers.get("etag"), b.headers.get("etag"));
    assert.match(a.headers.get("vary") ?? "", /Accept/);
  } finally {
    await svc.close();
  }
});

Deno.test("runs not finished are not cached", async () => {
  const svc = await makeTestApp();
  try {
    const queued = await putFinishedRun(svc.store, "anything", {}, "queued");
    const res = await svc.get(`/v1/runs/${queued.id}`);
    assert.equal(res.status, 200);
    await res.body?.cancel();
    assert.equal(res.headers.get("etag"), null);
    assert.equal(res.headers.get("cache-control"), "no-store");
  } finally {
    await svc.close();
  }
});

const ALLOWED = "https://dashboard.station.example";

Deno.test("CORS on: an allowed origin is echoed, others get no CORS headers", async () => {
  const svc = await makeTestApp({ config: { corsOrigins: [ALLOWED, "http://localhost:3000"] } });
  try {
    const id = await uploadSeries(
      svc,
      monthlySeries("Spots", "sunspot_number", "1", 2000, 24, (i) => 10 + i),
    );
    for (
      const path of [
        `/v1/series/${id}`,
        `/v1/series/${id}/chart.svg`,
        "/v1/series/sha256:00/chart.svg",
      ]
    ) {
      const ok = await svc.get(path, { Origin: ALLOWED });
      await ok.body?.cancel();
      assert.equal(ok.headers.get("access-control-allow-origin"), ALLOWED, path);
      assert.match(ok.headers.get("access-control-expose-headers") ?? "", /ETag/, path);
      assert.match(ok.headers.get("vary") ?? "", /Origin/, path);
      const other = await svc.get(path, { Origin: "https://elsewhere.example" });
      await other.body?.cancel();
      assert.equal(other.headers.get("access-control-allow-origin"), null, path);
    }
    // Revalidation keeps CORS, so a dashboard can read the 304.
    const first = await svc.get(`/v1/series/${id}/chart.svg`, { Origin: ALLOWED });
    await first.body?.cancel();
    const nm = await svc.get(`/v1/series/${id}/chart.svg`, {
      Origin: ALLOWED,
      "If-None-Match": first.headers.get("etag")!,
    });
    assert.equal(nm.status, 304);
    assert.equal(nm.headers.get("access-control-allow-origin"), ALLOWED);
    // Preflight
    const pre = await svc.app.request(`/v1/series`, {
      method: "OPTIONS",
      headers: {
        Origin: ALLOWED,
        "Access-Control-Request-Method": "POST",
        "Access-Control-Request-Headers": "content-type",
      },
    });
    assert.equal(pre.status, 204);
    assert.equal(pre.headers.get("access-control-allow-origin"), ALLOWED);
    assert.match(pre.headers.get("access-control-allow-methods") ?? "", /POST/);
    assert.match(
      (pre.headers.get("access-control-allow-headers") ?? "").toLowerCase(),
      /content-type/,
    );
    const badPre = await svc.app.request(`/v1/series`, {
      method: "OPTIONS",
      headers: { Origin: "https://elsewhere.example", "Access-Control-Request-Method": "POST" },
    });
    assert.equal(badPre.headers.get("access-control-allow-origin"), null);
  } finally {
    await svc.close();
  }
});

Deno.test("CORS off by default: no CORS headers at all", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(
      svc,
      monthlySeries("Spots", "sunspot_number", "1", 2000, 24, (i) => 10 + i),
    );
    for (const path of [`/v1/series/${id}`, `/v1/series/${id}/chart.svg`, "/v1/runs"]) {
      const res = await svc.get(path, { Origin: ALLOWED });
      await res.body?.cancel();
      for (const [k] of res.headers) assert.ok(!k.startsWith("access-control-"), `${path}: ${k}`);
    }
    const pre = await svc.app.request(`/v1/series`, {
      method: "OPTIONS",
      headers: { Origin: ALLOWED, "Access-Control-Request-Method": "POST" },
    });
    await pre.body?.cancel();
    for (const [k] of pre.headers) assert.ok(!k.startsWith("access-control-"), k);
  } finally {
    await svc.close();
  }
});

Deno.test("CORS with * allows any origin; SUNLAG_CORS_ORIGINS is a comma-separated list", async () => {
  assert.deepEqual(readConfig({}).corsOrigins, []);
  assert.deepEqual(
    readConfig({ SUNLAG_CORS_ORIGINS: ` ${ALLOWED}, http://localhost:3000 ,` }).corsOrigins,
    [
      ALLOWED,
      "http://localhost:3000",
    ],
  );
  const svc = await makeTestApp({ config: { corsOrigins: ["*"] } });
  try {
    const res = await svc.get("/v1/runs", { Origin: "https://anyone.example" });
    await res.body?.cancel();
    assert.equal(res.headers.get("access-control-allow-origin"), "*");
  } finally {
    await svc.close();
  }
});

Deno.test("a succeeded run answered from memory is byte-identical to the first answer", async () => {
  const svc = await makeTestApp();
  try {
    const { run } = await runWithOutput(svc);
    const a = await svc.get(`/v1/runs/${run.id}`);
    const b = await svc.get(`/v1/runs/${run.id}`);
    assert.equal(a.headers.get("content-type"), b.headers.get("content-type"));
    assert.match(a.headers.get("content-type") ?? "", /^application\/json/);
    assert.equal(a.headers.get("etag"), b.headers.get("etag"));
    const [ta, tb] = [await a.text(), await b.text()];
    assert.equal(ta, tb);
    assert.deepEqual(JSON.parse(ta).result, run.result);
  } finally {
    await svc.close();
  }
});

async function gunzip(bytes: ArrayBuffer): Promise<string> {
  const s = new Blob([bytes]).stream().pipeThrough(new DecompressionStream("gzip"));
  return await new Response(s).text();
}

Deno.test("cached runs and charts are sent gzip-coded to clients that accept it, with their own tag", async () => {
  const svc = await makeTestApp();
  try {
    const { run } = await runWithOutput(svc);
    for (const path of [`/v1/runs/${run.id}`, `/v1/runs/${run.id}/chart.svg`]) {
      const plain = await svc.get(path);
      const plainText = await plain.text();
      assert.equal(plain.headers.get("content-encoding"), null);
      const gz = await svc.get(path, { "Accept-Encoding": "br;q=1, gzip;q=0.8" });
      assert.equal(gz.headers.get("content-encoding"), "gzip", path);
      assert.match(gz.headers.get("vary") ?? "", /Accept-Encoding/);
      const tag = gz.headers.get("etag")!;
      assert.notEqual(tag, plain.headers.get("etag"));
      assert.match(tag, /^"[^"]+-gzip"$/);
      const bytes = await gz.arrayBuffer();
      assert.ok(
        bytes.byteLength < plainText.length / 2,
        `${bytes.byteLength} vs ${plainText.length}`,
      );
      assert.equal(await gunzip(bytes), plainText);
      const nm = await svc.get(path, { "Accept-Encoding": "gzip", "If-None-Match": tag });
      assert.equal(nm.status, 304);
      // the identity tag does not validate the gzip variant, and gzip;q=0 refuses gzip
      const other = await svc.get(path, {
        "Accept-Encoding": "gzip",
        "If-None-Match": plain.headers.get("etag")!,
      });
      assert.equal(other.status, 200);
      await other.body?.cancel();
      const refused = await svc.get(path, { "Accept-Encoding": "gzip;q=0, identity" });
      assert.equal(refused.headers.get("content-encoding"), null);
      assert.equal(await refused.text(), plainText);
    }
  } finally {
    await svc.close();
  }
});

Deno.test('If-None-Match uses the weak comparison: W/"tag" revalidates a strong tag (RFC 9110 §13.1.2)', async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(
      svc,
      monthlySeries("Spots", "sunspot_number", "1", 2000, 24, (i) => 10 + i),
    );
    const { run } = await runWithOutput(svc);
    for (
      const path of [
        `/v1/series/${id}`,
        `/v1/series/${id}/chart.svg`,
        `/v1/runs/${run.id}`,
        `/v1/runs/${run.id}/outputs/tsi`,
      ]
    ) {
      const first = await svc.get(path);
      await first.body?.cancel();
      const weak = await svc.get(path, { "If-None-Match": `W/${first.headers.get("etag")}` });
      assert.equal(weak.status, 304, path);
    }
  } finally {
    await svc.close();
  }
});

Deno.test("acceptsGzip() reads Accept-Encoding with q-values (RFC 9110 §12.5.3)", async () => {
  const { acceptsGzip, gzipTag } = await import("../../api/routes/immutable_cache.ts");
  const cases: [string | undefined, boolean][] = [
    [undefined, false],
    ["", false],
    ["gzip", true],
    ["GZIP", true],
    ["br, gzip;q=0.5", true],
    ["gzip;q=0", false],
    ["gzip; q=0.000", false],
    ["identity", false],
    ["*", true],
    ["*;q=0", false],
    ["*, gzip;q=0", false],
    ["x-gzip", true],
    ["deflate, br", false],
  ];
  for (const [h, want] of cases) assert.equal(acceptsGzip(h), want, String(h));
  assert.equal(gzipTag('"abc"'), '"abc-gzip"');
});
