/**
 * What a NetCDF file holds, in CF terms: each variable with its dimensions, attributes, role
 * (coordinate, cell bounds, data) and whether it runs along a time coordinate; and the packing
 * attributes of a variable for `cfMaskAndScale`.
 *
 * @module
 */
import type { CfPackingAttributes } from "../../core/cf/cf_mask_and_scale.ts";
import {
  attributeText,
  type NetcdfAttribute,
  type NetcdfVariableInfo,
} from "../../core/cf/netcdf_model.ts";
import type { NetcdfHeader } from "./source.ts";

/** A variable as the listing shows it. */
export interface CfVariableSummary {
  name: string;
  type: string;
  dimensions: string[];
  shape: number[];
  /** `coordinate` (1-D, named after its dimension), `bounds` (named by a `bounds` attribute) or `data`. */
  role: "coordinate" | "bounds" | "data";
  /** The dimension that has a CF time coordinate, if any. */
  time_dimension: string | null;
  units: string | null;
  standard_name: string | null;
  long_name: string | null;
  /** Every attribute: text, or numbers (NaN written as null). */
  attributes: Record<string, string | (number | null)[]>;
}

/**
 * The attributes of a variable that change its stored values.
 *
 * @param v the variable
 * @returns `_FillValue`, `missing_value`, `scale_factor`, `add_offset`, `_Unsigned` as found
 */
export function packingOf(v: NetcdfVariableInfo): CfPackingAttributes {
  const p: CfPackingAttributes = {};
  for (const a of v.attributes) {
    if (a.name === "_Unsigned" && typeof a.value === "string") p._Unsigned = a.value;
    else if (
      typeof a.value !== "string" &&
      (a.name === "_FillValue" || a.name === "missing_value" || a.name === "scale_factor" ||
        a.name === "add_offset")
    ) p[a.name] = a.value;
  }
  return p;
}

/** The time dimension of a variable: one of its dimensions with a CF time coordinate. */
export function timeDimensionOf(header: NetcdfHeader, v: NetcdfVariableInfo): string | null {
  for (const d of v.dimensions) {
    const c = header.variables.find((x) => x.name === d);
    if (c && isTimeCoordinate(c)) return d;
  }
  return null;
}

/**
 * Whether a variable is a CF time coordinate (CF 1.10 §4.4): 1-D along a dimension of its own
 * name, with `units` "<unit> since <date>", `standard_name` time or `axis` T.
 */
export function isTimeCoordinate(v: NetcdfVariableInfo): boolean {
  if (v.dimensions.length !== 1 || v.dimensions[0] !== v.name) return false;
  const units = attributeText(v.attributes, "units") ?? "";
  return /\ssince\s/i.test(units) || attributeText(v.attributes, "standard_name") === "time" ||
    (attributeText(v.attributes, "axis") ?? "").toUpperCase() === "T";
}

function attrsRecord(attrs: NetcdfAttribute[]): Record<string, string | (number | null)[]> {
  const out: Record<string, string | (number | null)[]> = {};
  for (const a of attrs) {
    out[a.name] = typeof a.value === "string"
      ? a.value
      : a.value.map((x) => (Number.isFinite(x) ? x : null));
  }
  return out;
}

/**
 * Every variable of a file with its CF role.
 *
 * @param header the file's header
 * @returns one summary per variable, in file order
 */
export function listCfVariables(header: NetcdfHeader): CfVariableSummary[] {
  const boundsNames = new Set<string>();
  for (const v of header.variables) {
    const b = attributeText(v.attributes, "bounds");
    if (b) boundsNames.add(b);
  }
  return header.variables.map((v) => ({
    name: v.name,
    type: v.type,
    dimensions: v.dimensions,
    shape: v.shape,
    role: boundsNames.has(v.name)
      ? "bounds"
      : v.dimensions.length === 1 && v.dimensions[0] === v.name
      ? "coordinate"
      : "data",
    time_dimension: timeDimensionOf(header, v),
    units: attributeText(v.attributes, "units") ?? null,
    standard_name: attributeText(v.attributes, "standard_name") ?? null,
    long_name: attributeText(v.attributes, "long_name") ?? null,
    attributes: attrsRecord(v.attributes),
  }));
}
