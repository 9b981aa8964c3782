// @ts-check
/// <reference lib="dom" />
/**
 * The lines of an uploaded file around a refused row, the row highlighted and the bad cell
 * marked, read with the same delimiter the service used (or the one it would guess).
 *
 * @module
 */
import { h } from "../dom.js";

/**
 * The delimiter a header line suggests, in the service's order of preference: a tab, then a
 * semicolon, then a comma, else runs of white space.
 * @param {string} header
 * @returns {"tab" | "semicolon" | "comma" | "whitespace"}
 */
export function sniffDelimiter(header) {
  return header.includes("\t")
    ? "tab"
    : header.includes(";")
    ? "semicolon"
    : header.includes(",")
    ? "comma"
    : "whitespace";
}

/**
 * The 0-based index of a column named by header text or given as an index; -1 if not found.
 * @param {string} header
 * @param {string | number | undefined} column
 * @param {(l: string) => string[]} split
 */
function columnIndex(header, column, split) {
  if (typeof column === "number") return column;
  if (typeof column !== "string") return -1;
  return split(header).map((c) => c.trim().replace(/^"|"$/g, "")).indexOf(column);
}

/**
 * One numbered line of the excerpt; on the problem row, the cell at `col` is marked.
 * @param {string} l
 * @param {string} num The line number, padded, and the separator bar.
 * @param {boolean} bad
 * @param {number} col
 * @param {string | undefined} sep
 */
function excerptLine(l, num, bad, col, sep) {
  const line = h("span", { class: bad ? "line bad" : "line" }, num);
  if (bad && col >= 0 && sep) {
    const cells = l.split(sep);
    cells.forEach((c, j) => {
      if (j) line.append(sep);
      line.append(j === col ? h("mark", null, c === "" ? "␣" : c) : c);
    });
  } else line.append(l);
  return line;
}

/**
 * A few lines of the uploaded text around a problem row, the row highlighted and the cell
 * marked.
 * @param {string} text
 * @param {number} row 1-based line number.
 * @param {string | number | undefined} column Header name or 0-based index.
 * @param {string} delimiter "comma", "semicolon", "tab", "whitespace" or "" (guess).
 */
export function excerpt(text, row, column, delimiter) {
  const lines = text.split(/\r\n|\n|\r/);
  if (lines.length > 1 && lines[lines.length - 1] === "") lines.pop();
  const header = lines.find((l) => l.trim() !== "" && !l.trimStart().startsWith("#")) ?? "";
  const guess = delimiter || sniffDelimiter(header);
  const sep = /** @type {Record<string, string>} */ ({ comma: ",", semicolon: ";", tab: "\t" })[
    guess
  ];
  /** @param {string} l */
  const split = (l) => (sep ? l.split(sep) : l.trim().split(/\s+/));
  const col = columnIndex(header, column, split);
  const from = Math.max(1, row - 3);
  const to = Math.min(lines.length, row + 2);
  const pre = h("pre", { class: "excerpt", "aria-label": `Lines ${from} to ${to} of the file` });
  for (let i = from; i <= to; i++) {
    const num = String(i).padStart(String(to).length, " ") + " │ ";
    pre.append(excerptLine(lines[i - 1] ?? "", num, i === row, col, sep));
  }
  return pre;
}
