/**
 * The contract every `Store` adapter must pass. An adapter's test file calls
 * `storeSuite(name, makeBacking)` once per configuration (e.g. SQLite on a file and in memory).
 *
 * @module
 */
import assert from "node:assert/strict";
import type {
  RunRecord,
  RunStatus,
  Store,
  StoredSeries,
  Viewer,
} from "../../../api/store/types.ts";
import { LOCAL_OWNER } from "../../../api/store/types.ts";
import {
  DuplicateOwnerError,
  DuplicateRunError,
  MissingInputError,
  RunNotFoundError,
  TerminalRunError,
} from "../../../api/store/errors.ts";
import { fieldStoreSuite } from "./field_store_suite.ts";
import { holdingsOf } from "../../../api/auth/access.ts";

/** Where an adapter's data lives for one test. */
export interface StoreBacking {
  /** Open a store on this backing. */
  open(): Promise<Store>;
  /** True when every `open()` sees the same data (a file, a database server). */
  shared: boolean;
  /** Remove whatever the backing created. */
  dispose(): Promise<void>;
}

/** Hex string of 64 digits from a label, for fake but well-formed content ids. */
function hex64(label: string): string {
  let h = 0x811c9dc5;
  let out = "";
  for (let round = 0; out.length < 64; round++) {
    for (const ch of label + "#" + round) {
      h ^= ch.charCodeAt(0);
      h = Math.imul(h, 0x01000193) >>> 0;
    }
    out += h.toString(16).padStart(8, "0");
  }
  return out.slice(0, 64);
}

/** A series id for a test label. */
export function seriesId(label: string): string {
  return "sha256:" + hex64(label);
}

/** ISO time `s` seconds after a fixed instant, so ordering by creation is explicit. */
export function at(s: number): string {
  return new Date(Date.UTC(2026, 0, 1) + s * 1000).toISOString();
}

/** A small series with deterministic points; `label` fixes its id and values. */
export function makeSeries(
  label: string,
  opts: {
    n?: number;
    quantity?: string;
    createdAt?: string;
    uncertainty?: boolean;
    values?: number[];
    derivedFrom?: string | null;
  } = {},
): StoredSeries {
  const n = opts.values?.length ?? opts.n ?? 24;
  const time = new Float64Array(n);
  const value = new Float64Array(n);
  let seed = Number.parseInt(hex64(label).slice(0, 8), 16);
  for (let i = 0; i < n; i++) {
    time[i] = 1900 + (i + 0.5) / 12;
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    value[i] = opts.values ? opts.values[i] : seed / 2 ** 32 * 200;
  }
  const uncertainty = opts.uncertainty ? value.map((v) => Math.abs(v) * 0.1 + 1) : null;
  return {
    id: seriesId(label),
    name: `test series ${label}`,
    quantity: opts.quantity ?? "sunspot_number",
    units: "1",
    description: null,
    source: "synthetic test data",
    version: opts.quantity === undefined ? "2" : null,
    resolution: "monthly",
    n,
    start: time[0],
    end: time[n - 1],
    derived_from: opts.derivedFrom ?? null,
    created_at: opts.createdAt ?? at(0),
    time,
    value,
    uncertainty,
  };
}

/** A run record; `label` fixes its id. */
export function makeRun(
  label: string,
  opts: {
    kind?: string;
    status?: RunStatus;
    createdAt?: string;
    inputSeries?: string[];
    inputRuns?: string[];
  } = {},
): RunRecord {
  const h = hex64("run " + label);
  const id = `${h.slice(0, 8)}-${h.slice(8, 12)}-7${h.slice(13, 16)}-8${h.slice(17, 20)}-${
    h.slice(20, 32)
  }`;
  const created = opts.createdAt ?? at(0);
  const status = opts.status ?? "succeeded";
  return {
    id,
    kind: opts.kind ?? "resampling",
    created_at: created,
    updated_at: created,
    status,
    progress: status === "succeeded" ? 1 : 0,
    params: { series: opts.inputSeries?.[0] ?? null, target: "annual", nested: { a: [1, 2.5] } },
    input_series: opts.inputSeries ?? [],
    input_runs: opts.inputRuns ?? [],
    service_version: "0.1.0",
    algorithm_version: "1",
    seed: 42,
    result: status === "succeeded" ? { mean: 12.25, values: [1, null, 3], label } : null,
    result_digest: status === "succeeded" ? "0".repeat(64) : null,
    error: null,
    eta_seconds: null,
  };
}

function sameBits(a: Float64Array | null, b: Float64Array | null): boolean {
  if (a === null || b === null) return a === b;
  if (a.length !== b.length) return false;
  const x = new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  const y = new Uint8Array(b.buffer, b.byteOffset, b.byteLength);
  return x.every((v, i) => v === y[i]);
}

function isPlain(o: unknown): boolean {
  return typeof o === "object" && o !== null && Object.getPrototypeOf(o) === Object.prototype;
}

/**
 * Rows as the first schema (before owners) held them, in plain SQL both adapters run: one
 * series without points and one run using it. After the upgrade both belong to the local
 * owner, privately.
 */
export const V1_ROWS_SQL: readonly string[] = [
  `INSERT INTO series (id, name, quantity, units, resolution, n, start_time, end_time, created_at)
   VALUES ('${seriesId("v1")}', 'old series', 'other', '1', 'annual', 0, 2000.5, 2000.5,
     '2025-01-01T00:00:00.000Z')`,
  `INSERT INTO runs (id, kind, created_at, updated_at, status, progress, params,
     service_version, algorithm_version)
   VALUES ('${makeRun("v1").id}', 'smoothing', '2025-01-02T00:00:00.000Z',
     '2025-01-02T00:00:00.000Z', 'succeeded', 1, '{}', '0.1.0', '1')`,
  `INSERT INTO run_input_series (run_id, position, series_id)
   VALUES ('${makeRun("v1").id}', 0, '${seriesId("v1")}')`,
];

