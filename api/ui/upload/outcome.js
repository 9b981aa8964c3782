// @ts-check
/// <reference lib="dom" />
/**
 * What an upload answered, on the form: the stored series (or that it was stored before), or
 * the problem, with each metadata error on its field and the first data error at its row and
 * column in the lines of the file.
 *
 * @module
 */
import { callout, h, seg } from "../dom.js";
import { problemBox } from "../service.js";
import { excerpt } from "./excerpt.js";

/** @typedef {import("./columns.js").UploadField} UploadField */

/**
 * Clear the error line of every field.
 * @param {UploadField[]} all
 */
export function clearFieldErrors(all) {
  for (const f of all) {
    f.error.textContent = "";
    f.input.removeAttribute("aria-invalid");
  }
}

/**
 * The stored series with its upload report.
 * @param {any} data The answer of `POST /v1/series`.
 */
export function storedMessage(data) {
  const s = data.series;
  const rep = data.report ?? {};
  return callout(
    "ok",
    data.created
      ? "Stored as a new series"
      : "Already stored: the same content was uploaded before",
    h(
      "p",
      null,
      h("a", { href: `#/series/${seg(s.id)}`, id: "uploaded-link" }, s.name),
      ` · ${s.quantity} in ${s.units} · ${s.n} points · ${s.start_date} – ${s.end_date}`,
    ),
    h(
      "p",
      { class: "muted" },
      `Read ${rep.read ?? "?"}, kept ${rep.kept ?? "?"}, missing ${
        rep.missing ?? 0
      }, merged duplicates ${rep.aggregated ?? 0}.`,
    ),
    h("p", null, h("a", { href: "#/series" }, "See all series")),
  );
}

/**
 * Put each error about query or body metadata (one with no row) on the field its pointer
 * names, opening the folded part the field sits in.
 * @param {UploadField[]} all
 * @param {any} p The problem.
 */
function markUploadFields(all, p) {
  for (const err of p.errors ?? []) {
    const key = String(err.pointer ?? "").split("/")[1];
    const f = all.find((x) => x.name === key || x.name === `json-${key}`);
    if (f && err.row === undefined) {
      f.error.textContent = err.message;
      f.input.setAttribute("aria-invalid", "true");
      f.wrap.closest("details")?.setAttribute("open", "");
    }
  }
}

/**
 * The first error with a row: where it is, and the lines of the file around it.
 * @param {any} p The problem.
 * @param {string | undefined} text The text that was sent.
 * @param {string} delimiter The form's delimiter ("" when the service guessed).
 */
function problemPlace(p, text, delimiter) {
  const placed = (p.errors ?? []).find((/** @type {any} */ e) => typeof e.row === "number");
  if (!placed) return "";
  return h(
    "div",
    { class: "panel", id: "problem-place" },
    h(
      "p",
      null,
      `First problem at row ${placed.row}`,
      placed.column !== undefined ? `, column ${placed.column}` : "",
      `: ${placed.message}`,
    ),
    text ? excerpt(text, placed.row, placed.column, delimiter) : "",
  );
}

/**
 * Show a refused upload: errors on their fields, the problem, and the place in the file.
 * @param {HTMLElement} status
 * @param {UploadField[]} all
 * @param {any} data The problem (may be missing).
 * @param {string | undefined} text
 * @param {string} delimiter
 */
export function showRefused(status, all, data, text, delimiter) {
  const p = data ?? {};
  markUploadFields(all, p);
  status.replaceChildren(
    problemBox(p, "The series was not stored"),
    problemPlace(p, text, delimiter),
  );
  status.scrollIntoView({ block: "nearest" });
}
