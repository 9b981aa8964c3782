/**
 * The request-head size behind the 431 problem: the bytes of the request line and header lines
 * as sent (RFC 9112 §3 and §5: `method SP target SP HTTP/1.1 CRLF`, `name: value CRLF` per
 * field, a final CRLF).
 */
import assert from "node:assert/strict";
import { headBytes, headBytesOf } from "../../../api/security/head_size.ts";

const raw = (method: string, target: string, fields: [string, string][]) =>
  new TextEncoder().encode(
    `${method} ${target} HTTP/1.1\r\n${fields.map(([k, v]) => `${k}: ${v}\r\n`).join("")}\r\n`,
  ).byteLength;

Deno.test("headBytes() counts the request line and header lines as sent", () => {
  const fields: [string, string][] = [
    ["host", "127.0.0.1:8080"],
    ["if-none-match", '"chart-run-0-abc"'],
    ["x-request-id", "r".repeat(100)],
  ];
  const url = "http://127.0.0.1:8080/v1/runs/x/chart.svg?width=640";
  assert.equal(
    headBytes("GET", url, new Headers(fields)),
    raw("GET", "/v1/runs/x/chart.svg?width=640", fields),
  );
  assert.equal(headBytesOf("HEAD", 1, new Headers()), raw("HEAD", "/", []));
});

Deno.test("headBytesOf() counts repeated fields as the Headers object joins them", () => {
  const h = new Headers([["a", "1"], ["A", "2"], ["set-cookie", "x"], ["set-cookie", "y"]]);
  let joined = "GET".length + 5 + 12 + 2;
  for (const [k, v] of h) joined += k.length + v.length + 4;
  assert.equal(headBytesOf("GET", 5, h), joined);
  // "a: 1, 2" and two set-cookie lines
  assert.equal(
    joined,
    raw("GET", "/abcd", [["a", "1, 2"], ["set-cookie", "x"], ["set-cookie", "y"]]),
  );
});
