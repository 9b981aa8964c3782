/**
 * Cells of a text line: RFC 4180 quoting for comma, semicolon and tab; runs of blanks for
 * whitespace-separated tables; and detection of the delimiter from the first rows.
 *
 * @module
 */
import type { Line } from "./lines.ts";

/** Delimiter names accepted by a text upload; `auto` detects one. */
export type DelimiterName = "auto" | "comma" | "semicolon" | "tab" | "whitespace";

/** The character each stated delimiter splits on (" " = runs of blanks). */
export const DELIMS: Record<Exclude<DelimiterName, "auto">, string> = {
  comma: ",",
  semicolon: ";",
  tab: "\t",
  whitespace: " ",
};

/** The name of a delimiter character (inverse of {@link DELIMS}). */
export function delimiterName(delimiter: string): Exclude<DelimiterName, "auto"> {
  return (Object.keys(DELIMS) as (keyof typeof DELIMS)[]).find((k) => DELIMS[k] === delimiter)!;
}

/**
 * Split one line; null when a quote is not closed. Whitespace mode splits on runs of blanks.
 *
 * @example
 * ```ts
 * import { splitLine } from "./delimiter.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(splitLine('a,"b,""c""",d', ","), ["a", 'b,"c"', "d"]);
 * assert.equal(splitLine('a,"b', ","), null);
 * ```
 */
export function splitLine(line: string, delimiter: string): string[] | null {
  if (delimiter === " ") return line.trim().split(/\s+/);
  if (!line.includes('"')) return line.split(delimiter);
  const out: string[] = [];
  let cur = "", i = 0, quoted = false, wasQuoted = false;
  while (i < line.length) {
    const ch = line[i];
    if (quoted) {
      if (ch === '"') {
        if (line[i + 1] === '"') {
          cur += '"';
          i += 2;
          continue;
        }
        quoted = false;
      } else cur += ch;
      i++;
      continue;
    }
    if (ch === '"' && cur.trim() === "" && !wasQuoted) {
      quoted = true;
      wasQuoted = true;
      cur = "";
    } else if (ch === delimiter) {
      out.push(cur);
      cur = "";
      wasQuoted = false;
    } else cur += ch;
    i++;
  }
  if (quoted) return null;
  out.push(cur);
  return out;
}

/**
 * Cells of a line without splitting it (one pass, no allocation); a quoted line is split
 * properly (-1 when a quote is not closed).
 */
export function countCells(line: string, delimiter: string): number {
  if (delimiter === " ") {
    let n = 0, inCell = false;
    for (let i = 0; i < line.length; i++) {
      const c = line.charCodeAt(i);
      const blank = c === 32 || c === 9 || c === 11 || c === 12 || c === 160;
      if (!blank && !inCell) n++;
      inCell = !blank;
    }
    return Math.max(n, 1);
  }
  if (line.includes('"')) return splitLine(line, delimiter)?.length ?? -1;
  let n = 1;
  for (let i = line.indexOf(delimiter); i >= 0; i = line.indexOf(delimiter, i + 1)) n++;
  return n;
}

/** Choose the delimiter that splits the first rows most consistently into 2+ cells. */
export function detectDelimiter(lines: Line[]): string | null {
  const sample = lines.slice(0, 100);
  let best: string | null = null, bestScore = 0;
  for (const d of ["\t", ";", ",", " "]) {
    const counts = new Map<number, number>();
    for (const l of sample) {
      const k = countCells(l.text, d);
      counts.set(k, (counts.get(k) ?? 0) + 1);
    }
    let mode = 0, modeCount = 0;
    for (const [k, v] of counts) {
      if (v > modeCount || (v === modeCount && k > mode)) [mode, modeCount] = [k, v];
    }
    if (mode < 2) continue;
    const score = modeCount / sample.length;
    if (score > bestScore + 1e-9) [best, bestScore] = [d, score];
  }
  return best;
}
