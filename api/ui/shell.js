// @ts-check
/// <reference lib="dom" />
/**
 * The page's view lifecycle: which navigation is current, what to undo when the view changes
 * (event streams, timers), drawing a view's content, and redrawing it. Views get a generation
 * number when they start and draw only while it is still the current one.
 *
 * @module
 */
import { append } from "./dom.js";

/** @typedef {import("./dom.js").Child} Child */

/** Functions to run when the view changes (close event streams, stop timers). */
let cleanups = /** @type {(() => void)[]} */ ([]);
let generation = 0;
/** Draws the view named by the URL fragment (set by page.js). */
let redraw = () => {};
const view = /** @type {HTMLElement} */ (document.getElementById("view"));

/** Undo the current view's streams and timers, and start a new navigation; its generation. */
export function startView() {
  for (const f of cleanups) f();
  cleanups = [];
  return ++generation;
}

/** @param {number} gen True while no newer navigation has happened. */
export function isCurrent(gen) {
  return gen === generation;
}

/** @param {() => void} f Run when the view changes. */
export function onLeave(f) {
  cleanups.push(f);
}

/** @param {() => void} f How to draw the current view again. */
export function setRedraw(f) {
  redraw = f;
}

/** @param {number} gen Draw the view again if no newer navigation happened. */
export function redrawIfCurrent(gen) {
  if (gen === generation) redraw();
}

/**
 * Replace the view's content (only if no newer navigation happened).
 * @param {number} gen
 * @param {string} title
 * @param {(Child | Child[])[]} content
 */
export function show(gen, title, ...content) {
  if (gen !== generation) return false;
  document.title = `${title} · sunlag`;
  view.replaceChildren();
  append(view, content);
  return true;
}

/** Move the focus to the view's content. */
export function focusView() {
  view.focus({ preventScroll: false });
}
