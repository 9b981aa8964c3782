/**
 * The map part of a gridded result (solar-signal maps, field composites): the grid, and named
 * per-cell variables with their units, stored in the run's result so that every map is
 * downloadable the same way (`GET /v1/runs/{id}/map` as JSON, CSV of cells or NetCDF-CF) and
 * drawn by one map chart, whichever analysis made it.
 *
 * Cells are latitude-major (index i · n_lon + j, in the field's own coordinate order); a cell
 * left out of the analysis (missing values, constant series, zero weight) is null in every
 * variable.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { LoadedField } from "../../runs/kind.ts";
import type { MapChartSpec } from "../../charts/map_chart.ts";
import type { RunRecord } from "../../store/types.ts";
import { nums, numsOrNull } from "./result_parts.ts";

/** The caution every map carries. */
export const CAUTION_MANY_CELLS =
  "A map has many cells: at the 5 % level about one cell in twenty passes a local test by " +
  "chance, and neighbouring cells are not independent, so a pattern of significant cells is " +
  "evidence only as far as the field significance (false discovery rate, Monte Carlo) says.";

export const MapGridSchema = z.object({
  lat: nums.openapi({ description: "Cell centres, degrees north (the field's order)" }),
  lon: nums.openapi({ description: "Cell centres, degrees east (the field's order)" }),
  lat_bounds: nums.nullable().openapi({ description: "[south₀, north₀, south₁, …] or null" }),
  lon_bounds: nums.nullable().openapi({ description: "[west₀, east₀, west₁, …] or null" }),
}).openapi("MapGrid");

export const MapVariableSchema = z.object({
  name: z.string().regex(/^[a-z][a-z0-9_]*$/).openapi({
    description: "Variable name (also in the NetCDF file and the CSV header)",
  }),
  long_name: z.string(),
  units: z.string().openapi({ description: 'UDUNITS units ("1" for dimensionless)' }),
  kind: z.enum(["float", "int", "flag"]).openapi({
    description: "`flag`: 1 = yes, 0 = no (written as a byte with flag_values)",
  }),
  values: numsOrNull.openapi({
    description: "One value per cell, latitude-major; null where the cell was left out",
  }),
}).openapi("MapVariable");

export const MapPartSchema = z.object({
  grid: MapGridSchema,
  variables: z.array(MapVariableSchema),
  primary: z.string().openapi({ description: "The variable the map chart colours" }),
  significant: z.string().nullable().openapi({
    description: "The flag variable the chart marks with dots (stippling), or null",
  }),
  significance_label: z.string().openapi({ description: "What the dots mean" }),
}).openapi("MapPart");

export type MapPart = z.output<typeof MapPartSchema>;
export type MapVariable = z.output<typeof MapVariableSchema>;

/** The grid of a loaded field. */
export function mapGrid(f: LoadedField): MapPart["grid"] {
  return {
    lat: Array.from(f.lat),
    lon: Array.from(f.lon),
    lat_bounds: f.lat_bounds ? Array.from(f.lat_bounds) : null,
    lon_bounds: f.lon_bounds ? Array.from(f.lon_bounds) : null,
  };
}

/** A map variable from per-cell numbers (NaN → null). */
export function mapVariable(
  name: string,
  longName: string,
  units: string,
  values: ArrayLike<number>,
  kind: MapVariable["kind"] = "float",
): MapVariable {
  return {
    name,
    long_name: longName,
    units,
    kind,
    values: Array.from(values, (v) => (Number.isFinite(v) ? v : null)),
  };
}

/** A variable of a map by name. */
export function mapVariableOf(map: MapPart, name: string): MapVariable | undefined {
  return map.variables.find((v) => v.name === name);
}

/** The map chart of a map part: its primary variable, stippled where `significant` is 1. */
export function mapChartOf(
  map: MapPart,
  title: string,
  description: string,
  notes: string[],
  run?: RunRecord,
): MapChartSpec {
  const primary = mapVariableOf(map, map.primary)!;
  const sig = map.significant ? mapVariableOf(map, map.significant) : undefined;
  return {
    type: "map",
    title,
    description: description + (run ? ` Run ${run.id} (${run.kind}).` : ""),
    lat: map.grid.lat,
    lon: map.grid.lon,
    lat_bounds: map.grid.lat_bounds,
    lon_bounds: map.grid.lon_bounds,
    values: primary.values,
    legend: `${primary.long_name} (${primary.units})`,
    ...(sig ? { stipple: sig.values, stippleLabel: map.significance_label } : {}),
    notes,
  };
}
