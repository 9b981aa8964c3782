import assert from "node:assert/strict";
import * as core from "../../core/mod.ts";
import { tsSources } from "../source_files.ts";

const SNAPSHOT = new URL("./mod_exports.json", import.meta.url);

Deno.test("core/mod.ts exports exactly the committed list (API changes are deliberate)", async () => {
  const names = Object.keys(core).sort();
  if (Deno.env.get("UPDATE_SNAPSHOT") === "1") {
    await Deno.writeTextFile(SNAPSHOT, JSON.stringify(names, null, 2) + "\n");
  }
  const expected = JSON.parse(await Deno.readTextFile(SNAPSHOT));
  assert.deepEqual(
    names,
    expected,
    "core exports changed: review, then run with UPDATE_SNAPSHOT=1 to accept",
  );
});

Deno.test("core/ is pure: no imports of api/, Hono, zod or I/O modules", async () => {
  const bad: string[] = [];
  for await (const [u, text] of tsSources(new URL("../../core/", import.meta.url))) {
    for (const m of text.matchAll(/^\s*(?:import|export)[^;]*?from\s+"([^"]+)"/gms)) {
      const spec = m[1];
      if (/\/api\/|^hono|^@hono|^zod|^node:(fs|http|net|sqlite|child_process)/.test(spec)) {
        bad.push(`${u.pathname.split("/core/")[1]}: ${spec}`);
      }
    }
    if (/\bDeno\.(readTextFile|writeTextFile|open|serve|Command|env)\b|\bfetch\(/.test(text)) {
      bad.push(`${u.pathname.split("/core/")[1]}: uses I/O`);
    }
  }
  assert.deepEqual(bad, []);
});

Deno.test("core/mod.ts loses no export to a name clash between areas", async () => {
  const areas = [
    "random",
    "time",
    "series",
    "cycles",
    "spectral",
    "stats",
    "climate",
    "irradiance",
    "cf",
    "field",
  ];
  const seen = new Map<string, string>();
  const clashes: string[] = [];
  for (const a of areas) {
    const mod = await import(`../../core/${a}/mod.ts`);
    for (const name of Object.keys(mod)) {
      const before = seen.get(name);
      if (before && before !== a) clashes.push(`${name} (${before}, ${a})`);
      seen.set(name, a);
      if (!(name in core)) clashes.push(`${name} of ${a} is not re-exported`);
    }
  }
  assert.deepEqual(clashes, []);
});
