import assert from "node:assert/strict";
import fc from "fast-check";
import { contentJson, type NormalisedSeries } from "../../../api/ingest/mod.ts";
import { contentJsonReference } from "../../../api/ingest/content_id.ts";
import { QUANTITIES } from "../../../core/series/quantities.ts";

Deno.test("contentJson() equals the general RFC 8785 canonicaliser byte for byte (property)", () => {
  const num = fc.double({ noNaN: true, noDefaultInfinity: true });
  const text = fc.option(fc.string({ unit: "grapheme", maxLength: 30 }), { nil: null });
  fc.assert(
    fc.property(
      fc.record({
        name: fc.string({ unit: "grapheme", minLength: 1, maxLength: 30 }),
        quantity: fc.constantFrom(...QUANTITIES),
        units: fc.string({ maxLength: 10 }),
        description: text,
        source: text,
        version: text,
        resolution: fc.constantFrom("daily", "monthly", "annual", "irregular"),
        time: fc.array(num, { maxLength: 20 }),
        value: fc.array(num, { maxLength: 20 }),
        uncertainty: fc.option(fc.array(num, { maxLength: 20 }), { nil: null }),
      }),
      (r) => {
        const s: NormalisedSeries = {
          ...r,
          time: Float64Array.from(r.time),
          value: Float64Array.from(r.value),
          uncertainty: r.uncertainty ? Float64Array.from(r.uncertainty) : null,
        } as NormalisedSeries;
        assert.equal(contentJson(s), contentJsonReference(s));
      },
    ),
    { numRuns: 500, seed: 8785 },
  );
});
