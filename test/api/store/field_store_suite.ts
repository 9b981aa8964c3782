/**
 * The stored-field part of the store contract (api/store/field_types.ts), run against every
 * adapter by `storeSuite`: staged writes invisible until committed, content-addressed commit,
 * block reads of time ranges and cells, the in-use rule for runs, and interrupted uploads.
 *
 * @module
 */
import assert from "node:assert/strict";
import type { FieldStaging, Store } from "../../../api/store/types.ts";
import { MissingInputError } from "../../../api/store/errors.ts";
import type { StoreBacking, StoreSuiteOptions } from "./store_suite.ts";
import { makeRun } from "./store_suite.ts";

/** A staged field of nTime × 2 × 3 cells whose value at (t, c) is t + c / 10 (cell 4 missing at t = 1). */
export function makeFieldStaging(
  label: string,
  opts: { nTime?: number; blockRows?: number } = {},
): { staging: FieldStaging; values: Float32Array } {
  const nTime = opts.nTime ?? 7, per = 6;
  const values = Float32Array.from({ length: nTime * per }, (_, i) => {
    const t = Math.floor(i / per), c = i % per;
    return t === 1 && c === 4 ? NaN : t + c / 10;
  });
  return {
    values,
    staging: {
      name: `field ${label}`,
      variable: "tas",
      quantity: "temperature_anomaly",
      units: "K",
      description: null,
      source: "invented",
      resolution: "monthly",
      n_time: nTime,
      n_lat: 2,
      n_lon: 3,
      start: 2000 + 1 / 24,
      end: 2000 + (nTime - 0.5) / 12,
      block_rows: opts.blockRows ?? 3,
      missing: 1,
      info: {
        format: "netcdf3-classic",
        calendar: "noleap",
        time_units: "days since 2000-01-01",
        time_placement: "same_month",
        standard_name: null,
        long_name: "invented",
        min: 0,
        max: nTime - 1 + 0.5,
      },
      created_at: new Date().toISOString(),
      time: Float64Array.from({ length: nTime }, (_, t) => 2000 + (t + 0.5) / 12),
      lat: Float64Array.of(-45, 45),
      lon: Float64Array.of(0, 120, 240),
      lat_bounds: Float64Array.of(-90, 0, 0, 90),
      lon_bounds: null,
    },
  };
}

/** A content id for a test label. */
export function fieldId(label: string): string {
  let h = 0x811c9dc5, out = "";
  for (let round = 0; out.length < 64; round++) {
    for (const ch of `${label}#${round}`) {
      h ^= ch.charCodeAt(0);
      h = Math.imul(h, 0x01000193) >>> 0;
    }
    out += h.toString(16).padStart(8, "0");
  }
  return "field:sha256:" + out.slice(0, 64);
}

/** Stage, write every block, commit; returns the id. */
export async function storeField(
  store: Store,
  label: string,
  opts: { nTime?: number; blockRows?: number } = {},
): Promise<{ id: string; values: Float32Array; staging: FieldStaging }> {
  const { staging, values } = makeFieldStaging(label, opts);
  const stage = await store.beginField(staging);
  const per = staging.n_lat * staging.n_lon;
  for (let b = 0, t = 0; t < staging.n_time; b++, t += staging.block_rows) {
    const rows = Math.min(staging.block_rows, staging.n_time - t);
    await store.putFieldBlock(stage, b, t, rows, values.slice(t * per, (t + rows) * per));
  }
  const id = fieldId(label);
  await store.commitField(stage, id);
  return { id, values, staging };
}

function sameBits(a: Float32Array, b: Float32Array): boolean {
  if (a.length !== b.length) return false;
  const x = new Uint32Array(a.buffer, a.byteOffset, a.length);
  const y = new Uint32Array(b.buffer, b.byteOffset, b.length);
  return x.every((v, i) => v === y[i]);
}

