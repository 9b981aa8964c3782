/**
 * Type sizes and fixed distances of the chart layout, in px.
 *
 * @module
 */

/** Axis ticks, axis titles and legend entries. */
export const FONT = 12;
/** The chart title. */
export const TITLE_FONT = 15;
/** Notes under the plot. */
export const NOTE_FONT = 10.5;
/** Height of one legend row. */
export const LEGEND_ROW = FONT + 6;
/** Height of one note line. */
export const NOTE_LINE = NOTE_FONT + 3;
/** Room under the plot for the x tick labels and the x axis title. */
export const X_AXIS_ROOM = 42;
