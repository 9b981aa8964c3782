/// <reference lib="dom" />
/**
 * The page on an instance that requires keys, in Debian's headless Chromium: it asks for a key,
 * keeps it for the tab (sessionStorage), sends it as `Authorization: Bearer`, and then shows the
 * owner's private series beside the public demo data; charts are fetched with the key.
 *
 * @module
 */
import assert from "node:assert/strict";
import { chromium } from "playwright-core";
import { startDemoService } from "./demo_service.ts";
import { monthlySeries } from "../api/helpers.ts";

const CHROMIUM = "/usr/bin/chromium";
const ADMIN = "browser-admin-key-0123456789abcdef0123456789";

function chromiumPresent(): boolean {
  try {
    return Deno.statSync(CHROMIUM).isFile;
  } catch {
    return false;
  }
}

Deno.test({
  name: "page: asks for a key when the instance requires one, then uses it",
  ignore: !chromiumPresent() && !Deno.env.get("CI"),
  sanitizeResources: false,
  sanitizeOps: false,
  async fn() {
    const svc = await startDemoService(0, { adminKey: ADMIN });
    const dir = await Deno.makeTempDir({ prefix: "sunlag-chromium-" });
    const ctx = await chromium.launchPersistentContext(dir, {
      executablePath: CHROMIUM,
      headless: true,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--no-first-run"],
    });
    try {
      const api = (path: string, body: unknown, key = ADMIN) =>
        fetch(svc.url + path, {
          method: "POST",
          headers: { "content-type": "application/json", Authorization: `Bearer ${key}` },
          body: JSON.stringify(body),
        }).then((r) => r.json());
      await api("/v1/admin/owners", { id: "observer1", name: "Observer One" });
      const { key } = await api("/v1/admin/owners/observer1/keys", { label: "browser" });
      const mine = await api(
        "/v1/series",
        monthlySeries(
          "Observer One's private station",
          "temperature_anomaly",
          "K",
          2000,
          24,
          (i) => i % 5,
        ),
        key,
      );
      const page = ctx.pages()[0] ?? await ctx.newPage();
      await page.goto(`${svc.url}/#/series`);
      const dialog = page.locator("#key-dialog");
      await dialog.waitFor({ state: "visible" });
      assert.match(await page.locator("#key-message").innerText(), /requires an API key/);
      // Without a key: the public demo series only.
      await page.locator("#key-cancel").click();
      await page.getByText("SYNTHETIC", { exact: false }).first().waitFor();
      assert.equal(await page.getByText("Observer One's private station").count(), 0);
      await page.locator("#key").click();
      await page.locator("#key-input").fill(key);
      await page.locator("#key-form button[type=submit]").click();
      await page.getByText("Observer One's private station").first().waitFor();
      assert.match(await page.locator("#key").innerText(), /observer1 \(writer\)/);
      assert.equal(await page.evaluate(() => sessionStorage.getItem("sunlag-key")), key);
      // The private series' chart is fetched with the key.
      await page.goto(`${svc.url}/#/series/${encodeURIComponent(mine.series.id)}`);
      await page.locator("figure.chart svg").first().waitFor({ timeout: 20_000 });
    } finally {
      await ctx.close();
      await Deno.remove(dir, { recursive: true }).catch(() => {});
      await svc.close();
    }
  },
});
