import assert from "node:assert/strict";
import { demoFileEntries, loadDemo, readDemoSeries } from "../../api/demo.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { makeTestApp } from "./helpers.ts";

Deno.test("loadDemo() stores every demo series of the manifest and returns their ids", async (t) => {
  const store = await openStoreFromSpec("sqlite::memory:");
  try {
    const entries = await demoFileEntries();
    const ids = await loadDemo(store);
    assert.equal(ids.length, entries.length);
    assert.equal(new Set(ids).size, ids.length);
    const page = await store.listSeries({ limit: 100, offset: 0 });
    assert.equal(page.total, ids.length);

    await t.step("series carry the manifest's metadata and every row of their file", async () => {
      for (const [i, entry] of entries.entries()) {
        const s = (await store.getSeries(ids[i]))!;
        assert.equal(s.name, entry.upload.name);
        assert.equal(s.quantity, entry.upload.quantity);
        assert.equal(s.version, entry.upload.version);
        assert.match(s.name, /SYNTHETIC/);
        const text = await Deno.readTextFile(
          new URL(`../../fixtures/demo/${entry.file}`, import.meta.url),
        );
        const header = text.split("\n").find((l) => !l.startsWith("#"))!.split(",");
        const iv = header.indexOf(entry.value_column), it = header.indexOf("decimal_year");
        // every row with a value in the entry's column (a wide file has empty cells as gaps)
        const rows = text.split("\n").filter((l) => l !== "" && !l.startsWith("#")).slice(1)
          .filter((l) => l.split(",")[iv] !== "");
        assert.equal(s.n, rows.length, entry.file);
        // the file's own decimal_year column (6 decimals) agrees with the ingested time axis
        for (const k of [0, Math.floor(rows.length / 2), rows.length - 1]) {
          const cells = rows[k].split(",");
          assert.equal(s.value[k], Number(cells[iv]));
          assert.ok(Math.abs(s.time[k] - Number(cells[it])) < 5e-7);
        }
      }
    });

    await t.step(
      "sunspot numbers are version 2 with uncertainties; TSI daily has gaps",
      async () => {
        const ss = (await store.getSeries(ids[0]))!;
        assert.equal(ss.quantity, "sunspot_number");
        assert.equal(ss.version, "2");
        assert.equal(ss.resolution, "monthly");
        assert.ok(ss.uncertainty && ss.uncertainty.length === ss.n);
        const tsiIndex = entries.findIndex((e) => e.file === "tsi_daily.csv");
        const tsi = (await store.getSeries(ids[tsiIndex]))!;
        assert.equal(tsi.resolution, "daily");
        assert.ok(tsi.n < 17532 && tsi.n > 16000);
      },
    );

    await t.step("loading again changes nothing (content ids)", async () => {
      const again = await loadDemo(store);
      assert.deepEqual(again, ids);
      assert.equal((await store.listSeries({ limit: 100, offset: 0 })).total, ids.length);
    });
  } finally {
    await store.close();
  }
});

Deno.test("readDemoSeries() names the file and line when a demo file does not ingest", async () => {
  const dir = await Deno.makeTempDir();
  try {
    const src = new URL("../../fixtures/demo/", import.meta.url);
    for (const e of await demoFileEntries()) {
      await Deno.copyFile(new URL(e.file, src), `${dir}/${e.file}`);
    }
    await Deno.copyFile(new URL("manifest.json", src), `${dir}/manifest.json`);
    const file = `${dir}/sunspot_number_monthly.csv`;
    const lines = (await Deno.readTextFile(file)).split("\n");
    const k = lines.findIndex((l) => /^\d{4}-\d{2},/.test(l));
    lines[k] = lines[k].replace(/^([^,]+,[^,]+,)[^,]+/, "$1abc");
    await Deno.writeTextFile(file, lines.join("\n"));
    await assert.rejects(
      () => readDemoSeries(new URL(`file://${dir}/`)),
      new RegExp(`sunspot_number_monthly\\.csv: line ${k + 1}: .*abc`),
    );
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
  // the real files all ingest: one series per CSV entry (the spectral record is one per band)
  assert.equal((await readDemoSeries()).length, (await demoFileEntries()).length);
});

Deno.test("demo series get the same ids as the same files uploaded through POST /v1/series", async () => {
  const svc = await makeTestApp();
  try {
    const ids = await loadDemo(svc.store);
    const entries = await demoFileEntries();
    for (const [i, e] of entries.entries()) {
      const q = new URLSearchParams({
        name: e.upload.name,
        quantity: e.upload.quantity,
        units: e.upload.units,
        description: e.upload.description,
        source: e.upload.source,
        time: e.time_column,
        value: e.value_column,
        delimiter: "comma",
        time_format: "iso",
      });
      if (e.upload.version !== null) q.set("version", e.upload.version);
      if (e.uncertainty_column) q.set("uncertainty", e.uncertainty_column);
      const body = await Deno.readTextFile(
        new URL(`../../fixtures/demo/${e.file}`, import.meta.url),
      );
      const res = await svc.app.request(`/v1/series?${q}`, {
        method: "POST",
        headers: { "content-type": "text/csv" },
        body,
      });
      const answer = await res.json();
      assert.equal(res.status, 200, `${e.file}: ${JSON.stringify(answer)}`);
      assert.equal(answer.created, false);
      assert.equal(answer.series.id, ids[i], e.file);
    }
    const list = await (await svc.get("/v1/series?limit=100")).json();
    assert.equal(list.total, ids.length);
  } finally {
    await svc.close();
  }
});
