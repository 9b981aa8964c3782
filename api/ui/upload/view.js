// @ts-check
/// <reference lib="dom" />
/**
 * The page's `#/upload` view: upload delimited text or JSON with the options of
 * `POST /v1/series`. The form is built from the OpenAPI document; a refused upload shows the
 * problem with the row and column, and the lines of the file around it with the bad cell
 * marked.
 *
 * @module
 */
import { callout, h } from "../dom.js";
import { call, openApi, quantities } from "../service.js";
import { show } from "../shell.js";
import { snippets } from "../snippet_panel.js";
import { jsonOptions, textOptions, uploadFields } from "./columns.js";
import { dataSource } from "./source.js";
import { buildUpload, formValues } from "./request.js";
import { clearFieldErrors, showRefused, storedMessage } from "./outcome.js";

/**
 * Send the upload the form describes and show the answer in `status`.
 * @param {Parameters<typeof buildUpload>[0]} form
 * @param {import("./source.js").DataSource} source
 * @param {HTMLElement} status
 */
async function submitUpload(form, source, status) {
  clearFieldErrors(form.all);
  const built = await buildUpload(form, source);
  if (built.local) {
    return status.replaceChildren(callout("bad", "Not sent", h("p", null, built.local)));
  }
  if (!built.text && built.spec.json === undefined) {
    return status.replaceChildren(
      callout("bad", "Nothing to upload", h("p", null, "Choose a file or paste the data.")),
    );
  }
  status.replaceChildren(h("p", { class: "muted" }, "Uploading…"));
  const r = await call(built.spec, built.spec.json === undefined ? { text: built.text } : {});
  if (r.ok) return status.replaceChildren(storedMessage(r.data));
  showRefused(status, form.all, r.data, built.text, formValues(form.all).delimiter ?? "");
}

/** @param {number} gen */
export async function uploadView(gen) {
  const doc = await openApi();
  const qs = await quantities();
  const form = { doc, ...uploadFields(doc, qs) };
  const status = h("div", { id: "upload-status", "aria-live": "polite" });
  const snip = snippets([]);
  const textBox = textOptions(form.textFields);
  const jsonBox = jsonOptions(form.jsonFields);
  const refresh = async () => {
    textBox.hidden = source.isJson();
    jsonBox.hidden = !source.isJson();
    const { spec } = await buildUpload(form, source);
    snip.update([spec]);
  };
  const source = dataSource(refresh);
  const el = h(
    "form",
    {
      id: "upload-form",
      novalidate: true,
      onchange: refresh,
      oninput: refresh,
      onsubmit: (/** @type {Event} */ e) => {
        e.preventDefault();
        return submitUpload(form, source, status);
      },
    },
    source.el,
    h(
      "fieldset",
      null,
      h("legend", null, "About the series"),
      h("div", { class: "grid" }, form.metaFields.map((f) => f.wrap)),
    ),
    textBox,
    jsonBox,
    h(
      "div",
      { class: "actions" },
      h("button", { type: "submit" }, "Upload"),
      h("span", { class: "muted" }, "Nothing is stored unless every row reads cleanly."),
    ),
    status,
  );
  show(
    gen,
    "Upload",
    h("h1", null, "Upload a series"),
    h(
      "p",
      { class: "lede" },
      "Delimited text with a header row (comma, semicolon, tab or spaces; # comments), or a JSON series. The options are those of POST /v1/series.",
    ),
    el,
    snip.el,
  );
  refresh();
}
