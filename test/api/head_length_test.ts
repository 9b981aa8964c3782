/**
 * HEAD answers carry the Content-Length of the body the same GET sends (RFC 9110 §9.3.2), on
 * the full path and on the fast path for cached representations, for problems too; a 304
 * stays without a body.
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, uploadSeries } from "./helpers.ts";

Deno.test("HEAD: Content-Length is the GET body's length, full path and fast path alike", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(
      svc,
      monthlySeries("head lengths", "sunspot_number", "1", 1900, 240, (i) => 50 + (i % 17)),
    );
    const paths = [
      `/v1/series/${id}?format=csv`,
      `/v1/series/${id}`,
      `/v1/series/${id}/chart.svg`,
      "/v1/health",
      "/v1/series/sha256:0000",
    ];
    for (const path of paths) {
      const get = await svc.get(path);
      const bytes = (await get.arrayBuffer()).byteLength;
      assert.ok(bytes > 0, path);
      // twice: the first HEAD of a cached representation may take the full path, the next
      // one the fast path (api/hot_gets.ts)
      for (let k = 0; k < 2; k++) {
        const head = await svc.app.request(path, { method: "HEAD" });
        assert.equal(head.status, get.status, path);
        assert.equal(head.body, null, `${path}: a HEAD answer has no body`);
        assert.equal(head.headers.get("content-length"), String(bytes), path);
        assert.equal(head.headers.get("content-type"), get.headers.get("content-type"), path);
        assert.equal(head.headers.get("etag"), get.headers.get("etag"), path);
      }
    }
    assert.ok(svc.hot.served > 0, "the fast path answered some of them");
    const etag = (await svc.get(`/v1/series/${id}?format=csv`)).headers.get("etag")!;
    const notModified = await svc.app.request(`/v1/series/${id}?format=csv`, {
      method: "HEAD",
      headers: { "If-None-Match": etag },
    });
    assert.equal(notModified.status, 304);
    assert.equal(notModified.body, null);
  } finally {
    await svc.close();
  }
});
