// @ts-check
/// <reference lib="dom" />
/**
 * The built-in page: a small client of the public API, served as a plain ES module (no build
 * step, no framework). Every view is drawn from the same requests a script would make, and
 * shows them as `curl` and Python `requests` snippets. Text from the service is always set as
 * text, never parsed as HTML; charts (SVG from the service) are parsed as XML and stripped of
 * scripts and event handlers before they are shown.
 *
 * This module routes the URL fragment to one view per module: #/series and #/series/{id}
 * (series.js), #/fields and #/fields/{id} (fields.js), #/runs and #/runs/{id} (runs.js),
 * #/upload (upload/view.js), #/analyse (analyse.js); and it runs the theme and API-key buttons.
 *
 * @module
 */
import { callout, h } from "./dom.js";
import { apiKey, call, setApiKey, whenUnauthorized } from "./service.js";
import { focusView, isCurrent, setRedraw, show, startView } from "./shell.js";
import { redrawCharts } from "./charts.js";
import { ui } from "./kit.js";
import { seriesList, seriesView } from "./series.js";
import { runList, runView } from "./runs.js";
import { fieldList, fieldView } from "./fields.js";
import { analyseView } from "./analyse.js";
import { uploadView } from "./upload/view.js";

// ---------------------------------------------------------------------------------------------
// Router

/** The view's path segments and query, from the URL fragment (#/series by default). */
function parseHash() {
  const raw = location.hash.replace(/^#/, "") || "/series";
  const q = raw.indexOf("?");
  const path = q < 0 ? raw : raw.slice(0, q);
  const parts = path.split("/").filter(Boolean).map(decodeURIComponent);
  return { parts, query: new URLSearchParams(q < 0 ? "" : raw.slice(q + 1)) };
}

/**
 * Draw the view named by the URL fragment.
 * @param {boolean} [navigated] True after the user moved to another view: focus goes to the
 *   new content (not on the first load, and not when a view redraws itself).
 */
async function render(navigated = false) {
  const gen = startView();
  const { parts, query } = parseHash();
  const section = parts[0] ?? "series";
  for (const a of document.querySelectorAll("[data-nav]")) {
    if (a.getAttribute("data-nav") === section) a.setAttribute("aria-current", "page");
    else a.removeAttribute("aria-current");
  }
  try {
    if (section === "series" && parts[1]) await seriesView(gen, parts[1]);
    else if (section === "series") await seriesList(gen, query);
    else if (section === "runs" && parts[1]) await runView(gen, parts[1]);
    else if (section === "runs") await runList(gen, query);
    else if (section === "fields" && parts[1]) await fieldView(gen, parts[1], query, ui());
    else if (section === "fields") await fieldList(gen, query, ui());
    else if (section === "upload") await uploadView(gen);
    else if (section === "analyse") await analyseView(gen, query);
    else {show(
        gen,
        "Not found",
        h("h1", null, "No such view"),
        h("p", null, h("a", { href: "#/series" }, "Go to the series")),
      );}
  } catch (e) {
    show(gen, "Error", callout("bad", "The page hit an error", h("p", null, String(e))));
  }
  if (navigated && isCurrent(gen)) focusView();
}
setRedraw(() => render());

// ---------------------------------------------------------------------------------------------
// Theme and start

const THEMES = ["auto", "light", "dark"];
const themeButton = /** @type {HTMLButtonElement} */ (document.getElementById("theme"));

/** @param {string} t */
function applyTheme(t) {
  if (t === "light" || t === "dark") document.documentElement.dataset.theme = t;
  else delete document.documentElement.dataset.theme;
  themeButton.textContent = `Theme: ${t}`;
}

let theme = "auto";
try {
  theme = localStorage.getItem("sunlag-theme") ?? "auto";
} catch {
  theme = "auto";
}
applyTheme(theme);
themeButton.addEventListener("click", () => {
  theme = THEMES[(THEMES.indexOf(theme) + 1) % THEMES.length];
  try {
    localStorage.setItem("sunlag-theme", theme);
  } catch {
    // storage unavailable (private mode): the choice lasts for this page only
  }
  applyTheme(theme);
  redrawCharts();
});
matchMedia("(prefers-color-scheme: dark)").addEventListener(
  "change",
  () => theme === "auto" && redrawCharts(),
);

// ---------------------------------------------------------------------------------------------
// API key: asked for when the instance requires one, kept for this tab only

const keyButton = /** @type {HTMLButtonElement} */ (document.getElementById("key"));
const keyDialog = /** @type {HTMLDialogElement} */ (document.getElementById("key-dialog"));
const keyForm = /** @type {HTMLFormElement} */ (document.getElementById("key-form"));
const keyInput = /** @type {HTMLInputElement} */ (document.getElementById("key-input"));
const keyMessage = /** @type {HTMLElement} */ (document.getElementById("key-message"));

/** Show who the page acts as, from `GET /v1/me`. */
async function showIdentity() {
  const me = await call({ method: "GET", path: "/v1/me" });
  if (!me.ok) {
    keyButton.textContent = "API key…";
    return me;
  }
  keyButton.hidden = !me.data.keys_required && !apiKey();
  keyButton.textContent = me.data.owner ? `Key: ${me.data.owner} (${me.data.role})` : "API key…";
  return me;
}

/** @param {string} message */
function askForKey(message) {
  keyMessage.textContent = message;
  keyInput.value = "";
  if (!keyDialog.open) keyDialog.showModal();
}

keyButton.addEventListener("click", () =>
  askForKey(
    apiKey()
      ? "This tab uses a key. Give another, or clear the field to forget it."
      : "This instance requires an API key for anything not public. Ask its admin for one.",
  ));
keyForm.addEventListener("submit", async (e) => {
  e.preventDefault();
  setApiKey(keyInput.value.trim());
  keyDialog.close();
  await showIdentity();
  render(true);
});
document.getElementById("key-cancel")?.addEventListener("click", () => keyDialog.close());
whenUnauthorized((detail) => askForKey(detail));

addEventListener("hashchange", () => render(true));
showIdentity().then((me) => {
  if (me.ok && me.data.keys_required && !apiKey()) {
    askForKey("This instance requires an API key; without one you see public items only.");
  }
});
render();
