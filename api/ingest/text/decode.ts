/**
 * Stage 1 of a text upload: sniff the bytes. The body must be UTF-8 text without NUL; a
 * leading byte-order mark is dropped.
 *
 * @module
 */
import type { IngestResult } from "../types.ts";

/**
 * Decode an upload body to text, or say why it is not text.
 *
 * @param input bytes (checked for NUL and UTF-8) or an already decoded string
 * @returns `{ text }`, or `{ refused }`: the whole answer for a body that is not text
 * @example
 * ```ts
 * import { decodeTextBody } from "./decode.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(decodeTextBody(new Uint8Array([0xef, 0xbb, 0xbf, 0x61])), { text: "a" });
 * assert.ok("refused" in decodeTextBody(new Uint8Array([0x61, 0, 0x62])));
 * ```
 */
export function decodeTextBody(
  input: Uint8Array | string,
): { text: string } | { refused: IngestResult } {
  let text: string;
  if (typeof input === "string") {
    const nul = input.indexOf("\0");
    if (nul >= 0) return notText(`NUL character at offset ${nul}`, lineOf(input, nul));
    text = input;
  } else {
    const nul = input.indexOf(0);
    if (nul >= 0) return notText(`NUL byte at offset ${nul}`, countNewlines(input, nul) + 1);
    try {
      text = new TextDecoder("utf-8", { fatal: true, ignoreBOM: false }).decode(input);
    } catch {
      return notText("invalid UTF-8 byte sequence", undefined);
    }
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  return { text };
}

function notText(why: string, row: number | undefined): { refused: IngestResult } {
  return {
    refused: {
      ok: false,
      errors: [{
        pointer: "",
        in: "body",
        ...(row === undefined ? {} : { row }),
        message: `the body is not UTF-8 text (${why}); upload a delimited text file or JSON`,
      }],
    },
  };
}

function countNewlines(bytes: Uint8Array, end: number): number {
  let n = 0;
  for (let i = 0; i < end; i++) if (bytes[i] === 10) n++;
  return n;
}

function lineOf(s: string, end: number): number {
  let n = 1;
  for (let i = 0; i < end; i++) if (s.charCodeAt(i) === 10) n++;
  return n;
}
