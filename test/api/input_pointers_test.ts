/**
 * Core's typed input errors reach the user as 422 problems at the request field they came from
 * (JSON Pointer) with a machine-readable reason; nothing here depends on message wording.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, monthlySeries } from "./helpers.ts";
import { InputError } from "../../core/errors.ts";
import { InputProblem } from "../../api/runs/kind.ts";
import { inputProblem, withInputPointers } from "../../api/analyses/common/input_problem.ts";
import { serialiseError } from "../../api/workers/messages.ts";

const wave = (i: number) => Math.sin((2 * Math.PI * i) / 132) + 0.3 * Math.cos(i * 1.7);

Deno.test("inputProblem() maps an InputError by field, index function and fallback", async (t) => {
  const e = new InputError("x", { field: "series", reason: "not_finite", index: 2 });
  await t.step("an indexed field", () => {
    const p = inputProblem(e, { series: (e) => `/series/${e.index}` }) as InputProblem;
    assert.ok(p instanceof InputProblem);
    assert.equal(p.pointer, "/series/2");
    assert.deepEqual(p.extra, { field: "series", reason: "not_finite", index: 2 });
  });
  await t.step("the fallback", () => {
    assert.equal((inputProblem(e, { "*": "/x" }) as InputProblem).pointer, "/x");
  });
  await t.step("an unmapped field or another error passes unchanged", () => {
    assert.equal(inputProblem(e, { other: "/o" }), e);
    const plain = new RangeError("r");
    assert.equal(inputProblem(plain, { other: "/o" }), plain);
    const boom = new Error("e");
    assert.equal(inputProblem(boom, { "*": "/x" }), boom);
  });
  await t.step("an untyped RangeError from core goes to the catch-all field", () => {
    const p = inputProblem(new RangeError("r"), { "*": "/x" }) as InputProblem;
    assert.ok(p instanceof InputProblem);
    assert.equal(p.pointer, "/x");
  });
  await t.step("withInputPointers() returns the value when nothing is thrown", () => {
    assert.equal(withInputPointers({}, () => 3), 3);
  });
});

Deno.test("serialiseError() keeps an InputError's field, reason, index and value for the pool", () => {
  const s = serialiseError(
    new InputError("m", { field: "y", reason: "constant", index: 4, value: 1 }),
  );
  assert.equal(s.name, "InputError");
  assert.deepEqual(s.input, { field: "y", reason: "constant", index: 4, value: 1 });
  assert.equal(serialiseError(new RangeError("m")).input, undefined);
});

Deno.test("solar–climate analyses name the field core refused", async (t) => {
  const svc = await makeTestApp();
  try {
    const solar = monthlySeries("invented cycle", "tsi", "W m-2", 1950, 240, (i) => 1361 + wave(i));
    const climate = monthlySeries(
      "invented station",
      "temperature_anomaly",
      "K",
      1950,
      240,
      (i) => 0.1 * wave(i - 6) + 0.02 * Math.sin(i * 2.9),
    );
    await t.step("lag-correlations: a high-pass cutoff under 2 samples", async () => {
      const body = await assertProblem(
        await svc.post("/v1/lag-correlations", {
          solar,
          climate,
          preprocess: "high_pass",
          high_pass_cutoff_years: 0.1,
          significance: "none",
        }),
        422,
      );
      assert.equal(body.errors[0].pointer, "/high_pass_cutoff_years");
      assert.equal(body.reason, "out_of_range");
    });
    await t.step("composites: no epoch whose window fits the series", async () => {
      const body = await assertProblem(
        await svc.post("/v1/composites", { series: climate, epoch_dates: ["1950-02", "1969-11"] }),
        422,
      );
      assert.equal(body.errors[0].pointer, "/epoch_dates");
      assert.equal(body.reason, "too_few_points");
    });
    await t.step("attributions: regressors collinear at every lag", async () => {
      const body = await assertProblem(
        await svc.post("/v1/attributions", {
          climate,
          trend: false,
          regressors: [
            { name: "a", series: solar },
            { name: "b", series: { ...solar, name: "copy" } },
          ],
        }),
        422,
      );
      assert.equal(body.errors[0].pointer, "/regressors");
      assert.equal(body.reason, "collinear");
    });
  } finally {
    await svc.close();
  }
});

Deno.test("alignments: a series without a covered period is named by its index", async () => {
  const svc = await makeTestApp();
  try {
    const a = monthlySeries("a", "other", "1", 2000, 24, (i) => i);
    // one value every third month: no year reaches 10 covered months
    const b = monthlySeries("b", "other", "1", 2000, 24, (i) => (i % 3 === 0 ? i : null));
    const body = await assertProblem(
      await svc.post("/v1/alignments", { series: [a, b], resolution: "annual" }),
      422,
    );
    assert.equal(body.errors[0].pointer, "/series/1");
    assert.equal(body.reason, "empty");
  } finally {
    await svc.close();
  }
});
