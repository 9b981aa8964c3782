/**
 * Downloads of succeeded runs kept as made (api/routes/immutable_cache.ts, api/netcdf/http.ts):
 * a representation served only as it is never gets a gzip-coded variant nor
 * `Vary: Accept-Encoding` (the headers those routes have always sent), and a NetCDF file is
 * kept only when it fits the cache's bound on one entry, as the bytes its streamed response
 * sends.
 */
import assert from "node:assert/strict";
import { Hono } from "hono";
import {
  identityRepresentation,
  ImmutableCache,
  serveStored,
} from "../../api/routes/immutable_cache.ts";
import { netcdfRepresentation } from "../../api/netcdf/http.ts";
import { encodeNetcdf3, type NetcdfWriteDataset } from "../../core/cf/netcdf3_write.ts";
import { ncText } from "../../core/cf/netcdf_model.ts";

Deno.test("an identity-only representation is never gzip-coded and answers 304 as before", async () => {
  const cache = new ImmutableCache();
  const text = "time,value\n" + "1996.5,1361.2\n".repeat(400);
  cache.set(
    "a",
    identityRepresentation('"a"', text, { "Content-Type": "text/csv", Vary: "Accept" }),
  );
  const app = new Hono();
  app.get("/", (c) => serveStored(c, cache.get("a")!, false));
  const res = await app.request("/", { headers: { "Accept-Encoding": "gzip" } });
  assert.equal(res.status, 200);
  assert.equal(res.headers.get("content-encoding"), null);
  assert.equal(res.headers.get("etag"), '"a"');
  assert.equal(res.headers.get("vary"), "Accept");
  assert.equal(res.headers.get("cache-control"), "private, max-age=31536000, immutable");
  assert.equal(await res.text(), text);
  assert.equal(cache.bytes, 2 * new TextEncoder().encode(text).byteLength, "body and ready copy");
  const nm = await app.request("/", { headers: { "If-None-Match": 'W/"a"' } });
  assert.equal(nm.status, 304);
  assert.deepEqual(
    [...nm.headers].map(([k]) => k).sort(),
    ["cache-control", "etag", "x-request-id"],
    "the 304 of `notModified`: no Vary, no Content-Type",
  );
});

Deno.test("a NetCDF download is kept only within the cache's bound on one entry", () => {
  const n = 2000;
  const ds: NetcdfWriteDataset = {
    dimensions: [{ name: "time", size: n }],
    attributes: [ncText("Conventions", "CF-1.10")],
    variables: [{
      name: "tsi",
      type: "double",
      dimensions: ["time"],
      data: Array.from({ length: n }, (_, i) => 1361 + Math.sin(i / 20)),
    }],
  };
  const file = encodeNetcdf3(ds);
  const small = new ImmutableCache(1024 * 1024, file.byteLength - 1);
  assert.equal(netcdfRepresentation(ds, "x.nc", '"x"', {}, small), null);
  const rep = netcdfRepresentation(ds, "x.nc", '"x"', { Vary: "Accept" }, new ImmutableCache());
  assert.ok(rep);
  assert.deepEqual(rep.body, file);
  assert.equal(rep.identityOnly, true);
  assert.deepEqual(rep.headers, {
    "Content-Type": "application/x-netcdf",
    "Content-Length": String(file.byteLength),
    "Content-Disposition": 'attachment; filename="x.nc"',
    Vary: "Accept",
  });
});
