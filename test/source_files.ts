/**
 * Test helper: the source files below a folder, with their text, for tests that
 * check a rule over the code itself (core's purity, how analyses read other runs, the length of
 * the page's functions).
 *
 * @module
 */

/** Every file below `dir` whose name ends in `ext`, recursively, as [url, text]. */
export async function* sourcesEndingIn(dir: URL, ext: string): AsyncGenerator<[URL, string]> {
  for await (const e of Deno.readDir(dir)) {
    const u = new URL(e.name + (e.isDirectory ? "/" : ""), dir);
    if (e.isDirectory) yield* sourcesEndingIn(u, ext);
    else if (e.name.endsWith(ext)) yield [u, await Deno.readTextFile(u)];
  }
}

/** Every `.ts` file below `dir`, recursively, as [url, text]. */
export function tsSources(dir: URL): AsyncGenerator<[URL, string]> {
  return sourcesEndingIn(dir, ".ts");
}

/** Every `.js` file below `dir`, recursively, as [url, text] (the built-in page's modules). */
export function jsSources(dir: URL): AsyncGenerator<[URL, string]> {
  return sourcesEndingIn(dir, ".js");
}
