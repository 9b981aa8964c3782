// @ts-check
/// <reference lib="dom" />
/**
 * The shared pieces the views of fields.js draw with (passed to them as `ui`).
 *
 * @module
 */
import { show } from "./shell.js";
import { chart, keyedDownload } from "./charts.js";
import { pager, pageSize } from "./lists.js";
import { snippets } from "./snippet_panel.js";

/** The shared pieces the views of fields.js draw with. */
export function ui() {
  return { show, chart, pager, snippets, keyedDownload, pageSize };
}
