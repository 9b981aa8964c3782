/**
 * The vertical layout of a chart: the title on top, then as many legend rows and note lines as
 * leave the plot a usable height (the description names every layer and note anyway), and the
 * plot's top and bottom edges in between.
 *
 * @module
 */
import type { ChartSpec } from "../spec.ts";
import { type LegendEntry, legendHeight, legendRows } from "./legend.ts";
import { LEGEND_ROW, NOTE_LINE, X_AXIS_ROOM } from "./metrics.ts";
import { noteLines, notesHeight } from "./notes.ts";
import { titleBottom, titleLines } from "./title.ts";

/** Where the title, legend, plot and notes go. */
export interface Frame {
  title: string[];
  legend: LegendEntry[][];
  /** Top of the legend rows. */
  legendTop: number;
  notes: string[];
  /** Top and bottom of the plot area (y range of the scales). */
  plotTop: number;
  plotBottom: number;
}

/** Lay out a chart of `width` × `height` px with the given notes (spec notes + dropped). */
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
  const maxNotes = Math.max(0, Math.floor(spare(plotTop0) / NOTE_LINE));
  const shownNotes = noteLines(notes, width).slice(0, Math.min(6, maxNotes));
  const plotTop = plotTop0 + 6;
  const plotBottom = Math.max(plotTop + 10, height - X_AXIS_ROOM - notesHeight(shownNotes));
  return { title, legend, legendTop, notes: shownNotes, plotTop, plotBottom };
}
