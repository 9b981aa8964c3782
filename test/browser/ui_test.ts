/// <reference lib="dom" />
/**
 * The built-in page in a real browser: Debian's headless Chromium driven by playwright-core,
 * against the service on 127.0.0.1 with an in-memory store, the SYNTHETIC demo data and two
 * Web Workers. Screenshots of the main views go to test/output/screenshots/ (git-ignored).
 *
 * @module
 */
import assert from "node:assert/strict";
import { Buffer } from "node:buffer";
import { type BrowserContext, chromium, type Page } from "playwright-core";
import { startDemoService } from "./demo_service.ts";

const CHROMIUM = "/usr/bin/chromium";
/** Longest wait for one analysis run, ms (runs take a few seconds on an idle machine). */
const RUN_TIMEOUT_MS = 60_000;
const SHOTS = new URL("../output/screenshots/", import.meta.url);

if (!chromiumPresent() && !Deno.env.get("CI")) {
  console.warn(
    `ui_test: skipped, Chromium is not installed at ${CHROMIUM} ` +
      '(install it with "apt-get install -y chromium"; .ci/run does, and fails without it)',
  );
}

function chromiumPresent(): boolean {
  try {
    return Deno.statSync(CHROMIUM).isFile;
  } catch {
    return false;
  }
}

