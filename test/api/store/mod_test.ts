import assert from "node:assert/strict";
import { join } from "node:path";
import {
  DEFAULT_STORE_SPEC,
  openStore,
  openStoreFromSpec,
  parseStoreSpec,
} from "../../../api/store/mod.ts";

Deno.test("parseStoreSpec() splits at the first colon only", () => {
  assert.deepEqual(parseStoreSpec("sqlite:./data/sunlag.db"), {
    scheme: "sqlite",
    location: "./data/sunlag.db",
  });
  assert.deepEqual(parseStoreSpec("sqlite::memory:"), { scheme: "sqlite", location: ":memory:" });
  assert.deepEqual(parseStoreSpec("sqlite:/tmp/a:b.db"), {
    scheme: "sqlite",
    location: "/tmp/a:b.db",
  });
});

Deno.test("parseStoreSpec() rejects unknown adapters naming the variable and the value", () => {
  for (const bad of ["./data/sunlag.db", "mysql://x", "", "SQLITE::memory:"]) {
    assert.throws(
      () => parseStoreSpec(bad),
      (e: unknown) =>
        e instanceof RangeError && e.message.includes("SUNLAG_STORE") &&
        e.message.includes(`"${bad}"`),
    );
  }
});

Deno.test("openStoreFromSpec() rejects sqlite: without a location", async () => {
  await assert.rejects(() => openStoreFromSpec("sqlite:"), /needs a file path or :memory:/);
});

Deno.test("openStore() opens the SQLite file or memory store SUNLAG_STORE names", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-open-" });
  try {
    const path = join(dir, "deep", "er", "s.db");
    const file = await openStore({ SUNLAG_STORE: `sqlite:${path}` });
    assert.equal(file.kind, "sqlite");
    assert.equal(await file.ping(), true);
    await file.close();
    assert.ok((await Deno.stat(path)).isFile, "directories and file not created");

    const mem = await openStore({ SUNLAG_STORE: "sqlite::memory:" });
    assert.equal(await mem.ping(), true);
    await mem.close();
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
});

Deno.test("openStore() defaults to ./data/sunlag.db under the working directory", async () => {
  assert.equal(DEFAULT_STORE_SPEC, "sqlite:./data/sunlag.db");
  const dir = await Deno.makeTempDir({ prefix: "sunlag-default-" });
  const cwd = Deno.cwd();
  try {
    Deno.chdir(dir);
    for (const env of [{}, { SUNLAG_STORE: "" }]) {
      const store = await openStore(env);
      await store.close();
    }
    assert.ok((await Deno.stat(join(dir, "data", "sunlag.db"))).isFile);
  } finally {
    Deno.chdir(cwd);
    await Deno.remove(dir, { recursive: true });
  }
});
