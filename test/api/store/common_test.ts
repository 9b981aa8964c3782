import assert from "node:assert/strict";
import {
  checkPaging,
  encodeRunPatch,
  interruptedProblem,
  metaOf,
} from "../../../api/store/common.ts";
import { ProblemError } from "../../../api/problems.ts";
import { makeSeries } from "./store_suite.ts";

Deno.test("interruptedProblem() is the service's internal-error problem with the reason", () => {
  const reason = "the service stopped while this run was in progress";
  const p = new ProblemError("internal", reason).problem;
  assert.deepEqual(interruptedProblem(reason), {
    type: p.type,
    title: p.title,
    status: 500,
    detail: reason,
  });
});

Deno.test("encodeRunPatch() stamps updated_at, skips undefined and input lists", () => {
  const cols = encodeRunPatch("r1", {
    status: "running",
    progress: undefined,
    result: { a: [1, null] },
    error: null,
    input_series: ["sha256:x"],
  }, "2026-12-01T00:00:00.000Z");
  assert.deepEqual(Object.fromEntries(cols), {
    status: "running",
    result: '{"a":[1,null]}',
    error: null,
    updated_at: "2026-12-01T00:00:00.000Z",
  });
  assert.deepEqual(
    Object.fromEntries(encodeRunPatch("r1", { updated_at: "x" }, "now")),
    { updated_at: "x" },
  );
});

Deno.test("encodeRunPatch() refuses fields that are not run columns", () => {
  for (const bad of ["id", "kind", "created_at", "nonsense"]) {
    assert.throws(
      () => encodeRunPatch("r1", { [bad]: "x" } as never, "now"),
      (e: unknown) => e instanceof RangeError && e.message.includes(`"${bad}"`),
    );
  }
});

Deno.test("metaOf() keeps only the metadata fields", () => {
  const s = makeSeries("meta");
  const m = metaOf({ ...s, extra: 1 } as never);
  assert.deepEqual(Object.keys(m).sort(), [
    "created_at",
    "derived_from",
    "description",
    "end",
    "id",
    "n",
    "name",
    "quantity",
    "resolution",
    "source",
    "start",
    "units",
    "version",
  ]);
});

Deno.test("checkPaging() names the operation and the bad value", () => {
  assert.throws(() => checkPaging("list runs", 1.5, 0), /Cannot list runs: limit .* got 1.5/);
  assert.throws(() => checkPaging("list runs", 1, -2), /offset .* got -2/);
  checkPaging("list runs", 0, 0);
});