async function launch(): Promise<{ ctx: BrowserContext; dir: string }> {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-chromium-" });
  // playwright-core never downloads a browser; it drives the Debian one by path.
  const ctx = await chromium.launchPersistentContext(dir, {
    executablePath: CHROMIUM,
    headless: true,
    args: [
      "--headless",
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
    viewport: { width: 1280, height: 900 },
  });
  return { ctx, dir };
}

/** Open the form's "More options" (idempotent, unlike a click on its summary). */
async function openMoreOptions(page: Page) {
  await page.evaluate(() => {
    for (const d of document.querySelectorAll("#analysis-form details")) d.setAttribute("open", "");
  });
}

async function shot(page: Page, name: string) {
  await Deno.mkdir(SHOTS, { recursive: true });
  await page.screenshot({ path: new URL(`${name}.png`, SHOTS).pathname, fullPage: true });
}

const GOOD_CSV = [
  "# test upload: a short monthly record",
  "date,anomaly,sigma",
  "2001-01,0.12,0.05",
  "2001-02,0.18,0.05",
  "2001-03,-0.04,0.05",
  "2001-04,0.09,0.05",
  "",
].join("\n");

const BAD_CSV = [
  "date,anomaly",
  "2001-01,0.12",
  "2001-02,0.18",
  "2001-03,warm",
  "2001-04,0.09",
  "",
].join("\n");

Deno.test({
  name:
    "built-in page works in headless Chromium: lists, chart, uploads, a run with progress, replay",
  // On a developer machine without Chromium the test is skipped with a warning; in CI
  // (CI=true, where .ci/run installs Chromium) a missing browser is a failure.
  ignore: !chromiumPresent() && !Deno.env.get("CI"),
  // playwright keeps its pipe to the browser and timers of its own between steps; the test
  // closes the browser, the server, the workers and the store itself in `finally`.
  sanitizeOps: false,
  sanitizeResources: false,
  fn: async (t) => {
    if (!chromiumPresent()) {
      throw new Error(
        `Chromium is not installed at ${CHROMIUM}; install it with "apt-get install -y chromium" ` +
          "(.ci/run does this when it is missing). The browser tests cannot run without it.",
      );
    }
    const svc = await startDemoService();
    const { ctx, dir } = await launch();
    const errors: string[] = [];
    try {
      const page = await ctx.newPage();
      page.on("pageerror", (e) => errors.push(e.message));
      // Console errors other than the browser's note on 4xx answers the tests ask for (bad
      // uploads, bad parameters): e.g. a Content-Security-Policy violation.
      page.on("console", (m) => {
        if (m.type() === "error" && !/Failed to load resource/.test(m.text())) {
          errors.push(m.text());
        }
      });
      page.setDefaultTimeout(15_000);

      await t.step("the series list loads with every demo series", async () => {
        await page.goto(`${svc.url}/`);
        await page.waitForSelector("main table tbody tr");
        const rows = await page.locator("main table tbody tr").count();
        // the first page: 20 rows of the demo's series (its 32 spectral bands come last)
        assert.equal(rows, Math.min(svc.demoIds.length, 20));
        assert.match(
          await page.locator("main").innerText(),
          /SYNTHETIC Quorvanne monthly sunspot number/,
        );
        assert.match(
          await page.locator("#snippet-curl").innerText(),
          /curl -sS .*\/v1\/series\?limit=20/,
        );
        assert.match(
          await page.locator("#snippet-python").textContent() ?? "",
          /requests\.get\(f"\{BASE\}\/v1\/series"/,
        );
        await shot(page, "series-list");
      });

      await t.step("a series chart renders as an inline SVG with a size", async () => {
        await page.getByRole("link", { name: /monthly sunspot number/ }).click();
        const svg = page.locator("figure.chart svg");
        await svg.waitFor();
        const box = await svg.boundingBox();
        assert.ok(box && box.width > 300 && box.height > 150, JSON.stringify(box));
        assert.ok(await page.locator("figure.chart svg title").count() >= 1);
        assert.match(await page.locator("main").innerText(), /First 12 of 3912 points/);
        await shot(page, "series-view");
      });

      await t.step("a good CSV upload appears in the list", async () => {
        await page.goto(`${svc.url}/#/upload`);
        await page.fill("#up-text", GOOD_CSV);
        await page.fill("#up-name", "Browser test anomaly");
        await page.selectOption("#up-quantity", "temperature_anomaly");
        await page.fill("#up-units", "K");
        await page.fill("#up-time", "date");
        await page.fill("#up-value", "anomaly");
        await page.fill("#up-uncertainty", "sigma");
        assert.match(await page.locator("#snippet-curl").innerText(), /--data-binary @series\.csv/);
        await page.click("#upload-form button[type=submit]");
        await page.waitForSelector("#uploaded-link");
        assert.match(await page.locator("#upload-status").innerText(), /Stored as a new series/);
        await page.click("text=See all series");
        await page.waitForSelector("main table");
        assert.match(await page.locator("main table").innerText(), /Browser test anomaly/);
      });

      await t.step(
        "a JSON upload with a missing-value sentinel is stored with its gap",
        async () => {
          await page.goto(`${svc.url}/#/upload`);
          await page.check("#fmt-json");
          await page.fill(
            "#up-text",
            JSON.stringify({
              name: "Browser test JSON index",
              quantity: "enso_index",
              units: "1",
              time: ["2001-01", "2001-02", "2001-03", "2001-04"],
              value: [0.3, -999, 0.1, 0.2],
            }),
          );
          await page.fill("#up-json-missing", "-999");
          assert.match(
            await page.locator("#snippet-python").textContent() ?? "",
            /"missing": \[-999\]/,
          );
          await page.click("#upload-form button[type=submit]");
          await page.waitForSelector("#uploaded-link");
          assert.match(await page.locator("#upload-status").innerText(), /3 points .*missing 1/s);
        },
      );

      await t.step("the lists page through their items", async () => {
        await page.goto(`${svc.url}/#/series?limit=3`);
        await page.waitForSelector("main .pager");
        const total = (await (await fetch(`${svc.url}/v1/series?limit=1`)).json()).total;
        assert.equal(await page.locator("main .pager span").innerText(), `1–3 of ${total}`);
        const firstPage = await page.locator("main table tbody").innerText();
        await page.click("main .pager a[rel=next]");
        await page.waitForFunction(() =>
          document.querySelector("main .pager span")?.textContent?.startsWith("4–6")
        );
        assert.notEqual(await page.locator("main table tbody").innerText(), firstPage);
        await page.click("main .pager a[rel=prev]");
        await page.waitForFunction(() =>
          document.querySelector("main .pager span")?.textContent?.startsWith("1–3")
        );
      });

      await t.step(
        "a bad upload shows the row and column of the problem and stores nothing",
        async () => {
          const before = (await (await fetch(`${svc.url}/v1/series?limit=1`)).json()).total;
          await page.goto(`${svc.url}/#/upload`);
          // This one comes from a file, as most uploads do.
          await page.setInputFiles("#up-file", {
            name: "station-record.csv",
            mimeType: "text/csv",
            buffer: Buffer.from(BAD_CSV, "utf-8"),
          });
          await page.fill("#up-name", "Browser test bad upload");
          await page.selectOption("#up-quantity", "temperature_anomaly");
          await page.fill("#up-units", "K");
          await page.fill("#up-time", "date");
          await page.fill("#up-value", "anomaly");
          await page.click("#upload-form button[type=submit]");
          assert.match(
            await page.locator("#snippet-curl").innerText(),
            /--data-binary @station-record\.csv/,
          );
          await page.waitForSelector("#problem-place");
          const place = await page.locator("#problem-place").innerText();
          assert.match(place, /row 4, column anomaly/);
          assert.equal(await page.locator("#problem-place .line.bad mark").innerText(), "warm");
          const table = await page.locator("#upload-status table").innerText();
          assert.match(table, /Row\s+Column/);
          assert.match(table, /4\s+anomaly/);
          await shot(page, "upload-problem");
          const after = (await (await fetch(`${svc.url}/v1/series?limit=1`)).json()).total;
          assert.equal(after, before);
        },
      );

      const demoId = async (name: RegExp) => {
        const page = await (await fetch(`${svc.url}/v1/series?limit=100`)).json();
        const s = page.items.find((x: { id: string; name: string }) =>
          svc.demoIds.includes(x.id) && name.test(x.name)
        );
        assert.ok(s, `no demo series matches ${name}`);
        return s.id as string;
      };
      // Seconds per surrogate on this machine, measured by the first run step; the count is
      // capped so that a noisy measurement on a loaded machine cannot ask for a huge run.
      let perSurrogate = 0.005, fixedSeconds = 0;
      const surrogatesFor = (seconds: number) =>
        Math.max(
          200,
          Math.min(4000, Math.round((seconds - fixedSeconds) / perSurrogate / 100) * 100),
        );
      const solar = await demoId(/monthly sunspot number/);
      const climate = await demoId(/monthly temperature anomaly/);

      await t.step("a bad analysis parameter is shown on its own field", async () => {
        await page.goto(`${svc.url}/#/analyse?kind=/v1/lag-correlations`);
        await page.waitForSelector("#analysis-form");
        await openMoreOptions(page);
        await page.fill("#f_surrogates", "5");
        await page.click("#analysis-form button[type=submit]");
        await page.waitForSelector("#f_surrogates[aria-invalid=true]");
        assert.match(
          await page.locator("[data-pointer='/surrogates'] .field-error").innerText(),
          /100/,
        );
        assert.match(await page.locator("#submit-status").innerText(), /not started/);
        await shot(page, "analyse-problem");
      });

      await t.step(
        "the Analyse form shows its required inputs; its defaults run, a refused run is not stored",
        async () => {
          const runsTotal = async () =>
            (await (await fetch(`${svc.url}/v1/runs?limit=1`)).json()).total as number;
          // the main analyses are offered first
          await page.goto(`${svc.url}/#/analyse`);
          await page.waitForSelector("#analysis-form");
          const main = await page.locator("#analysis optgroup[label='Main analyses'] option")
            .allInnerTexts();
          assert.equal(main.length, 3, JSON.stringify(main));
          await page.goto(`${svc.url}/#/analyse?kind=/v1/lag-correlations`);
          // a hash change: the previous form stays until the new one is drawn, so wait for
          // the lag-correlation form's own solar input
          await page.waitForSelector("#analysis-form #f_solar");
          // the solar input (one of solar, solar_run) is visible, not under "More options",
          // and a fitting series is chosen
          const shown = page.locator("#analysis-form > .grid #f_solar");
          assert.equal(await shown.count(), 1);
          assert.ok(await shown.isVisible());
          assert.equal(await page.inputValue("#f_solar"), solar);
          assert.ok(await page.locator("#analysis-form > .grid #f_solar_run").isVisible());
          // refused for its input (no solar series at all): the field says why, nothing stored
          const before = await runsTotal();
          await page.selectOption("#f_solar", "");
          await page.click("#analysis-form button[type=submit]");
          await page.waitForSelector("#f_solar[aria-invalid=true]");
          assert.match(
            await page.locator("[data-pointer='/solar'] .field-error").innerText(),
            /exactly one of solar/,
          );
          assert.equal(await runsTotal(), before);
          // with the form's defaults the run succeeds
          await page.goto(`${svc.url}/#/analyse?kind=/v1/lag-correlations&d=1`);
          // the new form, with its defaults (the old one had "(none)" chosen)
          await page.waitForFunction(() =>
            (document.querySelector("#f_solar") as HTMLSelectElement | null)?.value !== "" &&
            document.querySelector("#submit-status")?.textContent === ""
          );
          await page.click("#analysis-form button[type=submit]");
          await page.waitForSelector("main [data-status=succeeded]", { timeout: RUN_TIMEOUT_MS });
          assert.equal(await runsTotal(), before + 1);
          const failed = await (await fetch(`${svc.url}/v1/runs?status=failed&limit=1`)).json();
          assert.equal(failed.total, 0);
        },
      );

      await t.step(
        "a lag-correlation run from the form reaches succeeded while its progress bar moves",
        async () => {
          // Size the run to last a few seconds on this machine, whatever its speed: after a
          // warm-up run (workers load their code), time two small synchronous runs and take the
          // cost per surrogate from their difference.
          const probe = async (surrogates: number) => {
            const t0 = performance.now();
            const res = await fetch(`${svc.url}/v1/lag-correlations`, {
              // A run that never ends (e.g. workers that failed to start) fails the test.
              signal: AbortSignal.timeout(RUN_TIMEOUT_MS),
              method: "POST",
              headers: { "content-type": "application/json" },
              body: JSON.stringify({ solar, climate, surrogates, seed: surrogates }),
            });
            assert.equal(res.status, 201, await res.text());
            return (performance.now() - t0) / 1000;
          };
          await probe(100);
          const small = await probe(100);
          const large = await probe(600);
          fixedSeconds = small;
          perSurrogate = Math.max(1e-6, (large - small) / 500);
          const surrogates = surrogatesFor(3);

          await page.goto(`${svc.url}/#/analyse?kind=/v1/lag-correlations`);
          // a hash change: the previous form stays until the new one is drawn, so wait for
          // the lag-correlation form's own solar input
          await page.waitForSelector("#analysis-form #f_solar");
          await page.selectOption("#f_solar", solar);
          await page.selectOption("#f_climate", climate);
          await openMoreOptions(page);
          await page.fill("#f_surrogates", String(surrogates));
          assert.match(
            await page.locator("#snippet-curl").innerText(),
            new RegExp(`"surrogates": ${surrogates}`),
          );
          await shot(page, "analyse-form");
          // Record every value the progress bar shows, from the moment it exists.
          await page.evaluate(() => {
            const w = globalThis as unknown as { seen: number[] };
            w.seen = [];
            new MutationObserver(() => {
              const bar = document.querySelector("#run-progress") as HTMLProgressElement | null;
              if (bar && w.seen[w.seen.length - 1] !== bar.value) w.seen.push(bar.value);
            }).observe(document.body, { subtree: true, childList: true, attributes: true });
          });
          await page.click("#analysis-form button[type=submit]");
          await page.waitForSelector("#run-progress");
          await shot(page, "run-progress");
          await page.waitForSelector("main [data-status=succeeded]", { timeout: RUN_TIMEOUT_MS });
          const seen = await page.evaluate(() =>
            (globalThis as unknown as { seen: number[] }).seen
          );
          assert.ok(seen.length >= 2, `progress values seen: ${JSON.stringify(seen)}`);
          assert.ok(
            seen.some((v) => v > 0 && v < 1),
            `progress values seen: ${JSON.stringify(seen)}`,
          );
          for (let i = 1; i < seen.length; i++) {
            assert.ok(seen[i] >= seen[i - 1], JSON.stringify(seen));
          }
          await page.locator("figure.chart svg").waitFor();
          assert.match(await page.locator("main").innerText(), /Cautions/);
          assert.match(await page.locator("#snippet-curl").innerText(), /\/replay/);
          await shot(page, "run-view");
        },
      );

      await t.step("replay of the run shows verified", async () => {
        await page.click("#replay");
        const verdict = page.locator("#replay-result [data-verified]");
        await verdict.waitFor({ timeout: RUN_TIMEOUT_MS });
        assert.equal(await verdict.getAttribute("data-verified"), "true");
        assert.match(await page.locator("#replay-result").innerText(), /Verified/);
        await shot(page, "run-replayed");
      });

      await t.step("a cancel from the run view stops a long run", async () => {
        const res = await fetch(`${svc.url}/v1/lag-correlations`, {
          signal: AbortSignal.timeout(RUN_TIMEOUT_MS),
          method: "POST",
          headers: { "content-type": "application/json", prefer: "respond-async" },
          body: JSON.stringify({ solar, climate, surrogates: surrogatesFor(2) }),
        });
        assert.equal(res.status, 202);
        const run = await res.json();
        await page.goto(`${svc.url}/#/runs/${run.id}`);
        await page.click("#cancel");
        await page.waitForSelector("main [data-status=cancelled]");
        assert.match(await page.locator("main").innerText(), /The run was cancelled/);
      });

      await t.step(
        "a model calibrated from the form feeds a reconstruction whose proxies it fills",
        async () => {
          await page.goto(`${svc.url}/#/analyse?kind=/v1/irradiance/models`);
          await page.waitForSelector("#analysis-form");
          await page.selectOption("#f_tsi", await demoId(/daily measured TSI/));
          await page.fill("#f_terms_0_name", "mg_ii");
          await page.selectOption("#f_terms_0_series", await demoId(/daily facular index/));
          await page.selectOption("#f_terms_0_role", "facular");
          await openMoreOptions(page);
          await page.selectOption("#f_sunspot_number", solar);
          await page.click("#analysis-form button[type=submit]");
          await page.waitForSelector("main [data-status=succeeded]", { timeout: RUN_TIMEOUT_MS });
          const modelRun = new URL(page.url()).hash.split("/")[2];

          await page.goto(`${svc.url}/#/analyse?kind=/v1/irradiance/reconstructions`);
          await page.waitForSelector("#analysis-form");
          assert.equal(await page.inputValue("#f_model"), modelRun);
          // The proxy rows come from the model's own terms.
          await page.waitForFunction(() =>
            (document.querySelector("#f_proxies_0_term") as HTMLInputElement | null)?.value ===
              "mg_ii"
          );
          await page.fill("#f_period_start", "1900");
          await page.fill("#f_period_end", "2020");
          await page.click("#analysis-form button[type=submit]");
          await page.waitForSelector("main [data-status=succeeded]", { timeout: RUN_TIMEOUT_MS });
          await page.locator("figure.chart svg").waitFor();
          assert.match(await page.locator("main").innerText(), /satellite era/);
          assert.match(await page.locator("main").innerText(), /All \d+ rows as CSV/);
          await shot(page, "reconstruction-run");
        },
      );

      await t.step("a cycle table from the form shows its first rows", async () => {
        await page.goto(`${svc.url}/#/analyse?kind=/v1/cycles`);
        await page.waitForSelector("#analysis-form");
        await page.selectOption("#f_series", solar);
        await page.click("#analysis-form button[type=submit]");
        await page.waitForSelector("main [data-status=succeeded]", { timeout: RUN_TIMEOUT_MS });
        await page.waitForSelector("main .result-table table");
        await page.locator("figure.chart svg").waitFor();
        await shot(page, "cycles-run");
        // An output saved as a stored series keeps its lineage and the run's cautions.
        await page.locator("main .output button", { hasText: "Save as a stored series" }).first()
          .click();
        await page.click("text=Open the stored series");
        // the run view had a heading and a chart too: wait for the series view itself
        await page.waitForFunction(() => location.hash.startsWith("#/series/"));
        await page.waitForFunction(() =>
          (document.querySelector("main")?.textContent ?? "").includes("Derived from run")
        );
        await page.waitForSelector("main h1");
        await page.locator("figure.chart svg").waitFor();
        const text = await page.locator("main").innerText();
        assert.match(text, /Derived from run/);
        assert.match(text, /Cautions of the run that produced it/);
        await shot(page, "derived-series");
      });

      await t.step("the runs list shows the run, newest first, with its digest", async () => {
        await page.click("nav >> text=Runs");
        await page.waitForSelector("main h1:text-is('Runs')");
        await page.waitForSelector("main table tbody tr");
        const first = await page.locator("main table tbody tr").first().innerText();
        assert.match(first, /Cycles\s+succeeded/);
        assert.match(first, /[0-9a-f]{12}…/);
        await shot(page, "runs-list");
      });

      await t.step("phone width and dark theme: no sideways scrolling, readable", async () => {
        await page.setViewportSize({ width: 390, height: 844 });
        await page.emulateMedia({ colorScheme: "dark" });
        const views = [
          ["#/series", "phone-dark-series", "main table"],
          ["#/upload", "phone-dark-upload", "#upload-form"],
          ["#/analyse", "phone-dark-analyse", "#analysis-form"],
          ["#/runs", "phone-dark-runs", "main table"],
        ];
        for (const [hash, name, ready] of views) {
          await page.goto(`${svc.url}/${hash}`);
          await page.waitForSelector(ready);
          const overflow = await page.evaluate(() =>
            document.documentElement.scrollWidth - document.documentElement.clientWidth
          );
          assert.ok(overflow <= 1, `${hash} scrolls sideways by ${overflow}px at 390px`);
          const bg = await page.evaluate(() =>
            getComputedStyle(document.documentElement).backgroundColor
          );
          assert.equal(bg, "rgb(17, 21, 28)");
          await shot(page, name);
        }
        await page.click("main table tbody tr a");
        await page.locator("figure.chart svg").waitFor();
        await shot(page, "phone-dark-run-view");
      });

      await t.step("the theme switch redraws charts dark and is remembered", async () => {
        await page.setViewportSize({ width: 1280, height: 900 });
        await page.emulateMedia({ colorScheme: "light" });
        await page.goto(`${svc.url}/#/series/${solar}`);
        await page.locator("figure.chart svg").waitFor();
        assert.equal(await page.locator("#theme").innerText(), "Theme: auto");
        await page.click("#theme"); // auto → light
        const darkChart = page.waitForRequest(/chart\.svg\?.*theme=dark/);
        await page.click("#theme"); // light → dark
        await darkChart;
        assert.equal(await page.getAttribute("html", "data-theme"), "dark");
        await page.reload();
        await page.locator("figure.chart svg").waitFor();
        assert.equal(await page.getAttribute("html", "data-theme"), "dark");
        await shot(page, "series-view-dark");
        await page.click("#theme"); // dark → auto
        assert.equal(await page.getAttribute("html", "data-theme"), null);
      });

      await t.step("every control is reachable from the keyboard", async () => {
        await page.setViewportSize({ width: 1280, height: 900 });
        await page.goto(`${svc.url}/#/series`);
        await page.reload();
        await page.waitForSelector("main table");
        const reached = new Set<string>();
        for (let i = 0; i < 12; i++) {
          await page.keyboard.press("Tab");
          reached.add(await page.evaluate(() => document.activeElement?.textContent?.trim() ?? ""));
        }
        for (const label of ["Series", "Runs", "Upload", "Analyse"]) {
          assert.ok(reached.has(label), label);
        }
        // The snippet tabs follow the WAI-ARIA tabs pattern: arrows move between them.
        await page.focus("#tab-curl");
        await page.keyboard.press("ArrowRight");
        assert.equal(await page.evaluate(() => document.activeElement?.id), "tab-python");
        assert.ok(await page.locator("#snippet-python").isVisible());
        assert.ok(!(await page.locator("#snippet-curl").isVisible()));
        await page.keyboard.press("Home");
        assert.ok(await page.locator("#snippet-curl").isVisible());
        // Enter on a focused link navigates, and focus moves to the new view's content.
        await page.focus("[data-nav=upload]");
        await page.keyboard.press("Enter");
        await page.waitForSelector("#upload-form");
        assert.equal(await page.evaluate(() => document.activeElement?.id), "view");
      });

      assert.deepEqual(errors, [], "no uncaught errors in the page");
    } finally {
      await ctx.close();
      // close() waits for background runs; do not let one that never ends hang the suite.
      let timer: ReturnType<typeof setTimeout> | undefined;
      await Promise.race([
        svc.close(),
        new Promise((resolve) => (timer = setTimeout(resolve, RUN_TIMEOUT_MS))),
      ]);
      clearTimeout(timer);
      await Deno.remove(dir, { recursive: true }).catch(() => {});
    }
  },
});
