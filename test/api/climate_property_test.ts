/**
 * Property tests: random (often nonsensical) requests to the solar–climate endpoints get a
 * result or an RFC 9457 problem, never a 500, and a failed request stores no run.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { makeTestApp, monthlySeries } from "./helpers.ts";

const series = (
  name: string,
  quantity: string,
  units: string,
  n: number,
  f: (i: number) => number,
) => monthlySeries(name, quantity, units, 1950, n, f);

Deno.test("solar–climate endpoints: random requests never give a 500", async () => {
  const svc = await makeTestApp();
  try {
    const solar = series(
      "s",
      "tsi",
      "W m-2",
      240,
      (i) => 1361 + Math.sin(i / 21) + 0.1 * Math.cos(i * 2.7),
    );
    const climate = series(
      "c",
      "temperature_anomaly",
      "K",
      200,
      (i) => Math.sin((i - 5) / 21) + 0.2 * Math.sin(i * 1.3),
    );
    const flat = series("f", "temperature_anomaly", "K", 200, () => 1);
    const short = series("t", "temperature_anomaly", "K", 12, (i) => i % 3);
    const forcing = series("F", "radiative_forcing", "W m-2", 240, (i) => 0.1 * Math.sin(i / 21));
    const pick = fc.constantFrom(solar, climate, flat, short);
    const int = fc.integer({ min: -100, max: 100 });
    const bodies = fc.oneof(
      fc.record({
        path: fc.constant("/v1/lag-correlations"),
        body: fc.record({
          solar: pick,
          climate: pick,
          min_lag: fc.option(int, { nil: undefined }),
          max_lag: fc.option(fc.integer({ min: 0, max: 100 }), { nil: undefined }),
          normalisation: fc.oneof({ weight: 9, arbitrary: fc.constantFrom("overlap", "full") }, {
            weight: 1,
            arbitrary: fc.constant("bogus"),
          }),
          preprocess: fc.constantFrom("mean", "linear", "quadratic", "high_pass"),
          high_pass_cutoff_years: fc.option(fc.double({ min: -1, max: 200, noNaN: true }), {
            nil: undefined,
          }),
          significance: fc.constantFrom("phase", "ar1", "none"),
          surrogates: fc.integer({ min: 90, max: 150 }),
          resolution: fc.constantFrom(undefined, "monthly", "annual"),
        }, { requiredKeys: ["solar", "climate"] }),
      }),
      fc.record({
        path: fc.constant("/v1/attributions"),
        body: fc.record({
          climate: pick,
          regressors: fc.array(
            fc.record({
              name: fc.oneof({ weight: 9, arbitrary: fc.constantFrom("solar", "enso", "x") }, {
                weight: 1,
                arbitrary: fc.constant("Bad Name"),
              }),
              role: fc.constantFrom("solar", "other"),
              series: pick,
              min_lag: fc.integer({ min: 0, max: 30 }),
              max_lag: fc.integer({ min: 0, max: 90 }),
            }),
            { maxLength: 4 },
          ),
          errors: fc.constantFrom("ar1", "ols_hac"),
          hac_lags: fc.option(fc.integer({ min: 0, max: 500 }), { nil: undefined }),
          trend: fc.boolean(),
        }),
      }),
      fc.record({
        path: fc.constant("/v1/composites"),
        body: fc.record({
          series: pick,
          epoch_dates: fc.array(
            fc.oneof(
              fc.constantFrom("1955", "1960-02", "19xx", "1900"),
              fc.double({ min: 1900, max: 2000, noNaN: true }),
            ),
            { maxLength: 6 },
          ),
          before_years: fc.double({ min: 0, max: 30, noNaN: true }),
          after_years: fc.double({ min: 0, max: 30, noNaN: true }),
          baseline: fc.constantFrom("none", "pre_epoch"),
          preprocess: fc.constantFrom("none", "mean", "linear", "quadratic"),
          bootstrap: fc.constant(100),
          random_sets: fc.constant(100),
        }),
      }),
      fc.record({
        path: fc.constant("/v1/energy-balance"),
        body: fc.record({
          model: fc.constantFrom("one_box", "two_box"),
          forcing: fc.option(fc.constantFrom(forcing, forcing, solar, short), { nil: undefined }),
          sinusoid: fc.option(
            fc.record({
              period_years: fc.double({ min: 0.1, max: 50, noNaN: true }),
              years: fc.double({ min: 0.5, max: 30, noNaN: true }),
              steps_per_year: fc.integer({ min: 1, max: 50 }),
            }),
            { nil: undefined },
          ),
          feedback: fc.option(fc.double({ min: 0.01, max: 5, noNaN: true }), { nil: undefined }),
          exchange: fc.option(fc.double({ min: 0.01, max: 2, noNaN: true }), { nil: undefined }),
        }),
      }),
    );
    const statuses: Record<string, number> = {};
    await fc.assert(
      fc.asyncProperty(bodies, async ({ path, body }) => {
        const before = (await (await svc.get("/v1/runs?limit=1")).json()).total;
        const res = await svc.post(path, body);
        const out = await res.json();
        statuses[`${path} ${res.status}`] = (statuses[`${path} ${res.status}`] ?? 0) + 1;
        const what = `${path} → ${res.status}: ${JSON.stringify(out).slice(0, 300)}`;
        assert.ok([201, 202, 422].includes(res.status), what);
        if (res.status === 202) {
          // asynchronous: it ends succeeded, or failed with a 422 problem (never an internal error)
          await svc.runs.settle();
          const run = await (await svc.get(`/v1/runs/${out.id}`)).json();
          assert.ok(
            run.status === "succeeded" || (run.status === "failed" && run.error?.status === 422),
            `${path} async: ${run.status} ${JSON.stringify(run.error)}`,
          );
        }
        if (res.status === 422) {
          assert.match(res.headers.get("content-type") ?? "", /problem\+json/);
          const after = (await (await svc.get("/v1/runs?limit=1")).json()).total;
          assert.equal(after, before, "a refused request stores no run");
        }
      }),
      { numRuns: 1000, seed: 42 },
    );
    // the generators reach the computations, not only the schema checks
    for (
      const p of [
        "/v1/lag-correlations",
        "/v1/attributions",
        "/v1/composites",
        "/v1/energy-balance",
      ]
    ) {
      assert.ok(
        (statuses[`${p} 201`] ?? 0) + (statuses[`${p} 202`] ?? 0) > 0,
        `${p}: ${JSON.stringify(statuses)}`,
      );
    }
  } finally {
    await svc.close();
  }
});
