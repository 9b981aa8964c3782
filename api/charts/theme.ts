/**
 * Light and dark chart themes. The data palette is the colour-blind-safe set of Okabe & Ito
 * (2008, "Color Universal Design"), with lighter variants on dark backgrounds so every colour
 * keeps a contrast ratio of at least 3:1 against its background (WCAG 2.2 §1.4.11).
 *
 * @module
 */

export type ThemeName = "light" | "dark";

export interface Theme {
  name: ThemeName;
  background: string;
  /** Text, axes. */
  foreground: string;
  /** Secondary text (notes, tick labels). */
  muted: string;
  grid: string;
  /** Data colours, in order of use. */
  palette: readonly string[];
  /** Opacity of uncertainty bands. */
  bandOpacity: number;
}

/** The system font stack: no web font is ever loaded. */
export const FONT_STACK =
  "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, 'Noto Sans', sans-serif";

export const THEMES: Record<ThemeName, Theme> = {
  light: {
    name: "light",
    background: "#ffffff",
    foreground: "#1b1f24",
    muted: "#57606a",
    grid: "#e3e6ea",
    // blue, vermillion, bluish green, reddish purple, orange, sky blue, black; orange and sky
    // blue darkened from #E69F00 and #56B4E9 (2.3:1 on white) to reach 3:1
    palette: ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#B27800", "#2B8CC4", "#1b1f24"],
    bandOpacity: 0.22,
  },
  dark: {
    name: "dark",
    background: "#0f1419",
    foreground: "#e6edf3",
    muted: "#9da7b1",
    grid: "#2a3139",
    palette: ["#56B4E9", "#FF8C4A", "#2FD3A0", "#E59CC6", "#F0B429", "#9ED8F7", "#e6edf3"],
    bandOpacity: 0.3,
  },
};

/** A colour by palette index (wrapping) or by role. */
export type ColorRef = number | "foreground" | "muted";

/** Resolve a colour reference against a theme. */
export function color(theme: Theme, ref: ColorRef | undefined, fallbackIndex = 0): string {
  if (ref === "foreground") return theme.foreground;
  if (ref === "muted") return theme.muted;
  const i = ref ?? fallbackIndex;
  return theme.palette[((i % theme.palette.length) + theme.palette.length) % theme.palette.length];
}
