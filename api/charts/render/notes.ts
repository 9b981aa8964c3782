/**
 * Notes under the plot (cautions, method notes, options that did not apply), wrapped to the
 * chart's width and anchored to its bottom edge.
 *
 * @module
 */
import { text, wrapText } from "../svg.ts";
import type { Theme } from "../theme.ts";
import { NOTE_FONT, NOTE_LINE } from "./metrics.ts";

/** Every note wrapped into lines for a chart `width` px wide. */
export function noteLines(notes: string[], width: number): string[] {
  const lines: string[] = [];
  for (const n of notes) lines.push(...wrapText(n, NOTE_FONT, width - 24));
  return lines;
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
