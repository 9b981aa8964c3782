/**
 * Fitting a label into a width.
 *
 * @module
 */
import { textWidth } from "../svg.ts";

/**
 * A label that fits `max` px: the font shrinks (down to 9 px), then the text is cut with an
 * ellipsis. The full text stays in the description.
 */
export function fitText(
  s: string,
  size: number,
  max: number,
  bold = false,
): { text: string; size: number } {
  const w = textWidth(s, size, bold);
  if (w <= max) return { text: s, size };
  const smaller = Math.max(9, Math.floor(size * (max / w) * 10) / 10);
  if (textWidth(s, smaller, bold) <= max) return { text: s, size: smaller };
  let cut = s;
  while (cut.length > 1 && textWidth(cut + "…", smaller, bold) > max) cut = cut.slice(0, -1);
  return { text: cut.trimEnd() + "…", size: smaller };
}
