/**
 * Test helper: the visible text of a chart's notes, to check that warnings are shown whole.
 *
 * @module
 */

/** Whitespace removed (lines wrap at spaces, and over-long words are cut). */
export function squash(s: string): string {
  return s.replace(/\s+/g, "");
}

/** The visible text of a chart's notes group, unescaped, whitespace removed. */
export function noteText(svg: string): string {
  const g = /<g class="notes">(.*?)<\/g>/s.exec(svg)?.[1] ?? "";
  const texts = [...g.matchAll(/<text[^>]*>(.*?)<\/text>/gs)].map((m) => m[1]);
  return squash(
    texts.join(" ").replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&quot;/g, '"')
      .replace(/&apos;/g, "'").replace(/&amp;/g, "&"),
  );
}
