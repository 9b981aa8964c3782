/**
 * The OWASP API Security Top 10 (2023), one section per risk: the attack a hostile client
 * would try against a shared sunlag, and the refusal it gets. Owners, keys and sharing come
 * from the admin API, as on a real instance.
 */
import assert from "node:assert/strict";
import { createHash } from "node:crypto";
import { assertProblem } from "../helpers.ts";
import { RUN_KINDS } from "../../../api/analyses/registry.ts";
import { meanKind } from "../test_kinds.ts";
import { openApiDocument } from "../../../api/app.ts";
import { parseApiKey } from "../../../api/auth/keys.ts";
import {
  caller,
  type SharedInstance,
  sharedInstance,
  smallSeries,
  upload,
} from "./shared_instance.ts";

const KINDS = [...RUN_KINDS, meanKind];

async function withInstance(
  fn: (svc: SharedInstance) => Promise<void>,
  config: Parameters<typeof sharedInstance>[0] = {},
) {
  const svc = await sharedInstance({ kinds: KINDS, ...config });
  try {
    await fn(svc);
  } finally {
    await svc.close();
  }
}

Deno.test("API1:2023 Broken Object Level Authorization", async (t) => {
  await withInstance(async (svc) => {
    const victim = await svc.owner("victim");
    const attacker = await svc.owner("attacker");
    const sid = await upload(victim, smallSeries("secret"));
    const run = await (await victim.post("/v1/test-mean", { series: sid })).json();
    await t.step("attack: read, delete, cancel, share another owner's items by id", async () => {
      await assertProblem(await attacker.get(`/v1/series/${sid}?format=csv`), 404);
      await assertProblem(await attacker.get(`/v1/runs/${run.id}/outputs/doubled`), 404);
      await assertProblem(await attacker.del(`/v1/series/${sid}`), 404);
      await assertProblem(await attacker.post(`/v1/runs/${run.id}/cancel`), 404);
      await assertProblem(
        await attacker.put(`/v1/runs/${run.id}/sharing`, { visibility: "public" }),
        404,
      );
    });
    await t.step(
      "attack: use another owner's private series as input of one's own run",
      async () => {
        await assertProblem(await attacker.post("/v1/test-mean", { series: sid }), 422);
      },
    );
    await t.step("attack: learn that someone holds a content by uploading it", async () => {
      const res = await attacker.post("/v1/series", smallSeries("secret"));
      assert.equal(res.status, 201, "the same answer as for new content");
      assert.equal((await res.json()).created, true);
    });
    assert.equal((await victim.get(`/v1/series/${sid}`)).status, 200);
  });
});

Deno.test("API2:2023 Broken Authentication", async (t) => {
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    await t.step(
      "attack: call without a key, with a forged key, with a malformed header",
      async () => {
        await assertProblem(await svc.anonymous.post("/v1/series", smallSeries("x")), 401);
        const forged = analyst_a.key.slice(0, -4) + "AAAA";
        await assertProblem(await caller(svc, "analyst_a", forged).get("/v1/series"), 401);
        const malformed = await svc.app.request("/v1/series", {
          headers: { Authorization: `Token ${analyst_a.key}` },
        });
        await assertProblem(malformed, 401);
      },
    );
    await t.step(
      "attack: read keys from the store: only SHA-256 hashes of the secrets",
      async () => {
        const [rec] = await svc.store.listApiKeys("analyst_a");
        const secret = parseApiKey(analyst_a.key)!.secret;
        assert.equal(rec.hash, createHash("sha256").update(secret).digest("hex"));
        assert.ok(!JSON.stringify(rec).includes(secret));
      },
    );
    await t.step("attack: reuse a revoked key", async () => {
      const [rec] = await svc.store.listApiKeys("analyst_a");
      assert.equal((await svc.admin.del(`/v1/admin/keys/${rec.id}`)).status, 204);
      await assertProblem(await analyst_a.get("/v1/series"), 401);
    });
  });
});

Deno.test("API3:2023 Broken Object Property Level Authorization", async (t) => {
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    await svc.owner("analyst_b");
    await t.step("attack: set the owner or visibility through an upload body", async () => {
      const res = await analyst_a.post("/v1/series", {
        ...smallSeries("mass"),
        owner: "analyst_b",
        visibility: "public",
      });
      const body = await res.json();
      assert.equal(body.series.owner, "analyst_a");
      assert.equal(body.series.visibility, "private");
      await assertProblem(await svc.anonymous.get(`/v1/series/${body.series.id}`), 404);
    });
    await t.step("attack: set a run's status, result or digest in the request", async () => {
      const sid = await upload(analyst_a, smallSeries("props"));
      const res = await analyst_a.post("/v1/test-mean", {
        series: sid,
        status: "succeeded",
        result_digest: "0".repeat(64),
      });
      const problem = await assertProblem(res, 422);
      assert.deepEqual(problem.errors.map((e: { pointer: string }) => e.pointer).sort(), [
        "/result_digest",
        "/status",
      ]);
    });
    await t.step("attack: read secrets from listings", async () => {
      const keys = await (await svc.admin.get("/v1/admin/keys")).json();
      for (const k of keys.items) {
        assert.deepEqual(Object.keys(k).filter((x) => /hash|key$/.test(x)), []);
      }
    });
  });
});

