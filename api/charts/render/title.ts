/**
 * The chart title: at most two lines, each fitted to the width (an ellipsis when cut).
 *
 * @module
 */
import { text, wrapText } from "../svg.ts";
import type { Theme } from "../theme.ts";
import { fitText } from "./fit_text.ts";
import { TITLE_FONT } from "./metrics.ts";

/** Baseline of the first title line. */
export const TITLE_TOP = 10 + TITLE_FONT;

/** The title's lines for a chart `width` px wide. */
export function titleLines(title: string, width: number): string[] {
  const wrapped = wrapText(title, TITLE_FONT, width - 24, true);
  return wrapped.slice(0, 2).map((t, i, a) =>
    fitText(i === a.length - 1 && wrapped.length > 2 ? t + " …" : t, TITLE_FONT, width - 24, true)
      .text
  );
}

/** Where the content under the title starts. */
export function titleBottom(lines: string[]): number {
  return TITLE_TOP + (lines.length - 1) * (TITLE_FONT + 3) + 8;
}

/** The title's text elements. */
export function drawTitle(lines: string[], theme: Theme): string {
  let markup = "";
  lines.forEach((t, i) => {
    markup += text({
      x: 12,
      y: TITLE_TOP + i * (TITLE_FONT + 3),
      fill: theme.foreground,
      "font-size": TITLE_FONT,
      "font-weight": 600,
    }, t);
  });
  return markup;
}
