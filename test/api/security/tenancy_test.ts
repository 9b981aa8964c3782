/**
 * Tenancy isolation on a shared instance: owner A cannot list, fetch, chart, replay, bundle,
 * follow, delete or cancel owner B's private items, directly or through a run that refers to
 * them; the same content uploaded by both keeps one id without telling either; sharing opens
 * exactly what it says.
 */
import assert from "node:assert/strict";
import { assertProblem } from "../helpers.ts";
import { RUN_KINDS } from "../../../api/analyses/registry.ts";
import { meanKind } from "../test_kinds.ts";
import { type Caller, sharedInstance, smallSeries, upload } from "./shared_instance.ts";

const KINDS = [...RUN_KINDS, meanKind];

/** A run of the test kind on `series`; returns the run body. */
async function meanRun(who: Caller, series: string, extra: Record<string, unknown> = {}) {
  const res = await who.post("/v1/test-mean", { series, replicates: 5, ...extra });
  const body = await res.json();
  assert.ok(res.status === 201 || res.status === 202, JSON.stringify(body));
  return body;
}

Deno.test("tenancy: an owner cannot reach another owner's private series or runs", async (t) => {
  const svc = await sharedInstance({ kinds: KINDS });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const analyst_b = await svc.owner("analyst_b");
    const sid = await upload(analyst_b, smallSeries("analyst_b-private"));
    const run = await meanRun(analyst_b, sid);
    const paths = [
      `/v1/series/${sid}`,
      `/v1/series/${sid}?format=csv`,
      `/v1/series/${sid}/chart.svg`,
      `/v1/series/${sid}/sharing`,
      `/v1/runs/${run.id}`,
      `/v1/runs/${run.id}/chart.svg`,
      `/v1/runs/${run.id}/bundle`,
      `/v1/runs/${run.id}/events`,
      `/v1/runs/${run.id}/outputs/doubled`,
      `/v1/runs/${run.id}/outputs/doubled?format=csv`,
      `/v1/runs/${run.id}/sharing`,
    ];
    await t.step("fetch, CSV, chart, bundle, events, outputs: 404 as if absent", async () => {
      for (const path of paths) {
        const mine = await analyst_b.get(path);
        assert.equal(mine.status, 200, `${path}: the owner must see it`);
        await mine.body?.cancel();
        const body = await assertProblem(await analyst_a.get(path), 404);
        assert.doesNotMatch(
          JSON.stringify(body),
          /analyst_b/,
          `${path}: the answer names the owner`,
        );
        await assertProblem(await svc.anonymous.get(path), 404);
      }
    });
    await t.step("listings show only one's own", async () => {
      const series = await (await analyst_a.get("/v1/series")).json();
      assert.deepEqual(series.items, []);
      assert.equal(series.total, 0);
      const runs = await (await analyst_a.get("/v1/runs")).json();
      assert.equal(runs.total, 0);
      assert.equal((await (await analyst_b.get("/v1/runs")).json()).total, 1);
      assert.equal((await (await svc.anonymous.get("/v1/series")).json()).total, 0);
    });
    await t.step("replay, cancel, delete, save output, share: refused", async () => {
      await assertProblem(await analyst_a.post(`/v1/runs/${run.id}/replay`), 404);
      await assertProblem(await analyst_a.post(`/v1/runs/${run.id}/cancel`), 404);
      await assertProblem(await analyst_a.del(`/v1/series/${sid}`), 404);
      await assertProblem(
        await analyst_a.post(`/v1/runs/${run.id}/outputs/doubled/series`, {}),
        404,
      );
      await assertProblem(
        await analyst_a.put(`/v1/series/${sid}/sharing`, { visibility: "public" }),
        404,
      );
      await assertProblem(
        await analyst_a.put(`/v1/runs/${run.id}/sharing`, { visibility: "group" }),
        404,
      );
      assert.equal(
        (await analyst_b.get(`/v1/series/${sid}`)).status,
        200,
        "analyst_b's series survived",
      );
    });
    await t.step(
      "a run that refers to the private series or run is refused like a missing one",
      async () => {
        const viaSeries = await assertProblem(
          await analyst_a.post("/v1/test-mean", { series: sid }),
          422,
        );
        assert.match(JSON.stringify(viaSeries.errors), /no stored series has id/);
        const viaRun = await analyst_a.post("/v1/forcing", {
          reconstruction: run.id,
          reference: { kind: "period", period: { start: "1990", end: "1991" } },
        });
        const body = await assertProblem(viaRun, 422);
        assert.match(JSON.stringify(body.errors), /no run has id/);
        assert.equal((await (await analyst_a.get("/v1/runs")).json()).total, 0, "nothing stored");
      },
    );
    await t.step("an admin sees and may act on everything", async () => {
      assert.equal((await svc.admin.get(`/v1/series/${sid}`)).status, 200);
      assert.equal((await (await svc.admin.get("/v1/runs")).json()).total, 1);
    });
  } finally {
    await svc.close();
  }
});

