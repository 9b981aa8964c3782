/**
 * `deno task openapi`: regenerate the committed OpenAPI document `openapi/openapi.json` from
 * the zod schemas (the drift test compares the two).
 *
 * @module
 */
import { createService, openApiDocument } from "./app.ts";
import { testConfig } from "./config.ts";
import { openStoreFromSpec } from "./store/mod.ts";
import { InThreadExecutor } from "./runs/service.ts";

/** The document as committed: pretty JSON with a final newline. */
export async function renderOpenApi(): Promise<string> {
  const store = await openStoreFromSpec("sqlite::memory:");
  const { app } = createService({ store, config: testConfig(), executor: new InThreadExecutor() });
  const text = JSON.stringify(openApiDocument(app), null, 2) + "\n";
  await store.close();
  return text;
}

if (import.meta.main) {
  const text = await renderOpenApi();
  await Deno.mkdir(new URL("../openapi/", import.meta.url), { recursive: true });
  await Deno.writeTextFile(new URL("../openapi/openapi.json", import.meta.url), text);
  console.log(`openapi/openapi.json written (${text.length} bytes)`);
}
