/**
 * A (time, wavelength) variable read as a spectral record: the decoded CF time axis, the
 * wavelength bands from the wavelength coordinate's `bounds` variable (CF conventions 1.10,
 * §7.1 cell boundaries; `wavelength_bnds` by convention), and each band's values with
 * `_FillValue`/`missing_value` masked and `scale_factor`/`add_offset` applied. Wavelengths in
 * m, µm or nm (UDUNITS spellings) are given in nm; bands are returned in increasing
 * wavelength whatever the file's order.
 *
 * @module
 */
import { cfMaskAndScale } from "../../core/cf/cf_mask_and_scale.ts";
import { attributeText, type NetcdfAttribute } from "../../core/cf/netcdf_model.ts";
import { type CfPlacedTimeAxis, placeCfTimeAxis, readCfTimeAxis } from "./cf_time_axis.ts";
import { packingOf, timeDimensionOf } from "./cf_variables.ts";
import { NetcdfError, shown } from "./errors.ts";
import { type NetcdfSource, variableOf } from "./source.ts";

/** A spectral record read from a file. */
export interface CfSpectrum {
  variable: string;
  time: CfPlacedTimeAxis;
  /** Band bounds in nm, increasing. */
  bands: { lower: number; upper: number }[];
  /** Per band (same order), its decoded values along time; NaN where missing. */
  values: Float64Array[];
  /** The wavelength coordinate and its bounds variable, as named in the file. */
  wavelengthVariable: string;
  boundsVariable: string;
  attributes: NetcdfAttribute[];
}

/** nm per unit of a wavelength unit (UDUNITS spellings), or undefined. */
const WAVELENGTH_UNITS: Record<string, number> = {
  nm: 1,
  nanometer: 1,
  nanometers: 1,
  nanometre: 1,
  nanometres: 1,
  m: 1e9,
  meter: 1e9,
  meters: 1e9,
  metre: 1e9,
  metres: 1e9,
  um: 1e3,
  "µm": 1e3,
  micron: 1e3,
  microns: 1e3,
  micrometer: 1e3,
  micrometers: 1e3,
  micrometre: 1e3,
  micrometres: 1e3,
};

/**
 * Read a variable of dimensions (time, wavelength) (in either order; dimensions of size 1
 * dropped) as a spectral record.
 *
 * @param src the open file
 * @param name the variable
 * @returns the record
 * @throws {NetcdfError} `unknown_variable`, `not_numeric`, `wrong_dimensions` (not exactly a
 *   time and one other dimension), `bad_coordinate` (no coordinate variable or no `bounds`
 *   for the wavelength dimension, bounds not (n, 2), unknown or missing wavelength units,
 *   bands that overlap or are empty, undecodable time)
 */
export async function readCfSpectrum(src: NetcdfSource, name: string): Promise<CfSpectrum> {
  const v = variableOf(src.header, name);
  if (v.type === "char" || v.type === "string") {
    throw new NetcdfError("not_numeric", `Variable "${shown(name)}" holds text, not numbers`, {
      variable: name,
    });
  }
  const tdim = timeDimensionOf(src.header, v);
  const others = v.dimensions.filter((d, i) => d !== tdim && v.shape[i] !== 1);
  const desc = `(${v.dimensions.map((d, i) => `${d}=${v.shape[i]}`).join(", ")})`;
  if (tdim === null || others.length !== 1) {
    throw new NetcdfError(
      "wrong_dimensions",
      tdim === null
        ? `Variable "${shown(name)}" has ${desc} and none of them is a CF time coordinate`
        : `Variable "${shown(name)}" has ${desc}: a spectral record needs its time dimension ` +
          `"${tdim}" and exactly one wavelength dimension`,
      { variable: name },
    );
  }
  const wdim = others[0];
  const bands = await wavelengthBands(src, wdim, name);
  const time = placeCfTimeAxis(await readCfTimeAxis(src, tdim));
  const decoded = cfMaskAndScale(await src.read(name), v.type, packingOf(v)).values;
  const nt = v.shape[v.dimensions.indexOf(tdim)];
  const nw = bands.order.length;
  // the stored order: time first or wavelength first (dimensions of size 1 have stride 1)
  const timeFirst = v.dimensions.indexOf(tdim) < v.dimensions.indexOf(wdim);
  const values = bands.order.map((k) => {
    const out = new Float64Array(nt);
    for (let i = 0; i < nt; i++) out[i] = decoded[timeFirst ? i * nw + k : k * nt + i];
    return out;
  });
  return {
    variable: name,
    time,
    bands: bands.bounds,
    values,
    wavelengthVariable: wdim,
    boundsVariable: bands.boundsName,
    attributes: v.attributes,
  };
}

/** The bands of the wavelength dimension, in nm, sorted, with the file order of each. */
async function wavelengthBands(
  src: NetcdfSource,
  wdim: string,
  dataName: string,
): Promise<{ bounds: { lower: number; upper: number }[]; order: number[]; boundsName: string }> {
  const bad = (message: string) =>
    new NetcdfError("bad_coordinate", message, { variable: dataName });
  const coord = src.header.variables.find((x) => x.name === wdim);
  if (!coord) {
    throw bad(
      `Dimension "${shown(wdim)}" of "${shown(dataName)}" has no coordinate variable: the ` +
        "wavelengths and their bounds are needed",
    );
  }
  const boundsName = attributeText(coord.attributes, "bounds");
  const bv = boundsName ? src.header.variables.find((x) => x.name === boundsName) : undefined;
  if (!boundsName || !bv) {
    throw bad(
      `The wavelength coordinate "${shown(wdim)}" has no bounds variable (attribute bounds, ` +
        "e.g. wavelength_bnds): band bounds cannot be guessed from band centres",
    );
  }
  const n = coord.shape[0];
  if (bv.dimensions.length !== 2 || bv.dimensions[0] !== wdim || bv.shape[1] !== 2) {
    throw bad(`The bounds variable "${shown(boundsName)}" must have dimensions (${wdim}, 2)`);
  }
  const unitsText = (attributeText(bv.attributes, "units") ??
    attributeText(coord.attributes, "units") ?? "").trim();
  const toNm = WAVELENGTH_UNITS[unitsText];
  if (toNm === undefined) {
    throw bad(
      `The wavelength units "${shown(unitsText || "(none)")}" are not a length sunlag reads ` +
        "(nm, um, m)",
    );
  }
  const raw = cfMaskAndScale(await src.read(boundsName), bv.type, packingOf(bv)).values;
  const pairs = Array.from({ length: n }, (_, k) => {
    const a = raw[2 * k] * toNm, b = raw[2 * k + 1] * toNm;
    return { k, lower: Math.min(a, b), upper: Math.max(a, b) };
  });
  pairs.sort((p, q) => p.lower - q.lower);
  pairs.forEach((p, i) => {
    if (
      !Number.isFinite(p.lower) || !Number.isFinite(p.upper) || !(p.upper > p.lower) || p.lower <= 0
    ) {
      throw bad(`Band ${p.k} of "${shown(boundsName)}" is not a band of positive width`);
    }
    if (i > 0 && p.lower < pairs[i - 1].upper) {
      throw bad(
        `Bands ${pairs[i - 1].k} and ${p.k} of "${shown(boundsName)}" overlap ` +
          `([${pairs[i - 1].lower}, ${pairs[i - 1].upper}) and [${p.lower}, ${p.upper}) nm)`,
      );
    }
  });
  return {
    bounds: pairs.map((p) => ({ lower: p.lower, upper: p.upper })),
    order: pairs.map((p) => p.k),
    boundsName,
  };
}
