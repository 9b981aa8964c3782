// @ts-check
/// <reference lib="dom" />
/**
 * The service's charts inline: SVG fetched at the width of its box and in the page's theme,
 * parsed as XML and stripped of anything executable; and downloads that carry the tab's key.
 *
 * @module
 */
import { h } from "./dom.js";
import { apiKey, authFetch } from "./service.js";

/** "light" or "dark", as the page is drawn now. */
function effectiveTheme() {
  const t = document.documentElement.dataset.theme;
  if (t === "light" || t === "dark") return t;
  return matchMedia("(prefers-color-scheme: dark)").matches ? "dark" : "light";
}

/**
 * Remove anything executable from an SVG document before showing it inline.
 * @param {Element} root
 */
function sanitizeSvg(root) {
  for (const bad of root.querySelectorAll("script, foreignObject, iframe, object, embed")) {
    bad.remove();
  }
  for (const el of [root, ...root.querySelectorAll("*")]) {
    for (const a of [...el.attributes]) {
      const v = a.value.trim().toLowerCase();
      if (
        /^on/i.test(a.name) ||
        ((a.name === "href" || a.name.endsWith(":href")) && v.startsWith("javascript:"))
      ) {
        el.removeAttribute(a.name);
      }
    }
  }
}

/**
 * Draw the service's chart at `path` into `box` (width fitted to the box, page theme).
 * @param {HTMLElement} box
 */
async function drawChart(box) {
  const path = box.dataset.src ?? "";
  const width = Math.max(320, Math.min(1000, Math.round((box.clientWidth || 800) - 18)));
  const height = Math.max(240, Math.round(width * (width < 500 ? 0.75 : 0.5)));
  const url = `${path}${
    path.includes("?") ? "&" : "?"
  }width=${width}&height=${height}&theme=${effectiveTheme()}`;
  let res;
  try {
    res = await authFetch(url);
  } catch (e) {
    box.replaceChildren(h("p", { class: "muted" }, `Chart unavailable: ${e}`));
    return;
  }
  if (!res.ok) {
    const p = await res.json().catch(() => null);
    box.replaceChildren(
      h("p", { class: "muted" }, `Chart unavailable: ${p?.detail ?? res.status}`),
    );
    return;
  }
  const doc = new DOMParser().parseFromString(await res.text(), "image/svg+xml");
  const svg = doc.documentElement;
  if (svg.localName !== "svg" || doc.querySelector("parsererror")) {
    box.replaceChildren(h("p", { class: "muted" }, "Chart unavailable: the service sent no SVG"));
    return;
  }
  sanitizeSvg(svg);
  box.replaceChildren(document.importNode(svg, true));
  box.dataset.drawn = "true";
}

/**
 * A download link's click with a key set: a plain link cannot send the key, so fetch the file
 * with it and save that.
 * @param {MouseEvent} e
 */
export async function keyedDownload(e) {
  if (!apiKey()) return;
  e.preventDefault();
  const a = /** @type {HTMLAnchorElement} */ (e.currentTarget);
  const res = await authFetch(a.href);
  if (!res.ok) return;
  const url = URL.createObjectURL(await res.blob());
  const tmp = h("a", { href: url, download: a.download || "download" });
  document.body.append(tmp);
  tmp.click();
  tmp.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/**
 * A chart box for a service chart path; drawn once attached.
 * @param {string} path
 * @param {string} label
 */
export function chart(path, label) {
  const box = h(
    "figure",
    { class: "chart", "data-src": path, "aria-label": label },
    h("p", { class: "muted" }, "Drawing the chart…"),
  );
  requestAnimationFrame(() => drawChart(box));
  return box;
}

/** Draw every chart on the page again (after the theme changed). */
export function redrawCharts() {
  for (const el of document.querySelectorAll("figure.chart[data-src]")) {
    drawChart(/** @type {HTMLElement} */ (el));
  }
}