/** Check a store upgraded from the first schema with {@link V1_ROWS_SQL} in it. */
export async function assertUpgradedV1Rows(store: Store): Promise<void> {
  const local: Viewer = { owner: LOCAL_OWNER, group: "default", admin: false };
  const other: Viewer = { owner: "someone", group: "default", admin: false };
  assert.deepEqual(await store.seriesHolding(seriesId("v1"), local), {
    owner: LOCAL_OWNER,
    visibility: "private",
    created_at: "2025-01-01T00:00:00.000Z",
  });
  assert.equal(await store.seriesHolding(seriesId("v1"), other), null);
  assert.equal((await store.runHolding(makeRun("v1").id, local))!.visibility, "private");
  assert.equal(await store.deleteSeriesHolding(seriesId("v1"), LOCAL_OWNER), "in_use");
  assert.equal((await store.getOwner(LOCAL_OWNER))!.role, "admin");
}

/** How the suite's tests are registered for one adapter. */
export interface StoreSuiteOptions {
  /** Register the tests as ignored (e.g. no server on this machine); say why in `name`. */
  ignore?: boolean;
}

/** Register the whole contract as Deno tests named "<name>: ...". */
export function storeSuite(
  name: string,
  makeBacking: () => Promise<StoreBacking>,
  options: StoreSuiteOptions = {},
): void {
  /** Run `body` on a fresh backing and store, closing and disposing afterwards. */
  fieldStoreSuite(name, makeBacking, options);

  function withStore(
    title: string,
    body: (store: Store, backing: StoreBacking, t: Deno.TestContext) => Promise<void>,
  ): void {
    Deno.test({
      name: `${name}: ${title}`,
      ignore: options.ignore ?? false,
      async fn(t) {
        const backing = await makeBacking();
        const store = await backing.open();
        try {
          await body(store, backing, t);
        } finally {
          await store.close();
          await backing.dispose();
        }
      },
    });
  }

  withStore("ping() answers true on an open store", async (store) => {
    assert.equal(await store.ping(), true);
    assert.equal(typeof store.kind, "string");
  });

  withStore(
    "putSeries() then getSeries() round-trips Float64 values bit for bit",
    async (store) => {
      // IEEE 754 binary64 edge values: signed zero, smallest subnormal, smallest normal, largest
      // finite, and a NaN (blobs keep its bit pattern).
      const edge = [
        -0,
        0,
        5e-324,
        -5e-324,
        2.2250738585072014e-308,
        1.7976931348623157e308,
        -1.7976931348623157e308,
        1e-300,
        Math.PI,
        0.1 + 0.2,
        NaN,
        1360.8,
      ];
      const s = makeSeries("edge", { values: edge, uncertainty: true });
      const put = await store.putSeries(s);
      assert.equal(put.created, true);
      const got = await store.getSeries(s.id);
      assert.ok(got);
      assert.ok(got.time instanceof Float64Array && got.value instanceof Float64Array);
      assert.ok(sameBits(got.time, s.time), "time differs");
      assert.ok(sameBits(got.value, s.value), "value differs");
      assert.ok(Object.is(got.value[0], -0), "-0 became +0");
      assert.ok(sameBits(got.uncertainty, s.uncertainty), "uncertainty differs");
      const { time: _t, value: _v, uncertainty: _u, ...meta } = got;
      assert.deepEqual(
        { ...meta, owner: LOCAL_OWNER, visibility: "private" },
        put.series,
        "a write without a holder is held privately by the local owner",
      );
      const { owner: _o, visibility: _vis, ...putMeta } = put.series;
      assert.deepEqual(await store.getSeriesMeta(s.id), putMeta);
      assert.ok(isPlain(got) && isPlain(put.series), "rows must be plain objects");
      assert.equal(got.n, edge.length);
      assert.equal(got.version, "2");
      assert.equal(got.description, null);
    },
  );

  withStore("getSeries() keeps a null uncertainty null, distinct from a present one", async (s) => {
    const a = makeSeries("no-unc", { uncertainty: false });
    const b = makeSeries("with-unc", { uncertainty: true });
    await s.putSeries(a);
    await s.putSeries(b);
    assert.equal((await s.getSeries(a.id))!.uncertainty, null);
    assert.ok(sameBits((await s.getSeries(b.id))!.uncertainty, b.uncertainty));
  });

  withStore("getSeries() returns a copy the caller may change", async (store) => {
    const s = makeSeries("copy");
    await store.putSeries(s);
    const first = (await store.getSeries(s.id))!;
    first.value[0] = -1;
    assert.equal((await store.getSeries(s.id))!.value[0], s.value[0]);
  });

  withStore("getSeries() round-trips a 200,000-point series", async (store) => {
    const s = makeSeries("large", { n: 200_000, uncertainty: true });
    await store.putSeries(s);
    const got = (await store.getSeries(s.id))!;
    assert.equal(got.n, 200_000);
    assert.ok(sameBits(got.time, s.time) && sameBits(got.value, s.value));
    assert.ok(sameBits(got.uncertainty, s.uncertainty));
  });

  withStore("getSeries() and getSeriesMeta() answer null for an unknown id", async (store) => {
    assert.equal(await store.getSeries(seriesId("absent")), null);
    assert.equal(await store.getSeriesMeta(seriesId("absent")), null);
  });

  withStore("putSeries() is idempotent by id and keeps the first copy", async (store) => {
    const s = makeSeries("same", { createdAt: at(1) });
    const first = await store.putSeries(s);
    const again = await store.putSeries({ ...s, created_at: at(99) });
    assert.equal(first.created, true);
    assert.equal(again.created, false);
    assert.deepEqual(again.series, first.series);
    assert.equal(again.series.created_at, at(1));
    assert.equal((await store.listSeries({ limit: 10, offset: 0 })).total, 1);
  });

  withStore("putSeries() refuses inconsistent arrays and stores nothing", async (store) => {
    const s = makeSeries("bad");
    await assert.rejects(() => store.putSeries({ ...s, value: s.value.subarray(1) }), RangeError);
    await assert.rejects(() => store.putSeries({ ...s, n: s.n + 1 }), RangeError);
    await assert.rejects(
      () => store.putSeries({ ...s, uncertainty: new Float64Array(3) }),
      RangeError,
    );
    assert.equal(await store.getSeriesMeta(s.id), null);
  });

  withStore("listSeries() lists newest first, filters by quantity, and pages", async (store) => {
    const specs: [string, string, number][] = [
      ["a", "sunspot_number", 1],
      ["b", "tsi", 2],
      ["c", "sunspot_number", 3],
      ["d", "temperature_anomaly", 4],
      ["e", "sunspot_number", 5],
    ];
    for (const [label, quantity, t] of specs) {
      await store.putSeries(makeSeries(label, { quantity, createdAt: at(t) }));
    }
    const all = await store.listSeries({ limit: 10, offset: 0 });
    assert.equal(all.total, 5);
    assert.deepEqual(
      all.items.map((m) => m.name),
      ["e", "d", "c", "b", "a"].map((l) => `test series ${l}`),
    );
    assert.ok(all.items.every(isPlain));
    assert.ok(all.items.every((m) => !("value" in m) && !("time" in m)), "listing carries points");

    const spots = await store.listSeries({ quantity: "sunspot_number", limit: 2, offset: 0 });
    assert.equal(spots.total, 3);
    assert.deepEqual(spots.items.map((m) => m.id), [seriesId("e"), seriesId("c")]);
    const spots2 = await store.listSeries({ quantity: "sunspot_number", limit: 2, offset: 2 });
    assert.deepEqual(spots2.items.map((m) => m.id), [seriesId("a")]);
    assert.equal(spots2.total, 3);

    const past = await store.listSeries({ limit: 10, offset: 50 });
    assert.deepEqual(past, { items: [], total: 5 });
    assert.deepEqual(await store.listSeries({ limit: 0, offset: 0 }), { items: [], total: 5 });
    assert.deepEqual(await store.listSeries({ quantity: "radio_flux", limit: 5, offset: 0 }), {
      items: [],
      total: 0,
    });
  });

  withStore("listSeries() orders equal creation times by insertion, newest first", async (s) => {
    for (const l of ["x", "y", "z"]) await s.putSeries(makeSeries(l, { createdAt: at(7) }));
    const page = await s.listSeries({ limit: 10, offset: 0 });
    assert.deepEqual(page.items.map((m) => m.id), ["z", "y", "x"].map(seriesId));
  });

  withStore("listSeries() rejects negative or fractional paging", async (store) => {
    await assert.rejects(() => store.listSeries({ limit: -1, offset: 0 }), RangeError);
    await assert.rejects(() => store.listSeries({ limit: 1, offset: 0.5 }), RangeError);
  });

  withStore("deleteSeries() answers deleted, not_found and in_use", async (store) => {
    const free = makeSeries("free");
    const used = makeSeries("used");
    await store.putSeries(free);
    await store.putSeries(used);
    const run = makeRun("user", { inputSeries: [used.id] });
    await store.putRun(run);

    assert.equal(await store.deleteSeries(free.id), "deleted");
    assert.equal(await store.getSeries(free.id), null);
    assert.equal(await store.getSeriesMeta(free.id), null);
    assert.equal(await store.deleteSeries(free.id), "not_found");
    assert.equal(await store.deleteSeries(seriesId("never")), "not_found");

    assert.equal(await store.deleteSeries(used.id), "in_use");
    const kept = await store.getSeries(used.id);
    assert.ok(kept && sameBits(kept.value, used.value), "refused delete changed the series");
    assert.deepEqual((await store.listSeries({ limit: 10, offset: 0 })).items.map((m) => m.id), [
      used.id,
    ]);
    // The same content can be stored again after a delete.
    assert.equal((await store.putSeries(free)).created, true);
  });

  withStore("deleteSeries() allows deleting a series derived from a run", async (store) => {
    const input = makeSeries("input");
    await store.putSeries(input);
    const run = makeRun("maker", { inputSeries: [input.id] });
    await store.putRun(run);
    const derived = makeSeries("derived", { derivedFrom: run.id });
    await store.putSeries(derived);
    assert.equal((await store.getSeriesMeta(derived.id))!.derived_from, run.id);
    assert.equal(await store.deleteSeries(derived.id), "deleted");
  });

  withStore("putRun() then getRun() round-trips every field", async (store) => {
    const s1 = makeSeries("r1");
    const s2 = makeSeries("r2");
    await store.putSeries(s1);
    await store.putSeries(s2);
    const base = makeRun("base");
    await store.putRun(base);
    const run = makeRun("full", { inputSeries: [s1.id, s2.id].sort(), inputRuns: [base.id] });
    await store.putRun(run);
    const got = await store.getRun(run.id);
    assert.deepEqual(got, run);
    assert.ok(isPlain(got) && isPlain(got!.params) && isPlain(got!.result));
    assert.equal(await store.getRun("0190a0b0-0000-7000-8000-000000000000"), null);
  });

  withStore("putRun() refuses a duplicate id and missing inputs", async (store) => {
    const run = makeRun("dup");
    await store.putRun(run);
    await assert.rejects(() => store.putRun(run), DuplicateRunError);
    await assert.rejects(
      () => store.putRun(makeRun("orphan", { inputSeries: [seriesId("nowhere")] })),
      MissingInputError,
    );
    await assert.rejects(
      () => store.putRun(makeRun("orphan2", { inputRuns: [makeRun("ghost").id] })),
      MissingInputError,
    );
    assert.equal(await store.getRun(makeRun("orphan").id), null);
    assert.equal((await store.listRuns({ limit: 10, offset: 0 })).total, 1);
  });

  withStore("updateRun() changes only the given fields", async (store) => {
    const run = makeRun("upd", { status: "queued", createdAt: at(3) });
    await store.putRun(run);
    await store.updateRun(run.id, { status: "running", progress: 0.25, eta_seconds: 12.5 });
    const mid = (await store.getRun(run.id))!;
    assert.equal(mid.status, "running");
    assert.equal(mid.progress, 0.25);
    assert.equal(mid.eta_seconds, 12.5);
    assert.deepEqual(mid.params, run.params);
    assert.equal(mid.created_at, run.created_at);
    assert.ok(mid.updated_at > run.updated_at, "updated_at must advance when not given");

    const result = { answer: [1.5, null, -0.25], note: "ok" };
    await store.updateRun(run.id, {
      status: "succeeded",
      progress: 1,
      eta_seconds: null,
      result,
      result_digest: "a".repeat(64),
      updated_at: at(10),
    });
    const done = (await store.getRun(run.id))!;
    assert.deepEqual(done, {
      ...run,
      status: "succeeded",
      progress: 1,
      eta_seconds: null,
      result,
      result_digest: "a".repeat(64),
      updated_at: at(10),
    });
  });

  withStore("updateRun() rejects an unknown run id", async (store) => {
    await assert.rejects(
      () => store.updateRun(makeRun("nobody").id, { status: "failed" }),
      RunNotFoundError,
    );
  });

  withStore("updateRun() with input lists replaces the run's input links", async (store) => {
    const a = makeSeries("link-a");
    const b = makeSeries("link-b");
    await store.putSeries(a);
    await store.putSeries(b);
    const run = makeRun("relink", { inputSeries: [a.id], status: "queued" });
    await store.putRun(run);
    await store.updateRun(run.id, { input_series: [b.id] });
    assert.deepEqual((await store.getRun(run.id))!.input_series, [b.id]);
    assert.deepEqual(await store.runsUsingSeries(a.id), []);
    assert.deepEqual(await store.runsUsingSeries(b.id), [run.id]);
    assert.equal(await store.deleteSeries(a.id), "deleted");
    assert.equal(await store.deleteSeries(b.id), "in_use");
  });

  withStore("listRuns() lists summaries newest first with kind and status filters", async (s) => {
    const specs: [string, string, RunStatus, number][] = [
      ["k1", "resampling", "succeeded", 1],
      ["k2", "anomaly", "failed", 2],
      ["k3", "resampling", "running", 3],
      ["k4", "alignment", "succeeded", 4],
      ["k5", "resampling", "succeeded", 5],
    ];
    for (const [label, kind, status, t] of specs) {
      await s.putRun(makeRun(label, { kind, status, createdAt: at(t) }));
    }
    const id = (l: string) => makeRun(l).id;
    const all = await s.listRuns({ limit: 10, offset: 0 });
    assert.equal(all.total, 5);
    assert.deepEqual(all.items.map((r) => r.id), ["k5", "k4", "k3", "k2", "k1"].map(id));
    for (const r of all.items) {
      assert.ok(isPlain(r));
      assert.ok(!("params" in r) && !("result" in r) && !("error" in r), "summary too big");
      assert.ok(Array.isArray(r.input_series) && Array.isArray(r.input_runs));
    }
    const resampling = await s.listRuns({ kind: "resampling", limit: 2, offset: 0 });
    assert.equal(resampling.total, 3);
    assert.deepEqual(resampling.items.map((r) => r.id), ["k5", "k3"].map(id));
    const next = await s.listRuns({ kind: "resampling", limit: 2, offset: 2 });
    assert.deepEqual(next.items.map((r) => r.id), [id("k1")]);
    const ok = await s.listRuns({ status: "succeeded", limit: 10, offset: 0 });
    assert.deepEqual(ok.items.map((r) => r.id), ["k5", "k4", "k1"].map(id));
    const both = await s.listRuns({
      kind: "resampling",
      status: "succeeded",
      limit: 10,
      offset: 0,
    });
    assert.deepEqual(both.items.map((r) => r.id), ["k5", "k1"].map(id));
    assert.equal(both.total, 2);
    assert.deepEqual(await s.listRuns({ kind: "none", limit: 10, offset: 0 }), {
      items: [],
      total: 0,
    });
  });

  withStore("listRuns() summaries carry each run's own inputs", async (store) => {
    const a = makeSeries("in-a");
    const b = makeSeries("in-b");
    await store.putSeries(a);
    await store.putSeries(b);
    const r1 = makeRun("in-1", { inputSeries: [a.id, b.id].sort(), createdAt: at(1) });
    const r2 = makeRun("in-2", { inputSeries: [b.id], inputRuns: [r1.id], createdAt: at(2) });
    await store.putRun(r1);
    await store.putRun(r2);
    const page = await store.listRuns({ limit: 10, offset: 0 });
    const byId = new Map(page.items.map((r) => [r.id, r]));
    assert.deepEqual(byId.get(r1.id)!.input_series, r1.input_series);
    assert.deepEqual(byId.get(r1.id)!.input_runs, []);
    assert.deepEqual(byId.get(r2.id)!.input_series, [b.id]);
    assert.deepEqual(byId.get(r2.id)!.input_runs, [r1.id]);
  });

  withStore("runsUsingSeries() lists every run with the series as input", async (store) => {
    const a = makeSeries("use-a");
    const b = makeSeries("use-b");
    const c = makeSeries("use-c");
    for (const s of [a, b, c]) await store.putSeries(s);
    const r1 = makeRun("u1", { inputSeries: [a.id], createdAt: at(1) });
    const r2 = makeRun("u2", { inputSeries: [a.id, b.id].sort(), createdAt: at(2) });
    const r3 = makeRun("u3", { inputSeries: [b.id], createdAt: at(3) });
    for (const r of [r1, r2, r3]) await store.putRun(r);
    assert.deepEqual((await store.runsUsingSeries(a.id)).sort(), [r1.id, r2.id].sort());
    assert.deepEqual((await store.runsUsingSeries(b.id)).sort(), [r2.id, r3.id].sort());
    assert.deepEqual(await store.runsUsingSeries(c.id), []);
    assert.deepEqual(await store.runsUsingSeries(seriesId("unknown")), []);
  });

  withStore(
    "failOrphaned({ all }) fails queued and running runs with a problem body",
    async (s) => {
      const statuses: RunStatus[] = ["queued", "running", "succeeded", "failed", "cancelled"];
      for (const [i, status] of statuses.entries()) {
        await s.putRun(makeRun(`int-${status}`, { status, createdAt: at(i) }));
      }
      const reason = "the service restarted while this run was in progress";
      assert.equal(await s.failOrphaned(reason, { all: true }), 2);
      for (const status of statuses) {
        const r = (await s.getRun(makeRun(`int-${status}`).id))!;
        if (status === "queued" || status === "running") {
          assert.equal(r.status, "failed");
          assert.ok(r.error);
          assert.equal(r.error.status, 500);
          assert.equal(r.error.detail, reason);
          assert.equal(typeof r.error.type, "string");
          assert.equal(typeof r.error.title, "string");
          assert.equal(r.eta_seconds, null);
        } else {
          assert.equal(r.status, status);
          assert.equal(r.error, null);
        }
      }
      assert.equal(await s.failOrphaned(reason, { all: true }), 0);
    },
  );

  withStore("failOrphaned() without `all` touches only runs whose lease expired", async (s) => {
    await s.putRun(makeRun("lease-live", { status: "queued", createdAt: at(1) }));
    await s.putRun(makeRun("lease-dead", { status: "queued", createdAt: at(2) }));
    await s.putRun(makeRun("lease-waiting", { status: "queued", createdAt: at(3) }));
    const live = makeRun("lease-live").id;
    const dead = makeRun("lease-dead").id;
    assert.ok(await s.claimRun(live, "worker-a", 60));
    assert.ok(await s.claimRun(dead, "worker-b", 0.3));
    await new Promise((r) => setTimeout(r, 450));
    assert.equal(await s.failOrphaned("lost", { all: false }), 1);
    assert.equal((await s.getRun(dead))!.status, "failed");
    assert.equal((await s.getRun(live))!.status, "running");
    assert.equal((await s.getRun(makeRun("lease-waiting").id))!.status, "queued");
  });

  withStore(
    "claimRun() leases a queued run to one holder; an expired lease is taken over",
    async (s) => {
      await s.putRun(makeRun("claim", { status: "queued", createdAt: at(1) }));
      const id = makeRun("claim").id;
      const got = await s.claimRun(id, "worker-a", 1.5);
      assert.equal(got?.status, "running");
      assert.equal(await s.claimRun(id, "worker-b", 60), null, "held: not claimable");
      await new Promise((r) => setTimeout(r, 1700));
      assert.equal(
        (await s.claimRun(id, "worker-b", 60))?.status,
        "running",
        "expired: taken over",
      );
      // The first holder lost it: its writes are refused, the new holder's go through.
      assert.equal(await s.renewLease(id, "worker-a", 60), false);
      assert.equal(await s.updateLeased(id, "worker-a", { progress: 0.5 }), false);
      assert.equal(await s.updateLeased(id, "worker-b", { progress: 0.25 }), true);
      assert.equal((await s.getRun(id))!.progress, 0.25);
    },
  );

  withStore(
    "updateLeased(): a terminal write lands once; terminal states never change",
    async (s) => {
      await s.putRun(makeRun("final", { status: "queued", createdAt: at(1) }));
      const id = makeRun("final").id;
      await s.claimRun(id, "w", 60);
      const done = {
        status: "succeeded" as const,
        progress: 1,
        result: { x: 1 },
        result_digest: "d",
      };
      assert.equal(await s.updateLeased(id, "w", done), true);
      assert.equal(
        await s.updateLeased(id, "w", done),
        false,
        "a job completing twice writes once",
      );
      assert.equal(await s.updateLeased(id, "w", { status: "failed" }), false);
      assert.equal(await s.claimRun(id, "other", 60), null);
      assert.deepEqual(await s.cancelRun(id), { status: "succeeded", changed: false });
      await assert.rejects(() => s.updateRun(id, { status: "failed" }), TerminalRunError);
      const r = (await s.getRun(id))!;
      assert.equal(r.status, "succeeded");
      assert.deepEqual(r.result, { x: 1 });
    },
  );

  withStore(
    "cancelRun(): queued and running runs end cancelled; unknown ids answer null",
    async (s) => {
      await s.putRun(makeRun("c-q", { status: "queued", createdAt: at(1) }));
      await s.putRun(makeRun("c-r", { status: "queued", createdAt: at(2) }));
      await s.claimRun(makeRun("c-r").id, "w", 60);
      const cancelled = { status: "cancelled", changed: true };
      assert.deepEqual(await s.cancelRun(makeRun("c-q").id), cancelled);
      assert.deepEqual(await s.cancelRun(makeRun("c-r").id), cancelled);
      assert.deepEqual(await s.cancelRun(makeRun("c-r").id), { ...cancelled, changed: false });
      assert.equal(await s.updateLeased(makeRun("c-r").id, "w", { status: "succeeded" }), false);
      assert.equal((await s.getRun(makeRun("c-r").id))!.status, "cancelled");
      assert.equal(await s.cancelRun("01900000-0000-7000-8000-000000000000"), null);
    },
  );

  withStore("concurrent writers all succeed and see each other's writes", async (store, b) => {
    // Two store instances on the same backing when it is shared, else two users of one store.
    const other = b.shared ? await b.open() : store;
    try {
      const count = 40;
      const writes = (who: Store, tag: string) =>
        Array.from({ length: count }, async (_, i) => {
          const s = makeSeries(`${tag}-${i}`, { n: 500, createdAt: at(i) });
          await who.putSeries(s);
          const r = makeRun(`${tag}-${i}`, { inputSeries: [s.id], status: "running" });
          await who.putRun(r);
          await who.updateRun(r.id, { status: "succeeded", progress: 1 });
        });
      await Promise.all([...writes(store, "w1"), ...writes(other, "w2")]);
      for (const who of [store, other]) {
        assert.equal((await who.listSeries({ limit: 1, offset: 0 })).total, 2 * count);
        const runs = await who.listRuns({ status: "succeeded", limit: 1, offset: 0 });
        assert.equal(runs.total, 2 * count);
      }
      for (let i = 0; i < count; i++) {
        const s = makeSeries(`w2-${i}`, { n: 500 });
        assert.ok(sameBits((await store.getSeries(s.id))!.value, s.value));
      }
    } finally {
      if (other !== store) await other.close();
    }
  });

  withStore("a reopened store keeps everything (shared backings)", async (store, b, t) => {
    if (!b.shared) {
      await t.step({ name: "not applicable: the backing is private", ignore: true, fn() {} });
      return;
    }
    const s = makeSeries("keep", { uncertainty: true });
    await store.putSeries(s);
    const r = makeRun("keep", { inputSeries: [s.id] });
    await store.putRun(r);
    await store.close();
    const again = await b.open();
    try {
      assert.ok(sameBits((await again.getSeries(s.id))!.uncertainty, s.uncertainty));
      assert.deepEqual(await again.getRun(r.id), r);
      assert.equal(await again.deleteSeries(s.id), "in_use");
    } finally {
      await again.close();
    }
  });

  // --- Owners, keys and holdings -------------------------------------------------------------

  const viewer = (owner: string | null, group: string | null = "g1"): Viewer => ({
    owner,
    group: owner === null ? null : group,
    admin: false,
  });
  const ADMIN: Viewer = { owner: LOCAL_OWNER, group: "default", admin: true };
  const addOwners = async (store: Store) => {
    for (const [id, group] of [["analyst_a", "g1"], ["analyst_b", "g1"], ["analyst_c", "g2"]]) {
      await store.putOwner({ id, name: id, role: "writer", group, created_at: at(0) });
    }
  };

  withStore("the local owner exists in a new store, and owners are unique", async (store) => {
    const local = await store.getOwner(LOCAL_OWNER);
    assert.ok(local);
    assert.equal(local.role, "admin");
    await addOwners(store);
    assert.deepEqual((await store.listOwners()).map((o) => o.id).sort(), [
      "analyst_a",
      "analyst_b",
      "analyst_c",
      LOCAL_OWNER,
    ]);
    await assert.rejects(
      () =>
        store.putOwner({
          id: "analyst_a",
          name: "x",
          role: "reader",
          group: "g",
          created_at: at(1),
        }),
      DuplicateOwnerError,
    );
    assert.deepEqual(await store.getOwner("analyst_a"), {
      id: "analyst_a",
      name: "analyst_a",
      role: "writer",
      group: "g1",
      created_at: at(0),
    });
    assert.equal(await store.getOwner("nobody"), null);
  });

  withStore(
    "API keys are stored by id with their hash, listed, and revoked once",
    async (store) => {
      await addOwners(store);
      const key = {
        id: "k1",
        owner: "analyst_a",
        hash: "ab".repeat(32),
        label: "laptop",
        role: null,
        created_at: at(1),
        expires_at: at(1000),
        revoked_at: null,
      };
      await store.putApiKey(key);
      await store.putApiKey({
        ...key,
        id: "k2",
        owner: "analyst_b",
        role: "reader",
        expires_at: null,
      });
      await assert.rejects(() => store.putApiKey({ ...key, id: "k3", owner: "ghost" }), RangeError);
      await assert.rejects(() => store.putApiKey(key), RangeError);
      assert.deepEqual(await store.getApiKey("k1"), key);
      assert.equal(await store.getApiKey("k9"), null);
      assert.deepEqual((await store.listApiKeys()).map((k) => k.id), ["k1", "k2"]);
      assert.deepEqual((await store.listApiKeys("analyst_b")).map((k) => k.id), ["k2"]);
      assert.equal(await store.revokeApiKey("k1", at(5)), true);
      assert.equal(await store.revokeApiKey("k1", at(6)), false, "revoked twice");
      assert.equal(await store.revokeApiKey("k9", at(6)), false);
      assert.equal((await store.getApiKey("k1"))!.revoked_at, at(5));
    },
  );

  withStore("the same content held by two owners is one series and two holdings", async (s) => {
    await addOwners(s);
    const x = makeSeries("shared-content", { createdAt: at(1) });
    const a = await s.putSeries(x, { owner: "analyst_a", visibility: "private" });
    const b = await s.putSeries({ ...x, created_at: at(9) }, {
      owner: "analyst_c",
      visibility: "private",
    });
    // Each owner is told its copy is new, with its own time: nothing says the other holds it.
    assert.equal(a.created, true);
    assert.equal(b.created, true);
    assert.equal(a.series.id, b.series.id);
    assert.equal(a.series.created_at, at(1));
    assert.equal(b.series.created_at, at(9));
    assert.equal(b.series.owner, "analyst_c");
    const again = await s.putSeries(x, { owner: "analyst_c", visibility: "public" });
    assert.equal(again.created, false);
    assert.equal(again.series.visibility, "private", "a repeated upload changed the visibility");
    assert.equal((await s.listSeries({ limit: 10, offset: 0 })).total, 1);
    for (const who of ["analyst_a", "analyst_c"]) {
      const page = await s.listSeries({ limit: 10, offset: 0, viewer: viewer(who, "gx") });
      assert.equal(page.total, 1);
      assert.equal(page.items[0].owner, who);
    }
    assert.equal(
      (await s.listSeries({ limit: 10, offset: 0, viewer: viewer("analyst_b") })).total,
      0,
    );
  });

  withStore("visibility decides who lists and sees a series", async (store) => {
    await addOwners(store);
    const priv = makeSeries("v-private", { createdAt: at(1) });
    const grp = makeSeries("v-group", { createdAt: at(2) });
    const pub = makeSeries("v-public", { createdAt: at(3) });
    await store.putSeries(priv, { owner: "analyst_a", visibility: "private" });
    await store.putSeries(grp, { owner: "analyst_a", visibility: "group" });
    await store.putSeries(pub, { owner: "analyst_a", visibility: "public" });
    const ids = async (v: Viewer) =>
      (await store.listSeries({ limit: 10, offset: 0, viewer: v })).items.map((m) => m.id);
    assert.deepEqual(await ids(viewer("analyst_a")), [pub.id, grp.id, priv.id]);
    assert.deepEqual(await ids(viewer("analyst_b")), [pub.id, grp.id], "same group");
    assert.deepEqual(await ids(viewer("analyst_c", "g2")), [pub.id], "other group");
    assert.deepEqual(await ids(viewer(null)), [pub.id], "anonymous");
    assert.deepEqual(await ids(ADMIN), [pub.id, grp.id, priv.id], "admin");
    const page = await store.listSeries({ limit: 1, offset: 1, viewer: viewer("analyst_b") });
    assert.deepEqual([page.total, page.items.map((m) => m.id)], [2, [grp.id]]);
    const q = await store.listSeries({
      quantity: "other",
      limit: 10,
      offset: 0,
      viewer: viewer("analyst_b"),
    });
    assert.equal(q.total, 0);
    assert.equal(await store.seriesHolding(priv.id, viewer("analyst_b")), null);
    assert.equal(await store.seriesHolding(priv.id, viewer(null)), null);
    assert.deepEqual(await store.seriesHolding(grp.id, viewer("analyst_b")), {
      owner: "analyst_a",
      visibility: "group",
      created_at: at(2),
    });
    assert.equal(await store.seriesHolding(grp.id, viewer("analyst_c", "g2")), null);
    assert.ok(await store.seriesHolding(priv.id, ADMIN));
    // The viewer's own holding is the one it sees, even beside a wider one.
    await store.putSeries({ ...pub, created_at: at(7) }, {
      owner: "analyst_b",
      visibility: "private",
    });
    assert.deepEqual(await store.seriesHolding(pub.id, viewer("analyst_b")), {
      owner: "analyst_b",
      visibility: "private",
      created_at: at(7),
    });
    assert.equal(await store.setSeriesVisibility(priv.id, "analyst_a", "group"), true);
    assert.equal(
      await store.setSeriesVisibility(priv.id, "analyst_b", "public"),
      false,
      "not analyst_b's",
    );
    assert.ok(await store.seriesHolding(priv.id, viewer("analyst_b")));
    await assert.rejects(() => store.setSeriesVisibility(priv.id, "analyst_a", "world" as never));
  });

  withStore(
    "an access check sees a visibility change at once, made here or through another connection",
    async (store, b) => {
      await addOwners(store);
      const other = b.shared ? await b.open() : store;
      try {
        const x = makeSeries("seen-at-once");
        await store.putSeries(x, { owner: "analyst_a", visibility: "public" });
        const r = makeRun("seen-at-once", { inputSeries: [x.id] });
        await store.putRun(r, { owner: "analyst_a", visibility: "public" });
        for (let k = 0; k < 2; k++) {
          // asked twice: a remembered answer must not outlive the change
          assert.ok(await store.seriesHolding(x.id, viewer(null)));
          assert.ok(await store.runHolding(r.id, viewer("analyst_c", "g2")));
        }
        assert.equal(await other.setSeriesVisibility(x.id, "analyst_a", "private"), true);
        assert.equal(await other.setRunVisibility(r.id, "analyst_a", "group"), true);
        assert.equal(await store.seriesHolding(x.id, viewer(null)), null);
        assert.equal(await store.runHolding(r.id, viewer("analyst_c", "g2")), null);
        assert.ok(await store.runHolding(r.id, viewer("analyst_b")));
        assert.equal(await store.setRunVisibility(r.id, "analyst_a", "private"), true);
        assert.equal(await store.runHolding(r.id, viewer("analyst_b")), null);
        assert.equal(await store.setSeriesVisibility(x.id, "analyst_a", "public"), true);
        assert.ok(await store.seriesHolding(x.id, viewer(null)));
      } finally {
        if (other !== store) await other.close();
      }
    },
  );

  withStore(
    "holdingsOf() answers a run and series together as one by one, and sees changes at once",
    async (store, b) => {
      await addOwners(store);
      const other = b.shared ? await b.open() : store;
      try {
        const x = makeSeries("together-x"), y = makeSeries("together-y");
        await store.putSeries(x, { owner: "analyst_a", visibility: "public" });
        await store.putSeries(y, { owner: "analyst_a", visibility: "private" });
        const r = makeRun("together", { inputSeries: [x.id, y.id] });
        await store.putRun(r, { owner: "analyst_a", visibility: "group" });
        const items = [
          { kind: "run", id: r.id },
          { kind: "series", id: x.id },
          { kind: "series", id: y.id },
          { kind: "series", id: seriesId("nobody-holds") },
        ] as const;
        for (const v of [viewer("analyst_a"), viewer("analyst_b"), viewer(null), ADMIN]) {
          const oneByOne = [
            await store.runHolding(r.id, v),
            await store.seriesHolding(x.id, v),
            await store.seriesHolding(y.id, v),
            null,
          ];
          assert.deepEqual(await holdingsOf(store, items, v), oneByOne);
        }
        assert.deepEqual(
          (await holdingsOf(store, items, viewer("analyst_b"))).map((h) => h !== null),
          [true, true, false, false],
        );
        assert.equal(await other.setSeriesVisibility(x.id, "analyst_a", "private"), true);
        assert.equal(await other.setRunVisibility(r.id, "analyst_a", "private"), true);
        assert.deepEqual(
          (await holdingsOf(store, items, viewer("analyst_b"))).map((h) => h !== null),
          [false, false, false, false],
        );
        assert.equal(await store.setSeriesVisibility(y.id, "analyst_a", "public"), true);
        assert.deepEqual(
          (await holdingsOf(store, items, viewer(null))).map((h) => h !== null),
          [false, false, true, false],
        );
      } finally {
        if (other !== store) await other.close();
      }
    },
  );

  withStore(
    "deleteSeriesHolding() removes one holding; the content goes with the last",
    async (s) => {
      await addOwners(s);
      const x = makeSeries("two-holders");
      await s.putSeries(x, { owner: "analyst_a", visibility: "private" });
      await s.putSeries(x, { owner: "analyst_b", visibility: "private" });
      const r = makeRun("analyst_b-uses", { inputSeries: [x.id] });
      await s.putRun(r, { owner: "analyst_b", visibility: "private" });
      assert.deepEqual(await s.seriesUsage(x.id, "analyst_b"), { own: [r.id], others: 0 });
      assert.deepEqual(await s.seriesUsage(x.id, "analyst_a"), { own: [], others: 1 });
      assert.equal(await s.deleteSeriesHolding(x.id, "analyst_c"), "not_found");
      assert.equal(
        await s.deleteSeriesHolding(x.id, "analyst_b"),
        "in_use",
        "analyst_b's own run uses it",
      );
      // Analyst A's delete succeeds without telling her that analyst_b holds or uses the same content.
      assert.equal(await s.deleteSeriesHolding(x.id, "analyst_a"), "deleted");
      assert.equal(await s.seriesHolding(x.id, viewer("analyst_a")), null);
      assert.ok(await s.getSeries(x.id), "analyst_b's copy went with analyst_a's holding");
      assert.equal(await s.deleteSeriesHolding(x.id, "analyst_a"), "not_found");

      const y = makeSeries("one-holder");
      await s.putSeries(y, { owner: "analyst_a", visibility: "group" });
      const used = makeRun("analyst_b-uses-shared", { inputSeries: [y.id] });
      await s.putRun(used, { owner: "analyst_b", visibility: "private" });
      assert.equal(
        await s.deleteSeriesHolding(y.id, "analyst_a"),
        "in_use",
        "a run still needs it",
      );
      const z = makeSeries("unused");
      await s.putSeries(z, { owner: "analyst_a", visibility: "private" });
      assert.equal(await s.deleteSeriesHolding(z.id, "analyst_a"), "deleted");
      assert.equal(await s.getSeries(z.id), null, "the last holding took the content along");
      assert.equal(
        (await s.putSeries(z, { owner: "analyst_a", visibility: "private" })).created,
        true,
      );
    },
  );

  withStore("deleteSeries() removes every holding with the content", async (store) => {
    await addOwners(store);
    const x = makeSeries("admin-delete");
    await store.putSeries(x, { owner: "analyst_a", visibility: "private" });
    await store.putSeries(x, { owner: "analyst_b", visibility: "public" });
    assert.equal(await store.deleteSeries(x.id), "deleted");
    assert.equal(await store.seriesHolding(x.id, ADMIN), null);
    assert.equal((await store.listSeries({ limit: 5, offset: 0, viewer: ADMIN })).total, 0);
  });

  withStore("runs are listed and seen by visibility, and may gain holders", async (store) => {
    await addOwners(store);
    const x = makeSeries("run-input");
    await store.putSeries(x, { owner: "analyst_a", visibility: "group" });
    const mine = makeRun("analyst_a-private", { inputSeries: [x.id], createdAt: at(1) });
    const shared = makeRun("analyst_a-group", { inputSeries: [x.id], createdAt: at(2) });
    const cited = makeRun("analyst_a-public", { createdAt: at(3) });
    await store.putRun(mine, { owner: "analyst_a", visibility: "private" });
    await store.putRun(shared, { owner: "analyst_a", visibility: "group" });
    await store.putRun(cited, { owner: "analyst_a", visibility: "public" });
    assert.deepEqual(await store.getRun(mine.id), mine, "holdings changed the record");
    const ids = async (v: Viewer, kind?: string) =>
      (await store.listRuns({ kind, limit: 10, offset: 0, viewer: v })).items.map((r) => r.id);
    assert.deepEqual(await ids(viewer("analyst_a")), [cited.id, shared.id, mine.id]);
    assert.deepEqual(await ids(viewer("analyst_b")), [cited.id, shared.id]);
    assert.deepEqual(await ids(viewer("analyst_c", "g2")), [cited.id]);
    assert.deepEqual(await ids(viewer(null)), [cited.id]);
    assert.deepEqual(await ids(viewer("analyst_b"), "none"), []);
    const page = await store.listRuns({ limit: 10, offset: 0, viewer: viewer("analyst_b") });
    assert.equal(page.total, 2);
    assert.equal(page.items[1].owner, "analyst_a");
    assert.equal(page.items[1].visibility, "group");
    assert.deepEqual(page.items[1].input_series, [x.id]);
    assert.equal(await store.runHolding(mine.id, viewer("analyst_b")), null);
    assert.equal((await store.runHolding(mine.id, ADMIN))!.owner, "analyst_a");
    assert.deepEqual(await store.runsUsingSeries(x.id, viewer("analyst_b")), [shared.id]);
    assert.deepEqual((await store.runsUsingSeries(x.id)).sort(), [mine.id, shared.id].sort());
    assert.equal(await store.setRunVisibility(mine.id, "analyst_b", "public"), false);
    assert.equal(await store.setRunVisibility(mine.id, "analyst_a", "public"), true);
    assert.ok(await store.runHolding(mine.id, viewer(null)));
    assert.equal(
      await store.addRunHolding(cited.id, { owner: "analyst_c", visibility: "private" }),
      true,
    );
    assert.equal(
      await store.addRunHolding(cited.id, { owner: "analyst_c", visibility: "public" }),
      false,
    );
    assert.equal((await store.runHolding(cited.id, viewer("analyst_c", "g2")))!.owner, "analyst_c");
    await assert.rejects(
      () =>
        store.addRunHolding(makeRun("ghost-run").id, { owner: "analyst_c", visibility: "private" }),
      RunNotFoundError,
    );
  });

  withStore("storedBytes() counts the points and run texts an owner holds", async (store) => {
    await addOwners(store);
    assert.equal(await store.storedBytes("analyst_a"), 0);
    const x = makeSeries("bytes", { n: 100 });
    await store.putSeries(x, { owner: "analyst_a", visibility: "private" });
    assert.equal(await store.storedBytes("analyst_a"), 2400);
    await store.putSeries(x, { owner: "analyst_b", visibility: "private" });
    assert.equal(
      await store.storedBytes("analyst_b"),
      2400,
      "shared content counts for each holder",
    );
    const r = makeRun("bytes-run", { inputSeries: [x.id] });
    await store.putRun(r, { owner: "analyst_a", visibility: "private" });
    const runBytes = new TextEncoder().encode(JSON.stringify(r.params)).length +
      new TextEncoder().encode(JSON.stringify(r.result)).length;
    assert.equal(await store.storedBytes("analyst_a"), 2400 + runBytes);
    assert.equal(await store.storedBytes("analyst_c"), 0);
  });
}
