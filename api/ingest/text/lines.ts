/**
 * Stage 2 of a text upload: split the text into data lines, skip blank and `#` comment lines,
 * and read the `# key: value` metadata of a sunlag series export.
 *
 * @module
 */
import { MAX_POINTS } from "../types.ts";

/** One data line with its 1-based line number in the file. */
export interface Line {
  row: number;
  text: string;
}

/** The comment line that opens a sunlag series CSV export (see seriesToCsv). */
export const EXPORT_MARKER = "# sunlag series";

/** Metadata keys a sunlag export carries in its comment header. */
export const FILE_META_KEYS = [
  "name",
  "quantity",
  "units",
  "description",
  "source",
  "version",
] as const;

/** The data lines of a body and the metadata found in its comment header. */
export interface TextLines {
  lines: Line[];
  /** Whether the body opens with {@link EXPORT_MARKER}. */
  isExport: boolean;
  /** `# key: value` lines of an export, by key (only {@link FILE_META_KEYS}). */
  fileMeta: Record<string, string>;
}

/**
 * Split a body into data lines (LF, CRLF or CR line ends). A body with more than MAX_POINTS
 * data rows is refused by a cheap count before any line is split.
 *
 * @returns the lines, or `"too many"`
 * @example
 * ```ts
 * import { readLines } from "./lines.ts";
 * import assert from "node:assert/strict";
 * const r = readLines("# sunlag series\n# name: \"A\"\n\nt,v\r\n1,2\n");
 * assert.ok(r !== "too many");
 * assert.deepEqual(r.lines.map((l) => l.row), [4, 5]);
 * assert.deepEqual(r.fileMeta, { name: "A" });
 * ```
 */
export function readLines(text: string): TextLines | "too many" {
  if (countDataLines(text, MAX_POINTS + 1) > MAX_POINTS + 1) return "too many";
  const raw = text.split(/\r\n|\n|\r/);
  const lines: Line[] = [];
  const fileMeta: Record<string, string> = {};
  let isExport = false;
  for (let i = 0; i < raw.length; i++) {
    const s = raw[i];
    const t = s.trim();
    if (t === "") continue;
    if (t.startsWith("#")) {
      if (lines.length === 0 && t === EXPORT_MARKER) isExport = true;
      else if (isExport && lines.length === 0) {
        const m = /^#\s*([a-z_]+):\s?(.*)$/.exec(s.trimStart());
        if (m && (FILE_META_KEYS as readonly string[]).includes(m[1])) {
          fileMeta[m[1]] = decodeMetaValue(m[2]);
        }
      }
      continue;
    }
    lines.push({ row: i + 1, text: s });
    if (lines.length > MAX_POINTS + 1) return "too many";
  }
  return { lines, isExport, fileMeta };
}

function decodeMetaValue(v: string): string {
  if (v.startsWith('"')) {
    try {
      const s = JSON.parse(v);
      if (typeof s === "string") return s;
    } catch {
      // not JSON: keep as written
    }
  }
  return v;
}

/** Data lines (neither blank nor `#` comments) in `text`, counting no further than limit + 1. */
function countDataLines(text: string, limit: number): number {
  let count = 0, atStart = true, blank = true;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) {
      if (!blank && ++count > limit) return count;
      atStart = true;
      blank = true;
    } else if (atStart) {
      if (c === 32 || c === 9) continue;
      atStart = false;
      blank = c === 35; // "#": a comment counts as blank
    }
  }
  return blank ? count : count + 1;
}