Deno.test("API4:2023 Unrestricted Resource Consumption", async (t) => {
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    await t.step("attack: a body over the limit", async () => {
      const res = await analyst_a.post("/v1/series", { pad: "x".repeat(300_000) });
      await assertProblem(res, 413);
    });
    await t.step("attack: a flood of requests", async () => {
      let refused: Response | null = null;
      for (let i = 0; i < 10 && !refused; i++) {
        const r = await analyst_a.get("/v1/version");
        if (r.status === 429) refused = r;
        else await r.body?.cancel();
      }
      assert.ok(refused, "the bucket ran dry");
      assert.ok(Number(refused.headers.get("retry-after")) >= 1);
      await refused.body?.cancel();
    });
  }, {
    config: {
      bodyLimitBytes: 200_000,
      quotas: {
        concurrentRuns: 2,
        queuedRuns: 2,
        computeSecondsPerHour: 3600,
        storedBytes: 1e9,
        ratePerSecond: 1,
        rateBurst: 5,
      },
    },
  });
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    await t.step("attack: a run that never ends is stopped at the wall-time limit", async () => {
      const sid = await upload(analyst_a, smallSeries("long"));
      const slow = { series: sid, replicates: 100, spin_ms: 2000 };
      const res = await analyst_a.post("/v1/test-mean", slow, { Prefer: "respond-async" });
      const id = (await res.json()).id;
      await svc.runs.settle();
      assert.equal((await (await analyst_a.get(`/v1/runs/${id}`)).json()).status, "failed");
    });
    await t.step("attack: many unknown fields to make the error huge", async () => {
      const body: Record<string, number> = {};
      for (let i = 0; i < 50_000; i++) body[`k${i}`] = i;
      const res = await analyst_a.post("/v1/test-mean", body);
      const text = await res.clone().text();
      await assertProblem(res, 422);
      assert.ok(text.length < 8_000);
    });
  }, { config: { runWallSeconds: 0.2 } });
});

Deno.test("API5:2023 Broken Function Level Authorization", async (t) => {
  await withInstance(async (svc) => {
    const reader = await svc.owner("rita", { role: "reader" });
    const writer = await svc.owner("walt");
    await t.step("attack: a writer makes itself an admin or mints keys", async () => {
      await assertProblem(
        await writer.post("/v1/admin/owners", { id: "root", name: "r", role: "admin" }),
        403,
      );
      await assertProblem(await writer.post("/v1/admin/owners/walt/keys", { role: "admin" }), 403);
      await assertProblem(await writer.get("/v1/admin/keys"), 403);
    });
    await t.step("attack: a reader writes", async () => {
      await assertProblem(await reader.post("/v1/series", smallSeries("r")), 403);
      await assertProblem(
        await reader.post("/v1/test-mean", { series: "sha256:" + "0".repeat(64) }),
        403,
      );
    });
    await t.step("attack: an anonymous caller deletes", async () => {
      await assertProblem(await svc.anonymous.del(`/v1/series/sha256:${"0".repeat(64)}`), 401);
    });
  });
});

Deno.test("API6:2023 Unrestricted Access to Sensitive Business Flows", async (t) => {
  // The sensitive flows of sunlag: publishing a citable run (it can never be taken back) and
  // minting keys. Both need the right holder or role; computation needs an account.
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    const analyst_b = await svc.owner("analyst_b");
    const sid = await upload(analyst_a, smallSeries("pub"));
    const run = await (await analyst_a.post("/v1/test-mean", { series: sid })).json();
    await analyst_a.put(`/v1/runs/${run.id}/sharing`, { visibility: "group" });
    await t.step("attack: publish someone else's run to make it citable", async () => {
      await assertProblem(
        await analyst_b.put(`/v1/runs/${run.id}/sharing`, { visibility: "public" }),
        403,
      );
    });
    await t.step("attack: run analyses anonymously at scale", async () => {
      await assertProblem(await svc.anonymous.post("/v1/test-mean", { series: sid }), 401);
    });
    await t.step("attack: unpublish a cited run", async () => {
      await analyst_a.put(`/v1/runs/${run.id}/sharing`, { visibility: "public" });
      await assertProblem(
        await analyst_a.put(`/v1/runs/${run.id}/sharing`, { visibility: "private" }),
        409,
      );
    });
  });
});