Deno.test("tenancy: the same content keeps one id and tells no owner about the other", async () => {
  const svc = await sharedInstance({ kinds: KINDS });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const analyst_b = await svc.owner("analyst_b");
    const content = smallSeries("same-content");
    const first = await analyst_a.post("/v1/series", content);
    assert.equal(first.status, 201);
    const a = await first.json();
    // creation times are kept to the millisecond: make them differ
    await new Promise((r) => setTimeout(r, 5));
    const second = await analyst_b.post("/v1/series", content);
    // Analyst B is told his upload is new (201, created), with his own creation time.
    assert.equal(second.status, 201);
    const b = await second.json();
    assert.equal(b.created, true);
    assert.equal(b.series.id, a.series.id, "one content id");
    assert.equal(b.series.owner, "analyst_b");
    const again = await analyst_b.post("/v1/series", content);
    assert.equal(again.status, 200, "his own repeat is 200");
    assert.equal((await svc.store.listSeries({ limit: 10, offset: 0 })).total, 1, "stored once");
    // Each holder's JSON shows its own creation time: two representations, two strong ETags
    // (RFC 9110 §8.8.3); the CSV is the same bytes for both, with one tag.
    const jsonA = await analyst_a.get(`/v1/series/${a.series.id}`);
    const jsonB = await analyst_b.get(`/v1/series/${a.series.id}`);
    const [bytesA, bytesB] = [await jsonA.text(), await jsonB.text()];
    assert.notEqual(a.series.created_at, b.series.created_at, "uploaded at different times");
    assert.notEqual(bytesA, bytesB);
    assert.notEqual(jsonA.headers.get("etag"), jsonB.headers.get("etag"));
    const crossed = await analyst_b.get(`/v1/series/${a.series.id}`, {
      "If-None-Match": jsonA.headers.get("etag")!,
    });
    assert.equal(crossed.status, 200, "her tag does not validate his representation");
    await crossed.body?.cancel();
    const csvA = await analyst_a.get(`/v1/series/${a.series.id}?format=csv`);
    const csvB = await analyst_b.get(`/v1/series/${a.series.id}?format=csv`);
    assert.equal(await csvA.text(), await csvB.text());
    assert.equal(csvA.headers.get("etag"), csvB.headers.get("etag"));
    // Analyst A deletes hers: analyst_b's copy stays, and neither learns of the other.
    assert.equal((await analyst_a.del(`/v1/series/${a.series.id}`)).status, 204);
    await assertProblem(await analyst_a.get(`/v1/series/${a.series.id}`), 404);
    const kept = await analyst_b.get(`/v1/series/${a.series.id}`);
    assert.equal(kept.status, 200);
    assert.equal((await kept.json()).created_at, b.series.created_at, "his own time, not hers");
  } finally {
    await svc.close();
  }
});

Deno.test("tenancy: only the owner or an admin deletes a shared series or cancels a run", async () => {
  const svc = await sharedInstance({ kinds: KINDS });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const analyst_b = await svc.owner("analyst_b");
    const sid = await upload(analyst_b, smallSeries("analyst_b-shared"));
    assert.equal(
      (await analyst_b.put(`/v1/series/${sid}/sharing`, { visibility: "group" })).status,
      200,
    );
    assert.equal((await analyst_a.get(`/v1/series/${sid}`)).status, 200, "group members see it");
    await assertProblem(await analyst_a.del(`/v1/series/${sid}`), 403);
    await assertProblem(
      await analyst_a.put(`/v1/series/${sid}/sharing`, { visibility: "public" }),
      403,
    );
    const slow = await meanRun(analyst_b, sid, { spin_ms: 3000, replicates: 100 });
    assert.equal(slow.status, "queued");
    await analyst_b.put(`/v1/runs/${slow.id}/sharing`, { visibility: "group" });
    await assertProblem(await analyst_a.post(`/v1/runs/${slow.id}/cancel`), 403);
    const cancelled = await svc.admin.post(`/v1/runs/${slow.id}/cancel`);
    assert.equal(cancelled.status, 200, "an admin may cancel");
    assert.equal((await cancelled.json()).status, "cancelled");
  } finally {
    await svc.close();
  }
});

