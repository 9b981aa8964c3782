/**
 * Zod schemas of series uploads: the JSON body (`SeriesUpload`) and the query parameters of a
 * delimited-text upload (`TextUploadQuery`). Parsing fills the defaults; the parsed values are
 * what `ingestJson` / `ingestText` (api/ingest/mod.ts) take.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { QUANTITIES } from "../../core/series/quantities.ts";
import { InlineSeries } from "./series_ref.ts";

const Duplicates = z.enum(["reject", "mean"]).default("reject").openapi({
  description: "Repeated or out-of-order timestamps: `reject` (a 422 naming the rows), or " +
    "`mean` (sort by time and average rows that share a time; uncertainties combine as " +
    "independent errors)",
  example: "reject",
});

/** JSON body of `POST /v1/series`. */
export const SeriesUpload = InlineSeries.extend({
  missing: z.array(z.number()).max(100).optional().openapi({
    description: 'Numeric values meaning "missing" besides null, e.g. [-1, -999]; such points ' +
      "are gaps (not stored) and are counted in the report",
    example: [-999],
  }),
  duplicates: Duplicates,
}).openapi("SeriesUpload", {
  description: "A series as JSON: metadata and parallel arrays. `time` holds ISO 8601 strings " +
    "(`YYYY` = middle of the year, `YYYY-MM` = middle of the month, `YYYY-MM-DD` = noon UTC, " +
    "date-times as given) or decimal years on the proleptic Gregorian calendar.",
  example: {
    name: "Observatory spot count (synthetic)",
    quantity: "sunspot_number",
    units: "1",
    version: "2",
    time: ["2001-01", "2001-02", "2001-03"],
    value: [80.2, null, 91.4],
    missing: [-1],
    duplicates: "reject",
  },
});

export type SeriesUpload = z.output<typeof SeriesUpload>;

const column = (what: string, example: string) =>
  z.string().min(1).max(200).optional().openapi({
    description: `${what}: a header name, or a 0-based column index`,
    example,
  });

/** Query parameters of a text upload (`text/csv` and other delimited text). */
export const TextUploadQuery = z.object({
  name: z.string().min(1).max(200).optional().openapi({
    description: "Series name (required unless the file is a sunlag CSV export)",
    example: "Observatory spot count (synthetic)",
  }),
  quantity: z.enum(QUANTITIES).optional().openapi({
    description: "Quantity from sunlag's vocabulary (required unless the file is a sunlag export)",
    example: "sunspot_number",
  }),
  units: z.string().max(60).optional().openapi({
    description: 'UDUNITS units; must agree with the quantity (e.g. "W m-2" for tsi, "1" ' +
      "for indices; temperatures in K, or degC, °C, degF, °F... converted to K) (required " +
      "unless the file is a sunlag export)",
    example: "1",
  }),
  description: z.string().max(4000).optional().openapi({ description: "Free text" }),
  source: z.string().max(2000).optional().openapi({ description: "Where the data come from" }),
  version: z.string().max(40).optional().openapi({
    description: 'Version of the index, e.g. "1" or "2" for the sunspot number',
    example: "2",
  }),
  time: column(
    "Time column holding ISO 8601 times or decimal years (default: a column named " +
      "decimal_year, time, date or year, else column 0). Monthly and annual decimal years at " +
      "the start of each period (R's time()) or its middle are recognised and stored at the " +
      "middle; the report's time_grid says which was read",
    "date",
  ),
  year: column("Year column (instead of `time`; with optional `month` and `day`)", "year"),
  month: column("Month column (1..12), with `year`", "month"),
  day: column("Day-of-month column, with `year` and `month`", "day"),
  value: column("Value column (default: a column named value, or the only other one)", "value"),
  uncertainty: column(
    "One-sigma uncertainty column (default: a column named uncertainty, if any)",
    "sigma",
  ),
  delimiter: z.enum(["auto", "comma", "semicolon", "tab", "whitespace"]).default("auto").openapi({
    description: "Cell delimiter; `auto` detects it from the first 100 rows",
    example: "auto",
  }),
  missing: z.string().max(1000).optional()
    .transform((s) => (s === undefined ? undefined : s.split(",").map((x) => x.trim())))
    .openapi({
      description: "Comma-separated extra missing-value sentinels (empty cells, NaN and NA are " +
        "always missing); numeric sentinels also match equal numbers (-999 matches -999.0)",
      example: "-1,-999",
    }),
  duplicates: Duplicates,
  time_format: z.enum(["auto", "iso", "decimal_year"]).default("auto").openapi({
    description: "How the time column is read: `auto` (a column headed decimal_year or " +
      "holding non-integer numbers is decimal years; 4-digit integers are ISO years, i.e. " +
      "mid-year), `iso`, or `decimal_year`",
    example: "auto",
  }),
}).openapi("TextUploadQuery");

export type TextUploadQuery = z.output<typeof TextUploadQuery>;

/** What an upload did with its rows (the `report` of `POST /v1/series`). */
export const UploadReport = z.object({
  read: z.number().int().openapi({ description: "Rows or points read" }),
  kept: z.number().int().openapi({ description: "Points stored" }),
  missing: z.number().int().openapi({ description: "Points treated as missing (gaps)" }),
  aggregated: z.number().int().openapi({ description: "Points merged by the duplicates rule" }),
  delimiter: z.enum(["comma", "semicolon", "tab", "whitespace"]).optional().openapi({
    description: "Text uploads: the delimiter used",
  }),
  header: z.boolean().optional().openapi({
    description: "Text uploads: whether the first row was read as a header",
  }),
  time_format: z.enum(["iso", "decimal_year", "year_month_day"]).optional().openapi({
    description: "Text uploads: how the time column was read",
  }),
  metadata_from_file: z.array(z.string()).optional().openapi({
    description: "Metadata fields taken from the comment header of a sunlag CSV export",
  }),
  time_grid: z.object({
    resolution: z.enum(["monthly", "annual"]),
    position: z.enum(["start", "middle"]).openapi({
      description: "Where in its period each time sat as given",
    }),
    months: z.enum(["calendar", "twelfths"]).nullable().openapi({
      description: "Monthly grids: calendar months, or equal twelfths of a year (R's time() " +
        "of a monthly ts); null for annual grids",
    }),
    moved_to_middle: z.boolean().openapi({
      description: "Whether times were moved to the middle of their period, where sunlag " +
        "stores monthly and annual values",
    }),
    note: z.string(),
  }).nullable().openapi({
    description: "The regular monthly or annual grid the times were read as (start or " +
      "middle of each period), or null for daily and irregular times",
  }),
  units_conversion: z.object({
    from: z.string(),
    to: z.string(),
    formula: z.string(),
  }).nullable().openapi({
    description: "How values were converted to the quantity's unit (e.g. degF to K), also " +
      "stated in the series description; null when they were in it",
  }),
}).openapi("UploadReport");