Deno.test("API7:2023 Server Side Request Forgery", async (t) => {
  // Not applicable by design: sunlag never fetches a URL a client names. Series come in the
  // request body (JSON, text, a bundle), never by reference to a remote address.
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    await t.step("attack: name a cloud metadata URL as a series", async () => {
      const res = await analyst_a.post("/v1/test-mean", {
        series: "http://169.254.169.254/latest/meta-data/",
      });
      await assertProblem(res, 422);
    });
  });
});

Deno.test("API8:2023 Security Misconfiguration", async (t) => {
  await withInstance(async (svc) => {
    await t.step("attack: a rebinding page's Host header", async () => {
      await assertProblem(await svc.app.request("http://attacker.example/v1/health"), 421);
    });
    await t.step("attack: a credentialed cross-site read with CORS", async () => {
      const res = await svc.app.request("/v1/series", {
        headers: { Origin: "https://evil.example" },
      });
      assert.equal(res.headers.get("access-control-allow-origin"), null);
      assert.equal(res.headers.get("access-control-allow-credentials"), null);
      await res.body?.cancel();
    });
    await t.step("attack: a simple cross-site POST", async () => {
      const res = await svc.admin.post(
        `/v1/runs/${"0".repeat(8)}-0000-7000-8000-${"0".repeat(12)}/cancel`,
        undefined,
        {
          Origin: "https://evil.example",
          "Sec-Fetch-Site": "cross-site",
        },
      );
      // The admin key makes it not simple (Authorization): the browser would have preflighted.
      await assertProblem(res, 404);
      const anon = await svc.app.request(
        `/v1/runs/${"0".repeat(8)}-0000-7000-8000-${"0".repeat(12)}/cancel`,
        {
          method: "POST",
          headers: { Origin: "https://evil.example" },
        },
      );
      await assertProblem(anon, 403);
    });
    await t.step("attack: provoke a stack trace", async () => {
      const res = await svc.app.request("/v1/series", {
        method: "POST",
        headers: { "content-type": "application/json", Authorization: `Bearer ${svc.admin.key}` },
        body: "{ not json",
      });
      const text = await res.text();
      assert.equal(res.status, 400);
      assert.doesNotMatch(text, /at \w+ \(|file:\/\//);
    });
  });
});

Deno.test("API9:2023 Improper Inventory Management", async (t) => {
  await withInstance(async (svc) => {
    await t.step("every API route is in the OpenAPI document, with the bearer scheme", () => {
      const doc = openApiDocument(svc.app);
      const documented = new Set(
        Object.keys(doc.paths ?? {}).map((p) => p.replace(/\{[^}]+\}/g, ":p")),
      );
      const served = svc.app.routes
        .filter((r) => r.method !== "ALL")
        .map((r) => r.path.replace(/:[^/]+/g, ":p"))
        .filter((p) => p.startsWith("/v1/") && !/^\/v1\/(docs|openapi\.json)/.test(p));
      for (const p of served) assert.ok(documented.has(p), `${p} is served but not documented`);
      assert.ok(doc.components?.securitySchemes?.bearer, "the bearer scheme is documented");
    });
    await t.step(
      "one API version, and the versions of every algorithm, are published",
      async () => {
        const v = await (await svc.anonymous.get("/v1/version")).json();
        assert.equal(v.api, "v1");
        assert.ok(Object.keys(v.algorithms).length >= RUN_KINDS.length);
      },
    );
  });
});

Deno.test("API10:2023 Unsafe Consumption of APIs", async (t) => {
  // What sunlag consumes from elsewhere: bundles exported by other instances.
  await withInstance(async (svc) => {
    const analyst_a = await svc.owner("analyst_a");
    const run = await (await analyst_a.post("/v1/test-mean", { series: smallSeries("b10") }))
      .json();
    const bundle = await (await analyst_a.get(`/v1/runs/${run.id}/bundle`)).json();
    await t.step("attack: header injection through a bundled run id", async () => {
      const x = structuredClone(bundle);
      x.run.id = `${run.id}"; filename=evil.sh\r\nSet-Cookie: a=b`;
      await assertProblem(await analyst_a.post("/v1/bundles", x), 422);
    });
    await t.step("attack: a tampered result is not stored", async () => {
      const x = structuredClone(bundle);
      x.run.result.mean = 1e9;
      const answer = await (await analyst_a.post("/v1/bundles", x)).json();
      assert.deepEqual([answer.verified, answer.stored], [false, false]);
    });
    await t.step("attack: a lying lineage or date is refused", async () => {
      const x = structuredClone(bundle);
      x.run.updated_at = "tomorrow";
      await assertProblem(await analyst_a.post("/v1/bundles", x), 422);
    });
  });
});
