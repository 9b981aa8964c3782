/**
 * A 1-D variable along a CF time coordinate, read as a series: decoded times (on sunlag's axis),
 * values with `_FillValue`/`missing_value` masked and `scale_factor`/`add_offset` applied, and
 * an uncertainty variable when one is named or linked through `ancillary_variables` with a
 * `standard_error` standard name (CF conventions 1.10, §3.4 ancillary data, Appendix C).
 *
 * @module
 */
import { cfMaskAndScale } from "../../core/cf/cf_mask_and_scale.ts";
import {
  attributeText,
  type NetcdfAttribute,
  type NetcdfVariableInfo,
} from "../../core/cf/netcdf_model.ts";
import { type CfPlacedTimeAxis, placeCfTimeAxis, readCfTimeAxis } from "./cf_time_axis.ts";
import { packingOf, timeDimensionOf } from "./cf_variables.ts";
import { NetcdfError, shown } from "./errors.ts";
import { type NetcdfSource, variableOf } from "./source.ts";

/** A series read from a file. */
export interface CfSeries {
  variable: string;
  time: CfPlacedTimeAxis;
  /** Decoded values; NaN where missing. */
  values: Float64Array;
  /** Decoded one-sigma uncertainty, or null. */
  uncertainty: Float64Array | null;
  uncertaintyVariable: string | null;
  /** xarray's dtype of the decoded values (`float32`, `float64`, ...). */
  decodedType: string;
  attributes: NetcdfAttribute[];
}

/** Options of {@link readCfSeries}. */
export interface CfSeriesOptions {
  /**
   * Name of the uncertainty variable. Default: the first variable listed in
   * `ancillary_variables` whose `standard_name` ends in "standard_error".
   */
  uncertainty?: string;
}

/** Dimensions of `v` other than those of size 1. */
function squeezed(v: NetcdfVariableInfo): string[] {
  return v.dimensions.filter((_, i) => v.shape[i] !== 1);
}

/**
 * Read a variable as a series along its time dimension (dimensions of size 1 are dropped).
 *
 * @param src the open file
 * @param name the variable
 * @param options the uncertainty variable
 * @returns the series
 * @throws {NetcdfError} `unknown_variable`, `wrong_dimensions` (no time dimension, or other
 *   dimensions longer than 1), `not_numeric`, `bad_coordinate` (time not decodable)
 */
export async function readCfSeries(
  src: NetcdfSource,
  name: string,
  options: CfSeriesOptions = {},
): Promise<CfSeries> {
  const v = variableOf(src.header, name);
  if (v.type === "char" || v.type === "string") {
    throw new NetcdfError("not_numeric", `Variable "${shown(name)}" holds text, not numbers`, {
      variable: name,
    });
  }
  const dims = squeezed(v);
  const tdim = timeDimensionOf(src.header, v);
  if (tdim === null || dims.length !== 1 || dims[0] !== tdim) {
    const desc = v.dimensions.length
      ? `(${v.dimensions.map((d, i) => `${d}=${v.shape[i]}`).join(", ")})`
      : "no dimensions";
    throw new NetcdfError(
      "wrong_dimensions",
      tdim === null
        ? `Variable "${shown(name)}" has ${desc} and none of them is a CF time coordinate ` +
          '(a variable named after its dimension with units "<unit> since <date>")'
        : `Variable "${shown(name)}" has ${desc}: a series needs exactly one dimension longer ` +
          `than 1, its time dimension "${tdim}"; select one cell first, or upload it as a field`,
      { variable: name },
    );
  }
  const time = placeCfTimeAxis(await readCfTimeAxis(src, tdim));
  const decoded = cfMaskAndScale(await src.read(name), v.type, packingOf(v));
  const values = decoded.values instanceof Float64Array
    ? decoded.values
    : Float64Array.from(decoded.values);
  const uName = options.uncertainty ?? linkedUncertainty(src, v);
  let uncertainty: Float64Array | null = null;
  if (uName) {
    const u = variableOf(src.header, uName);
    if (squeezed(u).length !== 1 || squeezed(u)[0] !== tdim) {
      throw new NetcdfError(
        "wrong_dimensions",
        `Uncertainty variable "${shown(uName)}" must run along "${tdim}" like "${shown(name)}"`,
        { variable: uName },
      );
    }
    uncertainty = Float64Array.from(
      cfMaskAndScale(await src.read(uName), u.type, packingOf(u)).values,
    );
  }
  return {
    variable: name,
    time,
    values,
    uncertainty,
    uncertaintyVariable: uName ?? null,
    decodedType: decoded.type,
    attributes: v.attributes,
  };
}

function linkedUncertainty(src: NetcdfSource, v: NetcdfVariableInfo): string | undefined {
  const list = (attributeText(v.attributes, "ancillary_variables") ?? "").split(/\s+/);
  for (const n of list) {
    const a = src.header.variables.find((x) => x.name === n);
    if (a && /standard_error$/.test(attributeText(a.attributes, "standard_name") ?? "")) return n;
  }
  return undefined;
}
