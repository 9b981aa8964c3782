/**
 * A run's result is serialised once: the bytes stored and served are its RFC 8785 canonical
 * JSON (RFC 8785 §3.2, checked against the `canonicalize` package), they hash to the run's
 * digest (FIPS 180-4 SHA-256 via node:crypto), a GET serves them with a strong, stable ETag,
 * and this holds over both store adapters and across a restart.
 */
import assert from "node:assert/strict";
import { join } from "node:path";
import fc from "fast-check";
import postgres from "postgres";
import { canonicalJson, sha256Hex } from "../../api/canonical.ts";
import { canonicalJsonBytes, toPlainJson } from "../../api/runs/json.ts";
import { canonicalResult, resultTextOf } from "../../api/store/result_text.ts";
import { makeTestApp, monthlySeries, uploadSeries } from "./helpers.ts";
import * as DEMO from "./demo_ids.ts";
import { pgUnavailableReason, startPgServer } from "./store/pg_cluster.ts";

const snake = fc.stringMatching(/^[a-z][a-z0-9_]{0,6}$/);
const leaf = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer(),
  fc.boolean(),
  fc.constant(null),
  fc.string({ unit: "grapheme", maxLength: 8 }),
  fc.constantFrom("é", "\u2028", "\u0000", "😀", '\\"', "\u007f"),
);
const json = fc.letrec((tie) => ({
  value: fc.oneof({ depthSize: "small" }, leaf, tie("array"), tie("object")),
  array: fc.array(tie("value"), { maxLength: 5 }),
  object: fc.dictionary(snake, tie("value"), { maxKeys: 6 }),
})).object;

Deno.test("toPlainJson(): JSON.stringify of its value is RFC 8785 canonical JSON", () => {
  fc.assert(
    fc.property(json, (x) => {
      const plain = toPlainJson(x) as Record<string, unknown>;
      const { text, digest } = canonicalResult(plain);
      assert.equal(text, canonicalJson(x));
      assert.equal(digest, sha256Hex(canonicalJson(x)));
    }),
    { numRuns: 300 },
  );
  // ECMAScript number forms RFC 8785 §3.2.2.3 lists (Appendix B)
  const nums = { a: [1e21, 1e-7, -0, 333333333.33333329, 4.5e-324, 9007199254740992] };
  assert.equal(canonicalResult(toPlainJson(nums) as never).text, canonicalJson(nums));
});

Deno.test("canonicalJsonBytes() writes the bytes of JSON.stringify(toPlainJson(x)), or its error", async (t) => {
  const same = (x: unknown) => {
    const bytes = canonicalJsonBytes(x);
    assert.equal(bytes.byteLength, bytes.buffer.byteLength, "bytes in a buffer of their own");
    assert.equal(new TextDecoder().decode(bytes), JSON.stringify(toPlainJson(x)));
  };
  await t.step("random JSON values (RFC 8785 §3.2, checked against canonicalize)", () => {
    fc.assert(
      fc.property(json, (x) => {
        same(x);
        assert.equal(new TextDecoder().decode(canonicalJsonBytes(x)), canonicalJson(x));
      }),
      { numRuns: 300 },
    );
  });
  await t.step("typed arrays, -0, holes, undefined, long arrays of numbers and strings", () => {
    const long = Float64Array.from({ length: 5000 }, (_, i) => (i % 7 === 0 ? -0 : i / 3e7));
    same({ a: long, b: Int16Array.of(-3, 0, 7), c: [1, , undefined, -0], d: undefined });
    same({ e: Array.from({ length: 3000 }, (_, i) => `s${i} é ☀ 😀`), f: [[1, 2], { g: null }] });
    same({ h: Array.from({ length: 300 }, (_, i) => ({ k: i, v: [i, "é"] })) });
    // a large piece that does not fit the buffer's first growth, with multi-byte characters
    same({ i: Array.from({ length: 40000 }, (_, i) => (i % 2 ? "€😀" : i * 1.5e-9)) });
  });
  await t.step("the same errors as toPlainJson", () => {
    const bad = [
      { x: [1, NaN] },
      { y: Float32Array.of(1, Infinity) },
      { z: [{ w: -Infinity }] },
      { rSquared: 1 },
      { s: ["a", "b\uD800"] },
      { f: [() => 1] },
      { n: BigInt64Array.of(1n) },
      { big: Array.from({ length: 1000 }, (_, i) => (i === 999 ? NaN : i)) },
    ];
    for (const x of bad) {
      let expected = "";
      try {
        toPlainJson(x);
      } catch (e) {
        expected = (e as Error).message;
      }
      assert.ok(expected, JSON.stringify(Object.keys(x)));
      assert.throws(() => canonicalJsonBytes(x), { message: expected });
    }
  });
});

Deno.test("a long array repeated in a result (the same one, or equal items) is written as before", () => {
  const axis = Float64Array.from({ length: 5000 }, (_, i) => 1850 + (i + 0.5) / 365.25);
  const value = {
    cycle: { time: axis, value: axis.map((x) => Math.sin(x) * 1e-7) },
    phase: { time: axis, value: Array.from(axis, (x, i) => (i % 9 ? x % 11 : null)) },
    // the same numbers in another array; -0 where another has 0; a hole where another has null
    copy: { time: Array.from(axis), zeros: [-0, ...new Array(400).fill(0)], gaps: [1, , 3] },
    zeros: new Float32Array(401),
    // equal items but for one (the last), and of another type
    near: Array.from(axis, (x, i) => (i === 4999 ? x + 1 : x)),
    strings: Array.from(axis, String),
    holes: Object.assign(new Array(300), { 7: 1 }),
    nulls: Array.from({ length: 300 }, (_, i) => (i === 7 ? 1 : null)),
  };
  const text = new TextDecoder().decode(canonicalJsonBytes(value));
  assert.equal(text, JSON.stringify(toPlainJson(value)));
  assert.equal(text, canonicalJson(toPlainJson(value)));
});

