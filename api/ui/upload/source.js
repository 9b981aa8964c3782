// @ts-check
/// <reference lib="dom" />
/**
 * Where the upload's data comes from: a chosen file or pasted text, and its format (delimited
 * text or JSON), switched to JSON when the chosen file's name ends in `.json`.
 *
 * @module
 */
import { h } from "../dom.js";

/**
 * One radio button of the format choice.
 * @param {"text" | "json"} value
 */
function formatRadio(value) {
  return /** @type {HTMLInputElement} */ (h("input", {
    type: "radio",
    name: "format",
    id: `fmt-${value}`,
    value,
    checked: value === "text",
  }));
}

/**
 * The "Data" part of the upload form, and how to read it.
 * @param {() => void} changed Called when the chosen file changes (after the format follows it).
 */
export function dataSource(changed) {
  const file = /** @type {HTMLInputElement} */ (h("input", {
    id: "up-file",
    type: "file",
    accept: ".csv,.txt,.tsv,.dat,.json,text/csv,application/json,text/plain",
  }));
  const paste = /** @type {HTMLTextAreaElement} */ (h("textarea", {
    id: "up-text",
    rows: "6",
    spellcheck: "false",
    placeholder: "date,value\n2001-01,80.2\n2001-02,85.1",
  }));
  const fmtText = formatRadio("text");
  const fmtJson = formatRadio("json");
  file.addEventListener("change", () => {
    const n = file.files?.[0]?.name ?? "";
    if (/\.json$/i.test(n)) fmtJson.checked = true;
    else if (n) fmtText.checked = true;
    changed();
  });
  const isJson = () => fmtJson.checked;
  return {
    isJson,
    /** The chosen file's name, else a name for the pasted data. */
    fileName: () => file.files?.[0]?.name ?? (isJson() ? "series.json" : "series.csv"),
    /** The chosen file's text, else the pasted text. */
    readText: async () => (file.files?.[0] ? await file.files[0].text() : paste.value),
    el: h(
      "fieldset",
      null,
      h("legend", null, "Data"),
      h(
        "div",
        { class: "choice", role: "radiogroup", "aria-label": "Format" },
        h("label", { for: "fmt-text" }, fmtText, "Delimited text (CSV, TSV, …)"),
        h("label", { for: "fmt-json" }, fmtJson, "JSON"),
      ),
      h(
        "div",
        { class: "grid" },
        h(
          "div",
          { class: "field" },
          h("label", { for: "up-file" }, "File"),
          file,
          h("span", { class: "hint" }, "Or paste the data below."),
        ),
        h("div", { class: "field wide" }, h("label", { for: "up-text" }, "Pasted data"), paste),
      ),
    ),
  };
}

/** @typedef {ReturnType<typeof dataSource>} DataSource */
