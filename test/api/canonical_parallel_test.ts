/**
 * A large result's canonical JSON written with a second thread (api/runs/json.ts
 * `canonicalJsonBytesParallel`, api/workers/number_formatter.ts) is byte for byte the one
 * written in one thread (RFC 8785 canonical JSON as `canonicalJsonBytes` writes it), refuses the
 * same values with the same errors, and falls back to this thread when the other one fails.
 *
 * @module
 */
import assert from "node:assert/strict";
import {
  canonicalJsonBytes,
  canonicalJsonBytesParallel,
  type NumberFormatter,
  PARALLEL_ITEMS,
} from "../../api/runs/json.ts";
import { NumberFormatterThread } from "../../api/workers/number_formatter.ts";

/** Numbers of every form ECMAScript writes differently: integers, exponents, -0, tiny, huge. */
function numbers(n: number, seed: number): number[] {
  const out: number[] = [];
  let x = seed;
  for (let i = 0; i < n; i++) {
    x = (x * 1103515245 + 12345) % 2147483648;
    const u = x / 2147483648;
    const k = i % 8;
    out.push(
      k === 0
        ? Math.round(u * 1e6)
        : k === 1
        ? -0
        : k === 2
        ? u * 1e-9
        : k === 3
        ? (u - 0.5) * 1e22
        : k === 4
        ? 1360 + u
        : k === 5
        ? Math.round(u * 1e7) / 1e7
        : k === 6
        ? -u
        : u * 2 ** 52,
    );
  }
  return out;
}

function largeResult() {
  const n = PARALLEL_ITEMS / 4;
  const shared = numbers(n, 7);
  return {
    warnings: ["é ✓ a non-Latin-1 string before the numbers"],
    outputs: {
      a: { time: shared, value: numbers(n, 1) },
      b: { time: shared, value: Float64Array.from(numbers(n, 2)) },
      c: { time: numbers(n, 7), value: numbers(n, 3), mixed: [1, "two", null, true] },
    },
    rows: [{ x: numbers(n, 4), y: 1.5 }, { x: numbers(n, 5) }],
    short: numbers(100, 6),
  };
}

const encoder = new TextEncoder();
const localFormat: NumberFormatter = (arrays) =>
  Promise.resolve(arrays.map((a) => encoder.encode(JSON.stringify(Array.from(a)))));

Deno.test("canonicalJsonBytesParallel: the bytes of canonicalJsonBytes, with a formatter thread", async () => {
  const value = largeResult();
  const one = canonicalJsonBytes(value);
  const thread = new NumberFormatterThread();
  let handed = 0;
  const counting: NumberFormatter = (arrays) => {
    handed += arrays.reduce((n, a) => n + a.length, 0);
    return thread.format(arrays);
  };
  try {
    const two = await canonicalJsonBytesParallel(value, Infinity, counting);
    assert.ok(handed > 0 && handed < PARALLEL_ITEMS * 2, `numbers handed over: ${handed}`);
    assert.equal(two.length, one.length);
    assert.deepEqual(two, one);
    // in shared memory when asked
    const shared = await canonicalJsonBytesParallel(value, 1, thread.format);
    assert.ok(shared.buffer instanceof SharedArrayBuffer);
    assert.deepEqual(new Uint8Array(shared), one);
    // the result's own arrays are untouched (copies were transferred)
    assert.equal(value.outputs.b.value.length, PARALLEL_ITEMS / 4);
    assert.deepEqual(canonicalJsonBytes(value), one);
  } finally {
    thread.close();
  }
});

Deno.test("canonicalJsonBytesParallel: a small result is written in this thread alone", async () => {
  const value = { a: numbers(1000, 1) };
  const never: NumberFormatter = () => Promise.reject(new Error("not used"));
  assert.deepEqual(
    await canonicalJsonBytesParallel(value, Infinity, never),
    canonicalJsonBytes(value),
  );
});

Deno.test("canonicalJsonBytesParallel: the same refusals, and this thread's text when the other fails", async () => {
  // a NaN deep in an array that is handed over: the same error, at the same pointer
  const value = largeResult();
  const bad = numbers(PARALLEL_ITEMS / 4, 9);
  bad[12345] = NaN;
  const withNaN = {
    ...value,
    outputs: { ...value.outputs, a: { time: value.outputs.a.time, value: bad } },
  };
  const sync = (() => {
    try {
      canonicalJsonBytes(withNaN);
    } catch (e) {
      return (e as Error).message;
    }
  })();
  assert.match(sync ?? "", /12345/);
  await assert.rejects(
    () => canonicalJsonBytesParallel(withNaN, Infinity, localFormat),
    (e: Error) => {
      assert.equal(e.message, sync);
      return true;
    },
  );
  // an array that looks like numbers at both ends but holds a string: written as it is
  const strings = numbers(PARALLEL_ITEMS / 4, 10) as unknown[];
  strings[500] = "not a number";
  const withString = { z: strings, ...value }; // met first: handed over
  assert.deepEqual(
    await canonicalJsonBytesParallel(withString, Infinity, localFormat),
    canonicalJsonBytes(withString),
  );
  // a formatter that fails, or answers wrongly, is not needed
  const failing: NumberFormatter = () => Promise.reject(new Error("thread gone"));
  const short: NumberFormatter = () => Promise.resolve([]);
  assert.deepEqual(
    await canonicalJsonBytesParallel(value, Infinity, failing),
    canonicalJsonBytes(value),
  );
  assert.deepEqual(
    await canonicalJsonBytesParallel(value, Infinity, short),
    canonicalJsonBytes(value),
  );
});
