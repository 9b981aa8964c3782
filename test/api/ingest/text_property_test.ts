import assert from "node:assert/strict";
import fc from "fast-check";
import { type IngestResult, ingestText } from "../../../api/ingest/mod.ts";

const META = { name: "Property table", quantity: "other", units: "1" } as const;

/** Invariants every outcome must satisfy: a whole, consistent series, or errors only. */
function checkOutcome(r: IngestResult) {
  if (r.ok) {
    const { series: s, report } = r;
    assert.equal(s.time.length, report.kept);
    assert.equal(s.value.length, report.kept);
    if (s.uncertainty) assert.equal(s.uncertainty.length, report.kept);
    assert.equal(report.kept + report.missing + report.aggregated, report.read);
    assert.ok(report.kept >= 2);
    for (let i = 0; i < s.time.length; i++) {
      assert.ok(Number.isFinite(s.time[i]) && Number.isFinite(s.value[i]));
      if (i > 0) assert.ok(s.time[i] > s.time[i - 1]);
    }
  } else {
    assert.ok(r.errors.length > 0);
    for (const e of r.errors) {
      assert.equal(typeof e.pointer, "string");
      assert.equal(typeof e.message, "string");
      assert.ok(e.message.length > 0);
    }
    assert.equal((r as { series?: unknown }).series, undefined);
  }
}

const DELIMS = [",", ";", "\t", " ", "  "] as const;
const SENTINELS = ["-999", "-1", "NA", "NaN", ""] as const;
const BAD_CELLS = [
  "abc",
  "Infinity",
  "-inf",
  "1e999",
  "--1",
  "0x1F",
  "1.2.3",
  "١٢",
  "TRUE",
] as const;

type Cell = { kind: "value"; v: number } | { kind: "missing"; s: string } | {
  kind: "bad";
  s: string;
};

const cell = fc.oneof(
  {
    weight: 8,
    arbitrary: fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e12, max: 1e12 }).map((
      v,
    ): Cell => ({ kind: "value", v })),
  },
  {
    weight: 2,
    arbitrary: fc.constantFrom(...SENTINELS).map((s): Cell => ({ kind: "missing", s })),
  },
  { weight: 1, arbitrary: fc.constantFrom(...BAD_CELLS).map((s): Cell => ({ kind: "bad", s })) },
);

const table = fc.record({
  delimiter: fc.constantFrom(...DELIMS),
  header: fc.boolean(),
  comments: fc.array(fc.nat(40), { maxLength: 3 }),
  startYear: fc.integer({ min: 1600, max: 2100 }),
  cells: fc.array(cell, { minLength: 0, maxLength: 40 }),
  extraSentinels: fc.subarray(["-999", "-1"]),
});

Deno.test("ingestText() property: random tables give a whole series or errors, never partial", () => {
  fc.assert(
    fc.property(table, (t) => {
      // whitespace tables cannot hold empty cells: use NA there
      const cells = t.cells.map((c) =>
        c.kind === "missing" && c.s === "" && t.delimiter.trim() === "" ? { ...c, s: "NA" } : c
      );
      const lines: string[] = [];
      if (t.header) lines.push(["time", "value"].join(t.delimiter));
      cells.forEach((c, i) => {
        if (t.comments.includes(i)) lines.push("# comment line, with; delimiters\t inside");
        const text = c.kind === "value" ? String(c.v) : c.s;
        lines.push([String(t.startYear + i), text].join(t.delimiter));
      });
      const r = ingestText(lines.join("\n"), {
        ...META,
        time: "0",
        value: "1",
        missing: [...t.extraSentinels],
      });
      checkOutcome(r);
      // the oracle: what a correct reader must conclude
      const isMissing = (c: Cell) =>
        c.kind === "missing" && (["NA", "NaN", ""].includes(c.s) || t.extraSentinels.includes(c.s));
      const asValue = cells.map((c) =>
        c.kind === "value" ? c.v : c.kind === "missing" && !isMissing(c) ? Number(c.s) : null
      );
      const anyBad = cells.some((c) => c.kind === "bad");
      const kept = asValue.map((v, i) => [i, v] as const).filter(([i, v]) =>
        v !== null && !isMissing(cells[i])
      );
      if (anyBad || kept.length < 2) {
        assert.equal(r.ok, false, "bad cells or too few points must give errors");
        if (anyBad && !r.ok && cells.length > 0) {
          assert.ok(
            r.errors.some((e) => e.column === (t.header ? "value" : 1)),
            JSON.stringify(r.errors),
          );
        }
      } else {
        assert.ok(r.ok, JSON.stringify(!r.ok && r.errors));
        if (r.ok) {
          assert.deepEqual(Array.from(r.series.time), kept.map(([i]) => t.startYear + i + 0.5));
          assert.deepEqual(Array.from(r.series.value), kept.map(([, v]) => (v === 0 ? 0 : v)));
          assert.equal(r.report.missing, cells.length - kept.length);
        }
      }
    }),
    { numRuns: 400, seed: 20240301 },
  );
});

Deno.test("ingestText() property: arbitrary bytes and strings never throw", () => {
  fc.assert(
    fc.property(
      fc.uint8Array({ maxLength: 300 }),
      (bytes) => checkOutcome(ingestText(bytes, META)),
    ),
    { numRuns: 400, seed: 7 },
  );
  fc.assert(
    fc.property(
      fc.string({ unit: "grapheme", maxLength: 300 }),
      fc.record({
        delimiter: fc.constantFrom("auto", "comma", "semicolon", "tab", "whitespace", "pipe"),
        duplicates: fc.constantFrom("reject", "mean"),
        time_format: fc.constantFrom("auto", "iso", "decimal_year"),
      }),
      (s, o) =>
        // deno-lint-ignore no-explicit-any
        checkOutcome(ingestText(s, { ...META, ...(o as any) })),
    ),
    { numRuns: 400, seed: 11 },
  );
});

Deno.test("ingestText() property: shuffled rows are rejected, or sorted and averaged when asked", () => {
  fc.assert(
    fc.property(
      fc.array(fc.integer({ min: 1900, max: 1930 }), { minLength: 2, maxLength: 30 }),
      (years) => {
        const text = "time,value\n" + years.map((y, i) => `${y},${i}`).join("\n");
        const increasing = years.every((y, i) => i === 0 || y > years[i - 1]);
        const strict = ingestText(text, META);
        checkOutcome(strict);
        assert.equal(strict.ok, increasing);
        const mean = ingestText(text, { ...META, duplicates: "mean" });
        checkOutcome(mean);
        const distinct = [...new Set(years)].sort((a, b) => a - b);
        if (distinct.length < 2) assert.equal(mean.ok, false);
        else {
          assert.ok(mean.ok);
          if (mean.ok) {
            assert.deepEqual(Array.from(mean.series.time), distinct.map((y) => y + 0.5));
            for (const [k, y] of distinct.entries()) {
              const idx = years.map((v, i) => (v === y ? i : -1)).filter((i) => i >= 0);
              const m = idx.reduce((a, b) => a + b, 0) / idx.length;
              assert.ok(Math.abs(mean.series.value[k] - m) < 1e-12);
            }
          }
        }
      },
    ),
    { numRuns: 300, seed: 3 },
  );
});
