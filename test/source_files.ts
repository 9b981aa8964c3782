/**
 * Test helper: the TypeScript source files below a folder, with their text, for tests that
 * check a rule over the code itself (core's purity, how analyses read other runs).
 *
 * @module
 */

/** Every `.ts` file below `dir`, recursively, as [url, text]. */
export async function* tsSources(dir: URL): AsyncGenerator<[URL, string]> {
  for await (const e of Deno.readDir(dir)) {
    const u = new URL(e.name + (e.isDirectory ? "/" : ""), dir);
    if (e.isDirectory) yield* tsSources(u);
    else if (e.name.endsWith(".ts")) yield [u, await Deno.readTextFile(u)];
  }
}
