/**
 * The `sunspot_conversion` option (api/schemas/sunspot_conversion.ts): the published
 * time-dependent conversion between sunspot-number versions, and the warning when a constant
 * factor crosses a change of the V2/V1 ratio. Checked on R's sunspot.month (version 1) and in a
 * run request through a small kind that uses the option as an analysis would.
 */
import assert from "node:assert/strict";
import { z } from "@hono/zod-openapi";
import { createService } from "../../api/app.ts";
import { testConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { InThreadExecutor } from "../../api/runs/service.ts";
import { InputProblem, type RunKind } from "../../api/runs/kind.ts";
import { refId, SeriesRef } from "../../api/schemas/series_ref.ts";
import { applySunspotConversion, SunspotConversion } from "../../api/schemas/sunspot_conversion.ts";
import { sunspotVersionFactor } from "../../core/series/mod.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";
import { assertProblem } from "./helpers.ts";

// R 4.2.2 datasets::sunspot.month, version 1 (fixtures/datasets/PROVENANCE.md)
const R = loadDataset("sunspot_month");
const series = { time: Float64Array.from(R.time), value: Float64Array.from(R.value) };

Deno.test("SunspotConversion parses both forms; old requests stay constant factors", () => {
  assert.deepEqual(SunspotConversion.parse({ factor: 1.667 }), {
    method: "constant",
    factor: 1.667,
  });
  assert.deepEqual(SunspotConversion.parse({ method: "published" }), { method: "published" });
  assert.equal(SunspotConversion.safeParse({ method: "nearest" }).success, false);
  assert.equal(SunspotConversion.safeParse({ factor: -1 }).success, false);
});

Deno.test("applySunspotConversion(): published factors by time, with the drift caveat", () => {
  const c = applySunspotConversion(series, "1", "2", { method: "published" }, "/conv");
  // 1928-04 (cycle 16 maximum month) × 1/0.6; 1958-03 × 1/(0.6 × 1.177)
  for (const month of ["1928-04", "1958-03", "1860-02"]) {
    const k = R.date.indexOf(month);
    assert.equal(c.value[k], R.value[k] * sunspotVersionFactor(R.time[k], "1", "2"));
  }
  assert.match(c.label, /published time-dependent factors/);
  assert.match(
    c.label,
    /before 1849 ×1\.667, 1849–1867 ×1\.9, 1868–1946 ×1\.667, from 1947 ×1\.416/,
  );
  assert.equal(c.warnings.length, 1);
  assert.match(c.warnings[0], /after 1981/);
  // version 2 back to version 1 inverts it
  const back = applySunspotConversion(
    { time: series.time, value: c.value },
    "2",
    "1",
    { method: "published" },
    "/conv",
  );
  back.value.forEach((v, i) => assert.ok(Math.abs(v - R.value[i]) < 1e-9));
});

Deno.test("applySunspotConversion(): a constant factor across 1947 is warned about", async (t) => {
  await t.step("the whole record crosses 1849, 1868 and 1947", () => {
    const c = applySunspotConversion(
      series,
      "1",
      "2",
      { method: "constant", factor: 1 / 0.6 },
      "/c",
    );
    assert.equal(c.value[0], R.value[0] / 0.6);
    assert.equal(c.label, `sunspot version 1 × ${1 / 0.6} → version 2`);
    assert.equal(c.warnings.length, 3);
    // V2/V1 changes by 1.177 at 1947 (18 %) and by 1.14 at 1849 and 1868 (14 %)
    assert.match(
      c.warnings[2],
      /across 1947, where the ratio of version 2 to version 1 changes by about 18 %/,
    );
    assert.match(c.warnings[0], /across 1849.*14 %/);
  });
  await t.step("a series within 1950-2013 has no step to warn about", () => {
    const k = R.date.indexOf("1950-01");
    const part = { time: series.time.slice(k), value: series.value.slice(k) };
    const c = applySunspotConversion(part, "1", "2", { method: "constant", factor: 1.416 }, "/c");
    assert.deepEqual(c.warnings, []);
  });
  await t.step("gaps at the ends do not count as coverage", () => {
    const v = Float64Array.from(series.value);
    for (let i = 0; i < R.date.indexOf("1950-01"); i++) v[i] = NaN;
    const c = applySunspotConversion({ time: series.time, value: v }, "1", "2", {
      method: "constant",
      factor: 1.416,
    }, "/c");
    assert.deepEqual(c.warnings, []);
  });
  await t.step("the published method needs versions 1 and 2", () => {
    assert.throws(
      () => applySunspotConversion(series, "1", "group", { method: "published" }, "/c"),
      (e: unknown) => e instanceof InputProblem && e.pointer === "/c/method",
    );
  });
});

/** A small kind that puts a version 1 series on version 2 with the option, as analyses do. */
const toVersion2: RunKind = {
  kind: "test-version-2",
  path: "/v1/test-version-2",
  algorithmVersion: "1",
  tag: "Test",
  summary: "sunspot version 2",
  description: "converts a sunspot series to version 2",
  request: z.object({ sunspot_number: SeriesRef, sunspot_conversion: SunspotConversion }),
  result: z.object({ conversion: z.string(), warnings: z.array(z.string()), total: z.number() }),
  compute(p, ctx) {
    const s = ctx.series(refId(p.sunspot_number));
    const c = applySunspotConversion(
      s,
      s.version ?? "",
      "2",
      p.sunspot_conversion,
      "/sunspot_conversion",
    );
    return { conversion: c.label, warnings: c.warnings, total: c.value.reduce((a, b) => a + b) };
  },
};

Deno.test("a run request with sunspot_conversion: result, warnings and problems", async () => {
  const store = await openStoreFromSpec("sqlite::memory:");
  const svc = createService({
    store,
    config: testConfig(),
    executor: new InThreadExecutor(),
    kinds: [toVersion2],
  });
  const post = (body: unknown) =>
    svc.app.request("/v1/test-version-2", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify(body),
    });
  const spots = {
    name: "R sunspot.month",
    quantity: "sunspot_number",
    units: "1",
    version: "1",
    time: R.date,
    value: R.value,
  };
  try {
    const constant = await (await post({
      sunspot_number: spots,
      sunspot_conversion: { factor: 1 / 0.6 },
    })).json();
    assert.equal(constant.status, "succeeded");
    assert.ok(constant.result.warnings.some((w: string) => /across 1947/.test(w)));
    const published = await (await post({
      sunspot_number: spots,
      sunspot_conversion: { method: "published" },
    })).json();
    assert.deepEqual(published.result.warnings.length, 1);
    assert.ok(published.result.total < constant.result.total, "post-1947 values are lower");
    const bad = await assertProblem(
      await post({
        sunspot_number: { ...spots, version: "x" },
        sunspot_conversion: { method: "published" },
      }),
      422,
    );
    assert.equal(bad.errors[0].pointer, "/sunspot_conversion/method");
  } finally {
    await svc.runs.settle();
    await store.close();
  }
});
