import assert from "node:assert/strict";
import fc from "fast-check";
import { ingestJson, type JsonSeriesInput } from "../../../api/ingest/mod.ts";

Deno.test("ingestJson() property: arbitrary bodies give a whole series or errors, never a throw", () => {
  const timeItem = fc.oneof(
    fc.integer({ min: 1600, max: 2100 }).map(String),
    fc.double({ min: -200000, max: 200000, noNaN: true }),
    fc.string({ maxLength: 12 }),
    fc.constant(null),
    fc.constant(Infinity),
  );
  const valueItem = fc.oneof(
    fc.double({ noNaN: false }),
    fc.constant(null),
    fc.string({ maxLength: 4 }),
  );
  fc.assert(
    fc.property(
      fc.record({
        name: fc.oneof(fc.string({ maxLength: 5 }), fc.constant("x")),
        quantity: fc.constantFrom("tsi", "other", "sunspot_number", "bogus"),
        units: fc.constantFrom("W m-2", "1", "K", ""),
        time: fc.array(timeItem, { maxLength: 12 }),
        value: fc.array(valueItem, { maxLength: 12 }),
        uncertainty: fc.option(fc.array(valueItem, { maxLength: 12 }), { nil: undefined }),
        missing: fc.option(fc.array(fc.double(), { maxLength: 3 }), { nil: undefined }),
        duplicates: fc.constantFrom("reject", "mean", "other"),
      }),
      (body) => {
        const r = ingestJson(body as unknown as JsonSeriesInput);
        if (r.ok) {
          const s = r.series;
          assert.ok(s.time.length >= 2 && s.time.length === s.value.length);
          for (let i = 0; i < s.time.length; i++) {
            assert.ok(Number.isFinite(s.time[i]) && Number.isFinite(s.value[i]));
            if (i > 0) assert.ok(s.time[i] > s.time[i - 1]);
          }
          assert.equal(r.report.kept + r.report.missing + r.report.aggregated, r.report.read);
        } else {
          assert.ok(r.errors.length > 0);
          for (const e of r.errors) {
            assert.ok(typeof e.pointer === "string" && e.message.length > 0);
          }
        }
      },
    ),
    { numRuns: 1000, seed: 99 },
  );
});
