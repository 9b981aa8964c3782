/**
 * Lines under the plot: the kept lines (warnings, and what the chart cannot be read without)
 * always whole, then the notes (method notes, cautions) whole as long as they fit, else as many
 * whole notes as fit and one line that says how many more there are and where to read them.
 * Everything is wrapped to the chart's width and anchored to its bottom edge.
 *
 * @module
 */
import { text, wrapText } from "../svg.ts";
import type { Theme } from "../theme.ts";
import { NOTE_FONT, NOTE_LINE } from "./metrics.ts";

/** Every note wrapped into lines for a chart `width` px wide (over-long words cut to fit). */
export function noteLines(notes: string[], width: number): string[] {
  const lines: string[] = [];
  for (const n of notes) lines.push(...wrapText(n, NOTE_FONT, width - 24, false, true));
  return lines;
}

/** The line that stands for `count` notes left out, pointing to where they are read. */
export function notesPointer(count: number, ref?: string): string {
  const what = count === 1 ? "1 more note or caution" : `${count} more notes and cautions`;
  return ref ? `${what}: see ${ref}.` : `${what}: see the chart's description.`;
}

/**
 * The note lines that fit in `maxLines`: every note when all fit, else the first whole notes
 * that leave room for the pointer line, then the pointer (shown even when it alone does not
 * fit: the chart then grows).
 */
export function fittedNotes(
  notes: string[],
  width: number,
  maxLines: number,
  ref?: string,
): string[] {
  const wrapped = notes.map((n) => noteLines([n], width));
  const all = wrapped.flat();
  if (all.length <= maxLines) return all;
  for (let k = notes.length - 1; k >= 0; k--) {
    const head = wrapped.slice(0, k).flat();
    const pointer = noteLines([notesPointer(notes.length - k, ref)], width);
    if (head.length + pointer.length <= maxLines || k === 0) return [...head, ...pointer];
  }
  return [];
}

/** Height the shown note lines take under the x axis. */
export function notesHeight(lines: string[]): number {
  return lines.length ? lines.length * NOTE_LINE + 6 : 0;
}

/** The note lines, the last one on the chart's bottom margin. */
export function drawNotes(lines: string[], height: number, theme: Theme): string {
  let notes = "";
  lines.forEach((n, i) => {
    notes += text({
      x: 12,
      y: height - 8 - (lines.length - 1 - i) * NOTE_LINE,
      fill: theme.muted,
      "font-size": NOTE_FONT,
    }, n);
  });
  return notes;
}
