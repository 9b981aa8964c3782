/**
 * Bounded errors: whatever the request, a problem lists at most 20 field errors and counts the
 * others, so its size does not grow with the number of bad fields. Sizes here are CI-sized;
 * test/bench/amplification.ts runs the two-million-key case and reports the ratios.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, uploadSeries } from "../helpers.ts";
import { MAX_FIELD_ERRORS } from "../../../api/problems.ts";
import { smallSeries } from "./shared_instance.ts";

Deno.test("bounded errors: 200,000 unknown fields give a problem of 20 entries and a count", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, smallSeries("u"));
    const body: Record<string, unknown> = { series: id, method: "running_mean", window: 3 };
    for (let i = 0; i < 200_000; i++) body[`unknown_${i}`] = i;
    const text = JSON.stringify(body);
    const res = await svc.app.request("/v1/smoothing", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: text,
    });
    const answer = await res.clone().text();
    const problem = await assertProblem(res, 422);
    assert.equal(problem.errors.length, MAX_FIELD_ERRORS);
    assert.equal(problem.errors_omitted, 200_000 - MAX_FIELD_ERRORS);
    assert.match(problem.detail, /200000 field\(s\)/);
    assert.ok(answer.length < 8_000, `answer ${answer.length} bytes`);
    assert.ok(answer.length / text.length < 0.01, "the answer is a small fraction of the request");
  } finally {
    await svc.close();
  }
});

Deno.test("bounded errors: 100,000 bad array entries in an upload are counted, not listed", async () => {
  // (The same screening guards inline series in analysis requests: one loop, not one zod issue
  // per entry.)
  const svc = await makeTestApp();
  try {
    const n = 100_000;
    const body = {
      name: "bad",
      quantity: "other",
      units: "1",
      time: Array.from({ length: n }, (_, i) => 1900 + i / 1000),
      value: Array.from({ length: n }, () => "warm"),
    };
    const res = await svc.post("/v1/series", body);
    const problem = await assertProblem(res, 422);
    assert.equal(problem.errors.length, MAX_FIELD_ERRORS);
    // 19 entries by place, then one that counts the others.
    assert.equal(problem.errors[0].pointer, "/value/0");
    assert.match(problem.errors[19].message, new RegExp(`and ${n - 19} more entries`));
    assert.ok(JSON.stringify(problem).length < 8_000);
  } finally {
    await svc.close();
  }
});

Deno.test("bounded errors: a CSV with a million columns gets a short error", async () => {
  const svc = await makeTestApp();
  try {
    const cols = 1_000_000;
    const row = (x: string) => Array.from({ length: cols }, () => x).join(",");
    const res = await svc.app.request("/v1/series?name=w&quantity=other&units=1", {
      method: "POST",
      headers: { "content-type": "text/csv" },
      body: `${row("c")}\n${row("1")}\n`,
    });
    const answer = await res.clone().text();
    const problem = await assertProblem(res, 422);
    assert.match(problem.errors[0].message, /1000000 columns .* at most 1000/);
    assert.ok(answer.length < 2_000, `answer ${answer.length} bytes`);
  } finally {
    await svc.close();
  }
});

Deno.test("bounded errors: long values are cut in details, pointers and messages", async () => {
  const svc = await makeTestApp();
  try {
    const long = "k".repeat(100_000);
    const res = await svc.post("/v1/smoothing", { series: "sha256:" + "0".repeat(64), [long]: 1 });
    const problem = await assertProblem(res, 422);
    const text = JSON.stringify(problem);
    assert.ok(text.length < 4_000, `problem ${text.length} bytes`);
  } finally {
    await svc.close();
  }
});

Deno.test("bounded errors: an inline series of 50,000 bad values in an analysis request", async () => {
  const svc = await makeTestApp();
  try {
    const n = 50_000;
    const series = {
      name: "inline",
      quantity: "other",
      units: "1",
      time: Array.from({ length: n }, (_, i) => 1900 + i / 1000),
      value: Array.from({ length: n }, () => "warm"),
    };
    const problem = await assertProblem(await svc.post("/v1/smoothing", { series }), 422);
    assert.ok(problem.errors.length <= MAX_FIELD_ERRORS);
    assert.ok(
      problem.errors.some((e: { message: string }) => /and 49981 more entries/.test(e.message)),
      JSON.stringify(problem.errors.slice(-2)),
    );
  } finally {
    await svc.close();
  }
});
