/**
 * Field uploads that cannot be used answer an RFC 9457 problem naming what is wrong, and
 * nothing is stored (no field, no staged block): not NetCDF, a variable that is not (time,
 * lat, lon), an unknown calendar, non-monotonic coordinates or times, over the field size
 * limit (declared or streamed), a truncated file. A seeded fuzz test over corrupted NetCDF-3
 * and NetCDF-4 fields: never a 500, never a hang, nothing stored from a refused file.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, type TestService } from "../helpers.ts";
import { gridNetcdf, midMonthDays } from "./grid_file.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { NETCDF4_TIMEOUT_SECONDS, stopNetcdf4Worker } from "../../../api/netcdf/netcdf4_source.ts";

const LAT = [-45, 0, 45], LON = [0, 120, 240];
const values = (n: number) => Array.from({ length: n * 9 }, (_, i) => 280 + Math.sin(i));
const good = (o: Partial<Parameters<typeof gridNetcdf>[0]> = {}) =>
  gridNetcdf({ startYear: 2000, nTime: 24, lat: LAT, lon: LON, values: values(24), ...o });

async function post(svc: TestService, body: BodyInit, query = "", type = "application/x-netcdf") {
  return await svc.app.request(`/v1/fields${query}`, {
    method: "POST",
    headers: { "content-type": type },
    body,
  });
}

async function nothingStored(svc: TestService) {
  assert.equal(
    (await svc.store.listFields({ limit: 5, offset: 0 })).total,
    0,
    "a field was stored",
  );
  assert.equal(await svc.store.dropStagedFields(-1), 0, "staged blocks were left");
}

Deno.test("field uploads that cannot be used are problems naming what is wrong; nothing is stored", async (t) => {
  const svc = await makeTestApp({ config: { fieldLimitBytes: 4000 } });
  try {
    await t.step("not NetCDF: 415", async () => {
      const p = await assertProblem(
        await post(svc, new TextEncoder().encode("time,value\n1,2\n")),
        415,
      );
      assert.equal(p.reason, "not_netcdf");
    });
    await t.step("another media type: 415", async () => {
      await assertProblem(await post(svc, "{}", "", "application/json"), 415);
    });
    await t.step("a variable that is not (time, lat, lon): 422 naming it", async () => {
      const p = await assertProblem(await post(svc, good(), "?variable=lat"), 422);
      assert.equal(p.reason, "wrong_dimensions");
      assert.equal(p.variable, "lat");
      const q = await assertProblem(await post(svc, good(), "?variable=nope"), 422);
      assert.equal(q.errors[0].pointer, "/variable");
    });
    await t.step("an unknown calendar: 422", async () => {
      const p = await assertProblem(await post(svc, good({ calendar: "martian" })), 422);
      assert.match(p.detail, /calendar/i);
    });
    await t.step("non-monotonic latitudes, and times that go back: 422", async () => {
      const p = await assertProblem(await post(svc, good({ lat: [-45, 45, 0] })), 422);
      assert.equal(p.reason, "bad_coordinate");
      assert.equal(p.variable, "lat");
      const time = Array.from(
        { length: 24 },
        (_, k) => midMonthDays(2000 + Math.floor(k / 12), k % 12),
      );
      [time[5], time[6]] = [time[6], time[5]];
      const q = await assertProblem(await post(svc, good({ time })), 422);
      assert.equal(q.reason, "bad_coordinate");
      assert.match(q.detail, /strictly increasing/);
    });
    await t.step("over the field size limit, declared or streamed: 413", async () => {
      const big = gridNetcdf({
        startYear: 2000,
        nTime: 200,
        lat: LAT,
        lon: LON,
        values: values(200),
      });
      const p = await assertProblem(await post(svc, big), 413);
      assert.match(p.detail, /SUNLAG_FIELD_LIMIT_MB/);
      // streamed without a Content-Length
      const stream = new ReadableStream<Uint8Array>({
        start(ctl) {
          for (let i = 0; i < big.length; i += 1000) ctl.enqueue(big.slice(i, i + 1000));
          ctl.close();
        },
      });
      const q = await assertProblem(await post(svc, stream), 413);
      assert.match(q.detail, /SUNLAG_FIELD_LIMIT_MB/);
    });
    await t.step("a truncated file: 422", async () => {
      const b = good();
      const p = await assertProblem(await post(svc, b.slice(0, b.length - 100)), 422);
      assert.equal(p.reason, "truncated");
    });
    await nothingStored(svc);
    await t.step("the same file whole is stored", async () => {
      const res = await post(svc, good());
      assert.equal(res.status, 201, await res.clone().text());
    });
  } finally {
    await svc.close();
  }
});

type Mutator = (b: Uint8Array, r: ReturnType<typeof randomStream>) => Uint8Array;

const MUTATORS: Mutator[] = [
  (b, r) => {
    const c = b.slice();
    for (let k = r.int(1, 6); k > 0; k--) c[r.int(0, c.length - 1)] ^= 1 << r.int(0, 7);
    return c;
  },
  (b, r) => {
    const c = b.slice();
    const at = r.int(0, c.length - 1), n = r.int(1, 64);
    for (let i = at; i < Math.min(c.length, at + n); i++) c[i] = r.int(0, 255);
    return c;
  },
  (b, r) => {
    const c = b.slice();
    const at = 4 * r.int(1, Math.min(127, (c.length >> 2) - 1));
    new DataView(c.buffer).setUint32(at, [0x7fffffff, 0xffffffff, 0x01000000][r.int(0, 2)]);
    return c;
  },
  (b, r) => b.slice(0, r.int(0, b.length - 1)),
  (b, r) => {
    const c = b.slice();
    const at = r.int(0, c.length - 1);
    c.fill(0, at, Math.min(c.length, at + r.int(1, 256)));
    return c;
  },
];

Deno.test("fuzz: corrupted NetCDF fields never give a 500, a hang or a stored field from a refused file", async () => {
  const saved = { ...NETCDF4_TIMEOUT_SECONDS };
  NETCDF4_TIMEOUT_SECONDS.open = 5;
  NETCDF4_TIMEOUT_SECONDS.read = 5;
  const svc = await makeTestApp();
  const r = randomStream(20261202);
  const seeds: [string, Uint8Array, number, string][] = [
    ["netcdf3 grid", good(), 120, "tas"],
    [
      "field_nc4.nc",
      await Deno.readFile(new URL("../../../fixtures/netcdf/field_nc4.nc", import.meta.url)),
      60,
      "tas_packed",
    ],
  ];
  const statuses = new Map<number, number>();
  let slowest = 0, stored = 0;
  try {
    for (const [name, bytes, n, variable] of seeds) {
      for (let k = 0; k < n; k++) {
        const body = MUTATORS[r.int(0, MUTATORS.length - 1)](bytes, r);
        const t0 = performance.now();
        const res = await post(svc, body as Uint8Array<ArrayBuffer>, `?variable=${variable}`);
        const text = await res.text();
        slowest = Math.max(slowest, performance.now() - t0);
        assert.ok(
          [200, 201, 413, 415, 422].includes(res.status),
          `${name} case ${k}: ${res.status} ${text.slice(0, 300)}`,
        );
        assert.ok(text.length < 8000, `${name} case ${k}: answer of ${text.length} bytes`);
        assert.doesNotMatch(text, /HDF5-DIAG|major:|minor:/);
        if (res.status === 201) stored++;
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
      }
    }
    // a corrupted file that still decodes is a valid field; a refused one leaves nothing
    assert.ok((await svc.store.listFields({ limit: 1, offset: 0 })).total <= stored);
    assert.equal(await svc.store.dropStagedFields(-1), 0, "staged blocks were left");
    console.log(
      `field fuzz: statuses ${JSON.stringify(Object.fromEntries(statuses))}, slowest ${
        Math.round(slowest)
      } ms`,
    );
  } finally {
    Object.assign(NETCDF4_TIMEOUT_SECONDS, saved);
    await svc.close();
    stopNetcdf4Worker();
  }
});
