/**
 * Request ids: npm `uuidv7` beside `requestUuidv7` (api/hot_gets.ts), made on every request that
 * brings no `X-Request-Id`. Run: `deno bench -A test/bench/request_id_bench.ts`.
 *
 * @module
 */
import { uuidv7 } from "uuidv7";
import { requestUuidv7 } from "../../api/hot_gets.ts";

Deno.bench("uuidv7() (npm uuidv7)", { group: "request id", baseline: true }, () => {
  uuidv7();
});
Deno.bench("requestUuidv7()", { group: "request id" }, () => {
  requestUuidv7();
});
