/**
 * Compressed request bodies: `Content-Encoding: gzip` (also `x-gzip`) and `deflate` are
 * decoded before any route reads the body, streaming, and refused with 413 as soon as the
 * decoded size passes the body limit (a small "zip bomb" never grows in memory beyond it). Any
 * other coding gets 415 with `Accept-Encoding: gzip, deflate` (RFC 9110 §15.5.16). A body that
 * does not decode is a 400 problem.
 *
 * @module
 */
import type { MiddlewareHandler } from "hono";
import { ProblemError } from "../problems.ts";
import { joinBytes } from "../bytes.ts";

const FORMATS: Record<string, CompressionFormat> = {
  gzip: "gzip",
  "x-gzip": "gzip",
  deflate: "deflate",
};

/** Decode a compressed body stream, refusing it once it passes `limit` bytes. */
export async function decodeBody(
  body: ReadableStream<Uint8Array>,
  format: CompressionFormat,
  limit: number,
): Promise<Uint8Array<ArrayBuffer>> {
  const reader = body.pipeThrough(
    new DecompressionStream(format) as unknown as ReadableWritablePair<Uint8Array, Uint8Array>,
  ).getReader();
  const parts: Uint8Array[] = [];
  let size = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > limit) {
        await reader.cancel().catch(() => {});
        throw new ProblemError(
          "payload-too-large",
          `The decompressed request body is over the configured limit of ${limit} bytes ` +
            "(SUNLAG_BODY_LIMIT_MB)",
        );
      }
      parts.push(value);
    }
  } catch (e) {
    if (e instanceof ProblemError) throw e;
    throw new ProblemError(
      "bad-request",
      `The request body does not decode as ${format}: ${(e as Error).message}`.slice(0, 300),
    );
  }
  return joinBytes(parts);
}

/** Decode gzip/deflate request bodies up to `limit` decoded bytes (see the module docs). */
export function contentEncoding(limit: number): MiddlewareHandler {
  return async (c, next) => {
    const raw = (c.req.header("content-encoding") ?? "").trim().toLowerCase();
    if (raw === "" || raw === "identity") return await next();
    const format = FORMATS[raw];
    if (!format) {
      throw new ProblemError(
        "unsupported-media-type",
        `Content-Encoding "${raw.slice(0, 100)}" is not supported; send the body as is, or ` +
          "gzip or deflate it",
        {},
        { "Accept-Encoding": "gzip, deflate" },
      );
    }
    const req = c.req.raw;
    const bytes = req.body
      ? await decodeBody(req.body, format, limit)
      : new Uint8Array(new ArrayBuffer(0));
    const headers = new Headers(req.headers);
    headers.delete("content-encoding");
    headers.set("content-length", String(bytes.byteLength));
    c.req.raw = new Request(req.url, { method: req.method, headers, body: bytes });
    await next();
  };
}
