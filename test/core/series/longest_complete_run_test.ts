import assert from "node:assert/strict";
import { longestCompleteRun } from "../../../core/series/longest_complete_run.ts";

Deno.test("longestCompleteRun() keeps the longest stretch where every series has a value", async (t) => {
  await t.step("no gaps: everything", () => {
    assert.deepEqual(longestCompleteRun([[1, 2, 3], [4, 5, 6]]), { start: 0, length: 3 });
  });
  await t.step("a gap in either series ends a run; the longest wins", () => {
    const a = [1, NaN, 3, 4, 5, 6, 7, 8];
    const b = [1, 2, 3, 4, NaN, 6, 7, 8];
    assert.deepEqual(longestCompleteRun([a, b]), { start: 5, length: 3 });
  });
  await t.step("ties go to the earliest run", () => {
    assert.deepEqual(longestCompleteRun([[1, 2, NaN, 3, 4]]), { start: 0, length: 2 });
  });
  await t.step("infinities are gaps too", () => {
    assert.deepEqual(longestCompleteRun([[Infinity, 1, 2]]), { start: 1, length: 2 });
  });
  await t.step("empty series, one point, nothing complete", () => {
    assert.deepEqual(longestCompleteRun([[]]), { start: 0, length: 0 });
    assert.deepEqual(longestCompleteRun([[5]]), { start: 0, length: 1 });
    assert.deepEqual(longestCompleteRun([[NaN, NaN]]), { start: 0, length: 0 });
  });
  await t.step("bad input names the argument", () => {
    assert.throws(() => longestCompleteRun([]), {
      name: "InputError",
      field: "values",
      reason: "empty",
    });
    assert.throws(() => longestCompleteRun([[1, 2], [1]]), {
      field: "values",
      reason: "length_mismatch",
      index: 1,
    });
  });
});
