// @ts-check
/// <reference lib="dom" />
/**
 * "From a script": a panel that shows a view's requests as `curl` and Python `requests`, in
 * two tabs (WAI-ARIA tabs pattern) with a copy button.
 *
 * @module
 */
import { curlScript, pythonSnippet } from "./snippets.js";
import { h } from "./dom.js";

/** @typedef {import("./snippets.js").RequestSpec} RequestSpec */

const BASE = location.origin;

/**
 * One tab's panel; panels take focus so a keyboard can scroll their long lines.
 * @param {"curl" | "python"} which
 */
function snippetPanel(which) {
  return h("pre", {
    id: `snippet-${which}`,
    role: "tabpanel",
    "aria-labelledby": `tab-${which}`,
    tabindex: "0",
    hidden: which === "python",
  });
}

/**
 * One tab; the curl tab is selected first.
 * @param {"curl" | "python"} which
 * @param {string} label
 * @param {() => void} onclick
 */
function snippetTab(which, label, onclick) {
  const first = which === "curl";
  return h("button", {
    type: "button",
    role: "tab",
    id: `tab-${which}`,
    "aria-selected": String(first),
    "aria-controls": `snippet-${which}`,
    tabindex: first ? undefined : "-1",
    onclick,
  }, label);
}

/**
 * Copies the shown panel's text, and says whether it could.
 * @param {HTMLElement} curl
 * @param {HTMLElement} py
 */
function copyButton(curl, py) {
  const copy = h("button", {
    type: "button",
    class: "ghost",
    onclick: async () => {
      const text = (curl.hidden ? py : curl).textContent ?? "";
      try {
        await navigator.clipboard.writeText(text);
        copy.textContent = "Copied";
      } catch {
        copy.textContent = "Select the text to copy";
      }
      setTimeout(() => (copy.textContent = "Copy"), 1500);
    },
  }, "Copy");
  return copy;
}

/**
 * Arrow keys, Home and End move between the two tabs (an arrow key goes to the other one).
 * @param {HTMLElement} tablist
 * @param {HTMLElement} py
 * @param {(which: "curl" | "python", focus: boolean) => void} select
 */
function tabKeys(tablist, py, select) {
  tablist.addEventListener("keydown", (e) => {
    if (!["ArrowLeft", "ArrowRight", "Home", "End"].includes(e.key)) return;
    e.preventDefault();
    const next = e.key === "Home"
      ? "curl"
      : e.key === "End"
      ? "python"
      : py.hidden
      ? "python"
      : "curl";
    select(next, true);
  });
}

/**
 * "From a script": the view's requests as curl and Python.
 * @param {RequestSpec[]} reqs
 */
export function snippets(reqs) {
  const curl = snippetPanel("curl");
  const py = snippetPanel("python");
  /**
   * @param {"curl" | "python"} which
   * @param {boolean} [focus]
   */
  const select = (which, focus = false) => {
    curl.hidden = which !== "curl";
    py.hidden = which !== "python";
    for (const [tab, on] of [[tabCurl, which === "curl"], [tabPy, which === "python"]]) {
      const t = /** @type {HTMLElement} */ (tab);
      t.setAttribute("aria-selected", String(on));
      t.tabIndex = on ? 0 : -1; // one tab stop for the tab list (WAI-ARIA tabs pattern)
      if (on && focus) t.focus();
    }
  };
  const tabCurl = snippetTab("curl", "curl", () => select("curl"));
  const tabPy = snippetTab("python", "Python requests", () => select("python"));
  const tablist = h(
    "div",
    { role: "tablist", "aria-label": "Snippet language", class: "tablist" },
    tabCurl,
    tabPy,
  );
  tabKeys(tablist, py, select);
  const section = h(
    "section",
    { class: "snippets", "aria-labelledby": "snippets-title" },
    h("h2", { id: "snippets-title" }, "From a script"),
    h("p", { class: "lede" }, "The same requests this view makes, to run from a shell or Python."),
    h("div", { class: "tabs" }, tablist, copyButton(curl, py)),
    curl,
    py,
  );
  /** @param {RequestSpec[]} r */
  const update = (r) => {
    curl.textContent = curlScript(BASE, r);
    py.textContent = pythonSnippet(BASE, r);
  };
  update(reqs);
  return { el: section, update };
}
