/**
 * The vertical layout of a chart: the title on top, then as many legend rows as leave the plot
 * a usable height, the kept lines (warnings) whole, and the notes that fit (the description
 * names every layer and note anyway). When the kept lines need more room than the asked height
 * leaves, the chart grows taller: a warning is never cut.
 *
 * @module
 */
import type { ChartSpec } from "../spec.ts";
import { type LegendEntry, legendHeight, legendRows } from "./legend.ts";
import { LEGEND_ROW, NOTE_LINE, X_AXIS_ROOM } from "./metrics.ts";
import { fittedNotes, noteLines, notesHeight } from "./notes.ts";
import { titleBottom, titleLines } from "./title.ts";

/** At most this many lines of notes (not of kept lines) under the plot. */
const MAX_NOTE_LINES = 6;

/** Where the title, legend, plot and notes go. */
export interface Frame {
  title: string[];
  legend: LegendEntry[][];
  /** Top of the legend rows. */
  legendTop: number;
  /** Lines under the plot: the kept lines, then the notes that fit. */
  notes: string[];
  /** Top and bottom of the plot area (y range of the scales). */
  plotTop: number;
  plotBottom: number;
  /** Height of the chart: the asked height, or more when the kept lines need it. */
  height: number;
}

/**
 * Lay out a chart of `width` × `height` px with the given notes (spec notes + dropped) and
 * the spec's kept lines.
 */
export function layoutFrame(
  spec: ChartSpec,
  notes: string[],
  width: number,
  height: number,
): Frame {
  const title = titleLines(spec.title, width);
  const legendTop = titleBottom(title);
  const minPlot = Math.max(40, height * 0.35);
  // px left for legend or notes once the plot has its minimum height, below a given top
  const spare = (top: number) => height - X_AXIS_ROOM - (top + 6) - minPlot - 6;
  const legend = legendRows(spec.layers, width).slice(
    0,
    Math.max(0, Math.floor(spare(legendTop) / LEGEND_ROW)),
  );
  const plotTop0 = legendTop + legendHeight(legend);
  const room = Math.max(0, Math.floor(spare(plotTop0) / NOTE_LINE));
  const kept = noteLines(spec.keep ?? [], width);
  const noteRoom = Math.max(0, Math.min(MAX_NOTE_LINES, room - kept.length));
  const lines = [...kept, ...fittedNotes(notes, width, noteRoom, spec.notesRef)];
  const grown = height + Math.max(0, lines.length - room) * NOTE_LINE;
  const plotTop = plotTop0 + 6;
  const plotBottom = Math.max(plotTop + 10, grown - X_AXIS_ROOM - notesHeight(lines));
  return { title, legend, legendTop, notes: lines, plotTop, plotBottom, height: grown };
}