Deno.test("tenancy: a shared run opens its inputs; a public run stays public and readable", async () => {
  const svc = await sharedInstance({ kinds: KINDS });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const analyst_c = await svc.owner("analyst_c", { group: "elsewhere" });
    const sid = await upload(analyst_a, smallSeries("analyst_a-input"));
    const run = await meanRun(analyst_a, sid);
    await assertProblem(await analyst_c.get(`/v1/runs/${run.id}`), 404);
    const share = await analyst_a.put(`/v1/runs/${run.id}/sharing`, { visibility: "public" });
    assert.equal(share.status, 200);
    assert.equal((await share.json()).visibility, "public");
    // Anyone, even without a key, reads, charts, bundles the run and fetches its input.
    for (const who of [analyst_c, svc.anonymous]) {
      for (const path of [`/v1/runs/${run.id}`, `/v1/runs/${run.id}/bundle`, `/v1/series/${sid}`]) {
        const res = await who.get(path);
        assert.equal(res.status, 200, path);
        await res.body?.cancel();
      }
    }
    const replay = await analyst_c.post(`/v1/runs/${run.id}/replay`);
    assert.equal((await replay.json()).identical, true, "a reader of a cited run replays it");
    await assertProblem(await svc.anonymous.post(`/v1/runs/${run.id}/replay`), 401);
    // Public is for good: the run cannot be hidden, nor its input made private or deleted.
    await assertProblem(
      await analyst_a.put(`/v1/runs/${run.id}/sharing`, { visibility: "private" }),
      409,
    );
    await assertProblem(
      await analyst_a.put(`/v1/series/${sid}/sharing`, { visibility: "private" }),
      409,
    );
    await assertProblem(await analyst_a.del(`/v1/series/${sid}`), 409);
    assert.equal((await analyst_c.get(`/v1/runs/${run.id}`)).status, 200);
    // A run of analyst_c's on analyst_a's public series cannot be published past what analyst_a allows.
    const runC = await meanRun(analyst_c, sid);
    assert.equal(
      (await analyst_c.put(`/v1/runs/${runC.id}/sharing`, { visibility: "public" })).status,
      200,
    );
  } finally {
    await svc.close();
  }
});

Deno.test("tenancy: a run on another owner's group series cannot be made public by its user", async () => {
  const svc = await sharedInstance({ kinds: KINDS });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const analyst_b = await svc.owner("analyst_b");
    const sid = await upload(analyst_a, smallSeries("analyst_a-group-input"));
    await analyst_a.put(`/v1/series/${sid}/sharing`, { visibility: "group" });
    const runB = await meanRun(analyst_b, sid);
    const refused = await assertProblem(
      await analyst_b.put(`/v1/runs/${runB.id}/sharing`, { visibility: "public" }),
      409,
    );
    assert.match(refused.detail, /ask them to share it/);
    await assertProblem(await svc.anonymous.get(`/v1/series/${sid}`), 404);
    assert.equal(
      (await analyst_b.put(`/v1/runs/${runB.id}/sharing`, { visibility: "group" })).status,
      200,
    );
    // Analyst A cannot now hide the series her group's runs depend on.
    await assertProblem(
      await analyst_a.put(`/v1/series/${sid}/sharing`, { visibility: "private" }),
      409,
    );
  } finally {
    await svc.close();
  }
});

Deno.test("tenancy: a bundle imported by two owners is one run held by both", async () => {
  const home = await sharedInstance({ kinds: KINDS });
  const away = await sharedInstance({ kinds: KINDS });
  try {
    const analyst_a = await home.owner("analyst_a");
    const run = await meanRun(analyst_a, await upload(analyst_a, smallSeries("bundle-input")));
    const bundle = await (await analyst_a.get(`/v1/runs/${run.id}/bundle`)).json();
    const dora = await away.owner("dora");
    const erin = await away.owner("erin");
    for (const who of [dora, erin]) {
      const res = await (await who.post("/v1/bundles", bundle)).json();
      assert.equal(res.verified, true, JSON.stringify(res.differences));
      assert.equal(res.stored, true);
      assert.equal((await who.get(`/v1/runs/${run.id}`)).status, 200);
    }
    assert.equal((await away.store.listRuns({ limit: 5, offset: 0 })).total, 1);
    const dorasView = await (await dora.get(`/v1/runs/${run.id}/sharing`)).json();
    assert.equal(dorasView.owner, "dora");
  } finally {
    await home.close();
    await away.close();
  }
});
