/**
 * Child process for the cross-process digest test: computes one run of the given kind on the
 * given body (JSON on argv[0]) in a fresh in-memory service and prints its result digest.
 */
import { makeTestApp } from "./helpers.ts";

const [path, body, workers] = Deno.args;
const svc = await makeTestApp({ workers: Number(workers ?? 0) });
const res = await svc.post(path, JSON.parse(body));
const run = await res.json();
console.log(run.result_digest);
await svc.close();
