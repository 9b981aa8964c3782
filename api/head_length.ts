/**
 * The answer to a HEAD request: the GET response's status and headers without its body, with
 * the `Content-Length` the GET would send (RFC 9110 §9.3.2 and §8.6: a HEAD response's
 * Content-Length, when sent, is the length of the body a GET would carry). Without it,
 * `Deno.serve` writes `content-length: 0` for a bodiless response, which tells a client the
 * representation is empty.
 *
 * @module
 */

/**
 * `res` without its body, with `Content-Length` set to its body's length in bytes. The body
 * is read chunk by chunk and not kept, so memory stays bounded for a large streamed body.
 * A response that has no body, is a 204 or 304, or already states its length keeps its
 * headers as they are.
 *
 * @param res the response the same request would get as a GET
 * @returns a bodiless response for the HEAD request
 * @example
 * ```ts
 * import { headResponse } from "./head_length.ts";
 * import assert from "node:assert/strict";
 * const head = await headResponse(new Response("a,b\n1,2\n", { headers: { "content-type": "text/csv" } }));
 * assert.equal(head.body, null);
 * assert.equal(head.headers.get("content-length"), "8");
 * assert.equal(head.headers.get("content-type"), "text/csv");
 * ```
 */
export async function headResponse(res: Response): Promise<Response> {
  if (!res.body || res.status === 204 || res.status === 304 || res.headers.has("content-length")) {
    if (res.body) await res.body.cancel();
    return new Response(null, res);
  }
  let length = 0;
  const reader = res.body.getReader();
  for (let r = await reader.read(); !r.done; r = await reader.read()) length += r.value.byteLength;
  const head = new Response(null, res);
  head.headers.set("Content-Length", String(length));
  return head;
}