/** Register the field contract as Deno tests named "<name>: fields: ...". */
export function fieldStoreSuite(
  name: string,
  makeBacking: () => Promise<StoreBacking>,
  options: StoreSuiteOptions = {},
): void {
  const withStore = (title: string, body: (store: Store, b: StoreBacking) => Promise<void>) =>
    Deno.test({
      name: `${name}: fields: ${title}`,
      ignore: options.ignore ?? false,
      async fn() {
        const backing = await makeBacking();
        const store = await backing.open();
        try {
          await body(store, backing);
        } finally {
          await store.close();
          await backing.dispose();
        }
      },
    });

  withStore(
    "a committed field reads back bit for bit, whole, by time range and by cell",
    async (store) => {
      const { id, values, staging } = await storeField(store, "a");
      const d = (await store.getField(id))!;
      assert.equal(d.id, id);
      assert.equal(d.n_time, 7);
      assert.equal(d.owner, "local");
      assert.equal(d.visibility, "private");
      assert.deepEqual(d.info, staging.info);
      assert.deepEqual(Array.from(d.time), Array.from(staging.time));
      assert.deepEqual(Array.from(d.lat_bounds!), [-90, 0, 0, 90]);
      assert.equal(d.lon_bounds, null);
      assert.ok(sameBits(await store.readFieldSteps(id, 0, 7), values));
      // a range across a block boundary (blocks of 3 steps)
      assert.ok(sameBits(await store.readFieldSteps(id, 2, 5), values.slice(12, 30)));
      const cell4 = await store.readFieldCell(id, 4);
      assert.deepEqual(
        Array.from(cell4),
        Array.from({ length: 7 }, (_, t) => (t === 1 ? NaN : Math.fround(t + 0.4))),
      );
      await assert.rejects(() => store.readFieldSteps(id, 5, 9), RangeError);
      await assert.rejects(() => store.readFieldCell(id, 6), RangeError);
    },
  );

  withStore("a staged field is invisible, and abort or the sweep removes it", async (store) => {
    const { staging } = makeFieldStaging("s");
    const stage = await store.beginField(staging);
    assert.equal((await store.listFields({ limit: 10, offset: 0 })).total, 0);
    await store.abortField(stage);
    const again = await store.beginField(staging);
    assert.equal(await store.dropStagedFields(3600), 0);
    await new Promise((r) => setTimeout(r, 5));
    assert.equal(await store.dropStagedFields(0), 1);
    await assert.rejects(() => store.commitField(again, fieldId("s")), RangeError);
  });

  withStore(
    "commit refuses missing blocks; a block of the wrong shape is refused",
    async (store) => {
      const { staging, values } = makeFieldStaging("m");
      const stage = await store.beginField(staging);
      await store.putFieldBlock(stage, 0, 0, 3, values.slice(0, 18));
      await assert.rejects(
        () => store.putFieldBlock(stage, 1, 3, 2, values.slice(18, 30)),
        RangeError,
      );
      await assert.rejects(() => store.commitField(stage, fieldId("m")), /1 of 3 blocks/);
      await store.abortField(stage);
    },
  );

  withStore("the same content committed twice is stored once", async (store) => {
    const first = await storeField(store, "dup");
    const { staging, values } = makeFieldStaging("dup");
    const stage = await store.beginField(staging);
    for (let b = 0; b < 3; b++) {
      const rows = Math.min(3, 7 - 3 * b);
      await store.putFieldBlock(stage, b, 3 * b, rows, values.slice(18 * b, 18 * b + rows * 6));
    }
    const again = await store.commitField(stage, first.id);
    assert.equal(again.created, false);
    assert.equal(again.field.id, first.id);
    const page = await store.listFields({ limit: 10, offset: 0 });
    assert.equal(page.total, 1);
    assert.equal(page.items[0].id, first.id);
  });

  withStore(
    "a field a run uses cannot be deleted; a run cannot use a missing field",
    async (store) => {
      const { id } = await storeField(store, "used");
      const { id: free } = await storeField(store, "free");
      const run = { ...makeRun("uses-field"), input_fields: [id] };
      await store.putRun(run);
      assert.deepEqual((await store.getRun(run.id))!.input_fields, [id]);
      assert.deepEqual(await store.runsUsingField(id), [run.id]);
      assert.equal(await store.deleteField(id), "in_use");
      assert.ok(await store.getField(id));
      assert.equal(await store.deleteField(free), "deleted");
      assert.equal(await store.deleteField(free), "not_found");
      assert.equal(await store.getField(free), null);
      await assert.rejects(
        () => store.putRun({ ...makeRun("ghost"), input_fields: [fieldId("ghost")] }),
        MissingInputError,
      );
      // a run without fields reads back without the key
      const plain = makeRun("plain");
      await store.putRun(plain);
      assert.equal("input_fields" in (await store.getRun(plain.id))!, false);
    },
  );

  withStore("listFields() pages newest first", async (store) => {
    for (const l of ["p1", "p2", "p3"]) {
      await storeField(store, l, { nTime: 2, blockRows: 5 });
      await new Promise((r) => setTimeout(r, 3));
    }
    const page = await store.listFields({ limit: 2, offset: 1 });
    assert.equal(page.total, 3);
    assert.deepEqual(page.items.map((f) => f.name), ["field p2", "field p1"]);
    await assert.rejects(() => store.listFields({ limit: -1, offset: 0 }), RangeError);
  });
}
