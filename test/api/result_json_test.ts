/**
 * The result JSON policies: one non-finite policy (a value undefined by its method is a
 * documented null, any other NaN is refused by the serializer) and one key spelling
 * (snake_case, enforced by the serializer).
 */
import assert from "node:assert/strict";
import { undefinedAsNull } from "../../api/analyses/common/undefined_as_null.ts";
import { SNAKE_CASE_KEY, snakeKeys } from "../../api/analyses/common/keys.ts";
import { toPlainJson } from "../../api/runs/json.ts";

Deno.test("undefinedAsNull() turns NaN and infinities into null, numbers and arrays alike", async (t) => {
  await t.step("numbers", () => {
    assert.equal(undefinedAsNull(0), 0);
    assert.equal(undefinedAsNull(-1.5), -1.5);
    assert.equal(undefinedAsNull(NaN), null);
    assert.equal(undefinedAsNull(Infinity), null);
    assert.equal(undefinedAsNull(-Infinity), null);
    assert.equal(undefinedAsNull(null), null);
    assert.equal(undefinedAsNull(undefined), null);
  });
  await t.step("arrays", () => {
    assert.deepEqual(undefinedAsNull([]), []);
    assert.deepEqual(undefinedAsNull(Float64Array.of(NaN)), [null]);
    assert.deepEqual(undefinedAsNull([1, NaN, Infinity, 2]), [1, null, null, 2]);
    assert.deepEqual(undefinedAsNull(Int32Array.of(3, 4)), [3, 4]);
  });
});

Deno.test("the serializer refuses a NaN that was not declared undefined, with its pointer", () => {
  assert.throws(() => toPlainJson({ value: [1, NaN] }), /\/value\/1/);
  assert.deepEqual(toPlainJson({ value: undefinedAsNull([1, NaN]) }), { value: [1, null] });
});

Deno.test("results spell keys in snake_case; the serializer refuses any other key", async (t) => {
  await t.step("the pattern", () => {
    for (const k of ["r", "r_full", "p_family_wise", "aligned_0", "contribution_solar", "r1"]) {
      assert.ok(SNAKE_CASE_KEY.test(k), k);
    }
    for (const k of ["rSquared", "R", "_x", "0", "a-b", "a b", ""]) {
      assert.ok(!SNAKE_CASE_KEY.test(k), k);
    }
  });
  await t.step("toPlainJson() refuses a camelCase key anywhere, and accepts snakeKeys()", () => {
    assert.throws(() => toPlainJson({ fit: { rSquared: 0.5 } }), /\/fit/);
    assert.throws(() => toPlainJson({ rows: [{ ok: 1 }, { notOk: 2 }] }), /\/rows\/1/);
    assert.deepEqual(toPlainJson(snakeKeys({ fit: { rSquared: 0.5 } })), {
      fit: { r_squared: 0.5 },
    });
  });
});
