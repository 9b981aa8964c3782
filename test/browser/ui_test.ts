/**
 * The built-in page in a real browser: Debian's headless Chromium driven by playwright-core,
 * against the service on 127.0.0.1 with an in-memory store, the SYNTHETIC demo data and two
 * Web Workers. Screenshots of the main views go to test/output/screenshots/ (git-ignored).
 *
 * @module
 */
import assert from "node:assert/strict";
import { type BrowserContext, chromium, type Page } from "playwright-core";
import { startDemoService } from "./demo_service.ts";

const CHROMIUM = "/usr/bin/chromium";
const SHOTS = new URL("../output/screenshots/", import.meta.url);

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
      page.setDefaultTimeout(15_000);

      await t.step("the series list loads with every demo series", async () => {
        await page.goto(`${svc.url}/`);
        await page.waitForSelector("main table tbody tr");
        const rows = await page.locator("main table tbody tr").count();
        assert.equal(rows, svc.demoIds.length);
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
        "a bad upload shows the row and column of the problem and stores nothing",
        async () => {
          const before = (await (await fetch(`${svc.url}/v1/series?limit=1`)).json()).total;
          await page.goto(`${svc.url}/#/upload`);
          await page.fill("#up-text", BAD_CSV);
          await page.fill("#up-name", "Browser test bad upload");
          await page.selectOption("#up-quantity", "temperature_anomaly");
          await page.fill("#up-units", "K");
          await page.fill("#up-time", "date");
          await page.fill("#up-value", "anomaly");
          await page.click("#upload-form button[type=submit]");
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

      assert.deepEqual(errors, [], "no uncaught errors in the page");
    } finally {
      await ctx.close();
      await svc.close();
      await Deno.remove(dir, { recursive: true }).catch(() => {});
    }
  },
});
