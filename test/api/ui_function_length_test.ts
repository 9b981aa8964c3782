/**
 * The built-in page's functions stay short: a function longer than a screen is several named
 * stages waiting to be split (the upload view was once one 371-line function).
 *
 * @module
 */
import assert from "node:assert/strict";
import { jsSources } from "../source_files.ts";

/** The longest a function of api/ui may be, in lines from its first to its closing line. */
const MAX_LINES = 80;

/** A line that opens a function: a `function` (declaration or expression) or a block arrow. */
const OPENS = /\bfunction\b[\s*]*\w*\s*\(|=>\s*\{\s*$/;

interface FunctionSpan {
  line: number;
  lines: number;
  text: string;
}

/**
 * Every function of a module formatted by `deno fmt`, with its length: its body is every line
 * after the opening one that is indented deeper (or blank); the first line back at the opening
 * indentation closes it, unless it only closes a multi-line parameter list (`) {`).
 */
function functionSpans(source: string): FunctionSpan[] {
  const lines = source.split("\n");
  const indent = (l: string) => l.length - l.trimStart().length;
  const spans: FunctionSpan[] = [];
  lines.forEach((l, i) => {
    const t = l.trimStart();
    if (t.startsWith("*") || t.startsWith("/") || !OPENS.test(l)) return;
    const at = indent(l);
    let j = i + 1;
    while (
      j < lines.length &&
      (lines[j].trim() === "" || indent(lines[j]) > at || /^\s*\)[^{]*\{\s*$/.test(lines[j]))
    ) j++;
    spans.push({ line: i + 1, lines: Math.min(j, lines.length - 1) - i + 1, text: t });
  });
  return spans;
}

Deno.test("functionSpans() measures declarations, multi-line signatures and block arrows", () => {
  const src = [
    "export function a(x) {", // 1
    "  const f = (y) => {", // 2
    "    return y;", // 3
    "  };", // 4
    "", // 5
    "  return f(x);", // 6
    "}", // 7
    "function b(", // 8
    "  p,", // 9
    "  q,", // 10
    ") {", // 11
    "  return p + q;", // 12
    "}", // 13
    "const c = () => 1;", // 14
    "/** function d() {} */", // 15
  ].join("\n");
  assert.deepEqual(functionSpans(src).map((s) => [s.line, s.lines]), [[1, 7], [2, 3], [8, 6]]);
});

Deno.test(`every function of the page (api/ui/**/*.js) is at most ${MAX_LINES} lines`, async () => {
  const dir = new URL("../../api/ui/", import.meta.url);
  const tooLong: string[] = [];
  let functions = 0;
  for await (const [url, text] of jsSources(dir)) {
    const file = url.pathname.slice(dir.pathname.length);
    for (const s of functionSpans(text)) {
      functions++;
      const name = s.text.match(/function\s+(\w+)/)?.[1] ?? s.text.match(/(\w+)\s*[:=]/)?.[1];
      if (s.lines > MAX_LINES) {
        tooLong.push(`${file}:${s.line} ${name ?? s.text}: ${s.lines} lines`);
      }
    }
  }
  assert.ok(functions > 100, `only ${functions} functions found`);
  assert.deepEqual(tooLong, []);
});
