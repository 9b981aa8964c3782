/**
 * The built-in page: `GET /` serves a static HTML shell, and `/ui/*` its stylesheet and a few
 * small ES modules (plain JavaScript with JSDoc types, checked by `deno check`; no build step):
 * `page.js` (routing), one module per view (`series.js`, `runs.js`, `fields.js`, `analyse.js`,
 * `upload/view.js`) and the pieces they share (`shell.js`, `lists.js`, `charts.js`,
 * `snippet_panel.js`, `forms.js`, `service.js`, `dom.js`, `snippets.js`); api/ui/README.md
 * lists them all.
 * The page is a client of the public API: it works with no outside network, loads nothing
 * from elsewhere, and shows every request it makes as `curl` and Python `requests`.
 *
 * @module
 */
import type { App } from "../app_env.ts";
import html from "./page.html" with { type: "text" };
import css from "./page.css" with { type: "text" };
import pageJs from "./page.js" with { type: "text" };
import snippetsJs from "./snippets.js" with { type: "text" };
import domJs from "./dom.js" with { type: "text" };
import serviceJs from "./service.js" with { type: "text" };
import formsJs from "./forms.js" with { type: "text" };
import fieldsJs from "./fields.js" with { type: "text" };
import shellJs from "./shell.js" with { type: "text" };
import listsJs from "./lists.js" with { type: "text" };
import chartsJs from "./charts.js" with { type: "text" };
import snippetPanelJs from "./snippet_panel.js" with { type: "text" };
import kitJs from "./kit.js" with { type: "text" };
import seriesJs from "./series.js" with { type: "text" };
import runsJs from "./runs.js" with { type: "text" };
import runResultJs from "./run_result.js" with { type: "text" };
import runActionsJs from "./run_actions.js" with { type: "text" };
import analyseJs from "./analyse.js" with { type: "text" };
import uploadViewJs from "./upload/view.js" with { type: "text" };
import uploadSourceJs from "./upload/source.js" with { type: "text" };
import uploadColumnsJs from "./upload/columns.js" with { type: "text" };
import uploadRequestJs from "./upload/request.js" with { type: "text" };
import uploadOutcomeJs from "./upload/outcome.js" with { type: "text" };
import uploadExcerptJs from "./upload/excerpt.js" with { type: "text" };
import icon from "./icon.svg" with { type: "text" };

/** Content Security Policy of the page: only this origin; inline styles for chart SVGs. */
export const UI_CSP = [
  "default-src 'self'",
  "script-src 'self'",
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data:",
  "connect-src 'self'",
  "object-src 'none'",
  "base-uri 'none'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join("; ");

interface Asset {
  path: string;
  type: string;
  body: string;
}

/** The page's ES modules, served as `/ui/<path>` (no build step: the browser imports them). */
function scripts(bodies: Record<string, string>): Asset[] {
  return Object.entries(bodies).map(([path, body]) => ({
    path: `/ui/${path}`,
    type: "text/javascript; charset=utf-8",
    body,
  }));
}

/** Every asset of the page, by path. */
export const UI_ASSETS: readonly Asset[] = [
  { path: "/", type: "text/html; charset=utf-8", body: html },
  { path: "/ui/page.css", type: "text/css; charset=utf-8", body: css },
  ...scripts({
    "page.js": pageJs,
    "snippets.js": snippetsJs,
    "dom.js": domJs,
    "service.js": serviceJs,
    "forms.js": formsJs,
    "fields.js": fieldsJs,
    "shell.js": shellJs,
    "lists.js": listsJs,
    "charts.js": chartsJs,
    "snippet_panel.js": snippetPanelJs,
    "kit.js": kitJs,
    "series.js": seriesJs,
    "runs.js": runsJs,
    "run_result.js": runResultJs,
    "run_actions.js": runActionsJs,
    "analyse.js": analyseJs,
    "upload/view.js": uploadViewJs,
    "upload/source.js": uploadSourceJs,
    "upload/columns.js": uploadColumnsJs,
    "upload/request.js": uploadRequestJs,
    "upload/outcome.js": uploadOutcomeJs,
    "upload/excerpt.js": uploadExcerptJs,
  }),
  { path: "/ui/icon.svg", type: "image/svg+xml", body: icon },
];

async function etagOf(body: string): Promise<string> {
  const digest = await crypto.subtle.digest("SHA-256", new TextEncoder().encode(body));
  const hex = Array.from(
    new Uint8Array(digest).slice(0, 12),
    (b) => b.toString(16).padStart(2, "0"),
  )
    .join("");
  return `"ui-${hex}"`;
}

/** Serve `/` and `/ui/*`; revalidated by ETag so a new version of the service shows at once. */
export function registerUiRoutes(app: App): void {
  for (const asset of UI_ASSETS) {
    const etag = etagOf(asset.body);
    app.get(asset.path, async (c) => {
      const tag = await etag;
      const headers: Record<string, string> = {
        "Content-Type": asset.type,
        "Cache-Control": "no-cache",
        ETag: tag,
        "X-Content-Type-Options": "nosniff",
      };
      if (asset.path === "/") {
        headers["Content-Security-Policy"] = UI_CSP;
        headers["Referrer-Policy"] = "no-referrer";
      }
      const inm = c.req.header("if-none-match");
      if (inm && inm.split(",").map((t) => t.trim()).includes(tag)) {
        return new Response(null, { status: 304, headers });
      }
      return c.body(asset.body, 200, headers);
    });
  }
}