Deno.test("toPlainJson() refuses a lone surrogate as RFC 8785 does", () => {
  assert.throws(() => toPlainJson({ name: "a\uD800b" }), /lone surrogate.*\/name/);
  assert.throws(() => canonicalJson({ name: "a\uD800b" }), RangeError);
});

/** Check one run: stored text, digest, served bytes, ETag, 304. */
async function checkRun(svc: Awaited<ReturnType<typeof makeTestApp>>, id: string) {
  const run = await svc.store.getRun(id);
  assert.ok(run?.result);
  const text = resultTextOf(run.result);
  assert.ok(text, "a stored result keeps the text it was read from");
  assert.equal(text, canonicalJson(run.result), "stored bytes are the canonical JSON");
  assert.equal(sha256Hex(text), run.result_digest, "stored bytes hash to the digest");
  const res = await svc.get(`/v1/runs/${id}`);
  assert.equal(res.status, 200);
  const etag = res.headers.get("etag")!;
  assert.match(etag, /^"[^"]+"$/, "a strong entity tag");
  const served = await res.text();
  assert.ok(served.includes(`"result":${text}`), "served bytes splice the stored bytes");
  assert.deepEqual(JSON.parse(served).result, run.result);
  const again = await svc.get(`/v1/runs/${id}`);
  assert.equal(again.headers.get("etag"), etag, "the tag is stable");
  assert.equal(await again.text(), served);
  const nm = await svc.get(`/v1/runs/${id}`, { "If-None-Match": etag });
  assert.equal(nm.status, 304);
  await nm.body?.cancel();
  return { etag, served };
}

Deno.test("a run's served and stored result bytes are its canonical JSON and hash to its digest", async () => {
  const svc = await makeTestApp();
  try {
    await (await import("../../api/demo.ts")).loadDemo(svc.store);
    for (
      const [path, body] of [
        ["/v1/cycles", { series: DEMO.SSN }],
        ["/v1/irradiance/darkening", { total_area: DEMO.AREA }],
        ["/v1/lag-correlations", {
          solar: DEMO.SSN,
          climate: DEMO.TEMP,
          max_lag: 12,
          surrogates: 100,
          seed: 3,
        }],
      ] as const
    ) {
      const res = await svc.post(path, body);
      const posted = await res.text();
      assert.equal(res.status, 201, posted.slice(0, 300));
      assert.equal(res.headers.get("content-type"), "application/json");
      const run = JSON.parse(posted);
      assert.equal(sha256Hex(canonicalJson(run.result)), run.result_digest, path);
      const { served } = await checkRun(svc, run.id);
      const { saved_series: _s, ...postedRun } = run;
      assert.deepEqual(JSON.parse(served), postedRun, `${path}: POST and GET agree`);
      const replay = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
      assert.equal(replay.identical, true, `${path}: replay gives the same digest`);
    }
  } finally {
    await svc.close();
  }
});

const pg = await startPgServer();
const adapters = [
  {
    name: "SQLite file",
    ignore: false,
    async make() {
      const dir = await Deno.makeTempDir({ prefix: "sunlag-bytes-" });
      return {
        spec: `sqlite:${join(dir, "b.db")}`,
        dispose: () => Deno.remove(dir, { recursive: true }),
      };
    },
  },
  {
    name: pg ? "PostgreSQL" : `PostgreSQL (skipped: ${pgUnavailableReason})`,
    ignore: pg === null,
    async make() {
      const db = `sunlag_bytes_${Deno.pid}_${Math.floor(performance.now())}`;
      const admin = postgres(pg!.adminUrl, { max: 1, onnotice: () => {} });
      await admin.unsafe(`CREATE DATABASE ${db}`);
      await admin.end();
      return {
        spec: pg!.urlFor(db),
        async dispose() {
          const a = postgres(pg!.adminUrl, { max: 1, onnotice: () => {} });
          await a.unsafe(`DROP DATABASE IF EXISTS ${db} WITH (FORCE)`);
          await a.end();
        },
      };
    },
  },
];

for (const adapter of adapters) {
  Deno.test({
    name:
      `run result bytes over ${adapter.name}: canonical, digest, same ETag and bytes after a restart`,
    ignore: adapter.ignore,
    sanitizeResources: false,
    sanitizeOps: false,
    async fn() {
      const storage = await adapter.make();
      try {
        const series = monthlySeries(
          "record, synthetic",
          "sunspot_number",
          "1",
          1900,
          600,
          (i) => Math.max(0, 80 * (1 - Math.cos((2 * Math.PI * i) / 132)) + 5 * Math.sin(i)),
          {
            version: "2",
          },
        );
        let id: string, first: { etag: string; served: string };
        {
          const svc = await makeTestApp({ store: storage.spec });
          try {
            const sid = await uploadSeries(svc, series);
            const res = await svc.post("/v1/cycles", { series: sid });
            assert.equal(res.status, 201);
            id = (await res.json()).id;
            first = await checkRun(svc, id);
          } finally {
            await svc.close();
          }
        }
        const svc = await makeTestApp({ store: storage.spec });
        try {
          const later = await checkRun(svc, id);
          assert.equal(later.etag, first.etag);
          assert.equal(later.served, first.served, "the same bytes after a restart");
        } finally {
          await svc.close();
        }
      } finally {
        await storage.dispose();
      }
    },
  });
}
