/**
 * A CF-1.10 dataset of a spectrum over time (a spectral reconstruction's `SpectrumOverTime`),
 * on a chosen CF calendar, for the NetCDF-3 writer:
 *
 * - `time` and `time_bnds` as for every series (series_dataset.ts);
 * - `wavelength` (nm) at each band's centre, with `bounds: wavelength_bnds` holding the band
 *   bounds (CF conventions 1.10, §7.1 cell boundaries) and the standard name
 *   `radiation_wavelength` (from memory, as every standard name here: no copy of the table is
 *   packaged);
 * - the values (time, wavelength) with their `units` (W m-2 nm-1 for band means per nm, with
 *   the standard name `solar_irradiance_per_unit_wavelength`, whose canonical units W m-2 m-1
 *   UDUNITS converts; W m-2 for irradiance over each band, no standard name), `cell_methods`
 *   "time: mean wavelength: mean" for band means, and the one-sigma uncertainty as an
 *   ancillary variable;
 * - the interval's bounds as `<name>_lower`/`<name>_upper` when they are not value ± quantile ×
 *   uncertainty (an ensemble's quantiles);
 * - optionally the ensemble: `<name>_realizations` (realization, time, wavelength) as float,
 *   written one member at a time, with the `realization` coordinate (standard name
 *   `realization`, common practice for ensembles in CF files);
 * - the provenance, warnings and cautions of every file sunlag writes.
 *
 * @module
 */
import { ncNumber, ncText } from "../../core/cf/netcdf_model.ts";
import type { NetcdfWriteDataset, NetcdfWriteVariable } from "../../core/cf/netcdf3_write.ts";
import type { CfCalendar } from "../../core/time/mod.ts";
import type { SpectrumBlockIn } from "../analyses/common/spectrum_block.ts";
import { type Provenance, provenanceAttributes, timeAxisOf } from "./series_dataset.ts";

/** CF standard name of band-mean spectral irradiance (from memory). */
export const SPECTRAL_IRRADIANCE_STANDARD_NAME = "solar_irradiance_per_unit_wavelength";

/** Members of a spectral ensemble, streamed one at a time. */
export interface SpectrumEnsembleSource {
  /** Number of members (the `realization` dimension). */
  members: number;
  /** Member `k` (0-based): per band, its values on the spectrum's time axis. */
  member(k: number): ArrayLike<number>[];
}

/**
 * Build the CF dataset of a spectrum on a calendar.
 *
 * @param s the spectrum (bands in nm, values per band and time)
 * @param prov provenance for the global attributes
 * @param calendar target calendar (default standard)
 * @param ensemble members of every band, when the run has them
 * @returns the dataset, the calendar-conversion text and the input time indices dropped
 * @throws {CfTimeError} when the calendar cannot hold the spectrum's resolution
 */
export function buildSpectrumDataset(
  s: SpectrumBlockIn,
  prov: Provenance,
  calendar: CfCalendar = "standard",
  ensemble?: SpectrumEnsembleSource,
): { dataset: NetcdfWriteDataset; method: string; dropped: number[] } {
  const t = timeAxisOf(s.time, undefined, calendar);
  const kept = t.axis.kept, n = kept.length, m = s.bands.length;
  const perNm = s.quantity === "spectral_irradiance";
  const name = perNm ? "ssi" : "band_irradiance";
  const cellMethods = `${t.period} wavelength: mean`;
  const fill = ncNumber("_FillValue", "double", NaN);
  const rows = (values: (number | null)[][]) => ({
    rows: n,
    row: (i: number) => {
      const out = new Float64Array(m);
      for (let b = 0; b < m; b++) {
        const v = values[b][kept[i]];
        out[b] = v === null || v === undefined ? NaN : v;
      }
      return out;
    },
  });
  const bounds = new Float64Array(2 * m);
  s.bands.forEach((b, k) => {
    bounds[2 * k] = b.lower;
    bounds[2 * k + 1] = b.upper;
  });
  const variables: NetcdfWriteVariable[] = [
    ...t.variables,
    {
      name: "wavelength",
      type: "double",
      dimensions: ["wavelength"],
      attributes: [
        ncText("standard_name", "radiation_wavelength"),
        ncText("long_name", "wavelength at the centre of the band"),
        ncText("units", "nm"),
        ncText("bounds", "wavelength_bnds"),
      ],
      data: Float64Array.from(s.bands, (b) => (b.lower + b.upper) / 2),
    },
    {
      name: "wavelength_bnds",
      type: "double",
      dimensions: ["wavelength", "bnds"],
      attributes: [ncText("units", "nm")],
      data: bounds,
    },
    {
      name,
      type: "double",
      dimensions: ["time", "wavelength"],
      attributes: [
        fill,
        ncText("long_name", s.name),
        ncText("units", s.units),
        ...(perNm ? [ncText("standard_name", SPECTRAL_IRRADIANCE_STANDARD_NAME)] : []),
        ncText("cell_methods", cellMethods),
        ncText("ancillary_variables", `${name}_uncertainty`),
        ncText(
          "comment",
          `${s.description}. ${
            perNm
              ? "Band mean per nm: the irradiance of a band is the value times its width."
              : "Irradiance integrated over each band."
          } ${
            s.lower
              ? `The ${s.interval} of each band is [${name}_lower, ${name}_upper].`
              : `The ${s.interval} of band k is value ± interval_quantile[k] × uncertainty.`
          }`,
        ),
      ],
      data: rows(s.value),
    },
    {
      name: `${name}_uncertainty`,
      type: "double",
      dimensions: ["time", "wavelength"],
      attributes: [
        fill,
        ncText("long_name", `standard uncertainty (1 sigma) of ${s.name}`),
        ncText("units", s.units),
        ...(perNm
          ? [ncText("standard_name", `${SPECTRAL_IRRADIANCE_STANDARD_NAME} standard_error`)]
          : []),
        ncText("cell_methods", cellMethods),
      ],
      data: rows(s.uncertainty),
    },
    {
      name: "interval_quantile",
      type: "double",
      dimensions: ["wavelength"],
      attributes: [
        ncText("long_name", `multiplier of the uncertainty for the ${s.interval}`),
        ncText("units", "1"),
      ],
      data: Float64Array.from(s.interval_quantiles),
    },
  ];
  for (const [key, arr] of [["lower", s.lower], ["upper", s.upper]] as const) {
    if (!arr) continue;
    variables.push({
      name: `${name}_${key}`,
      type: "double",
      dimensions: ["time", "wavelength"],
      attributes: [
        fill,
        ncText("long_name", `${key} bound of the ${s.interval} of ${s.name}`),
        ncText("units", s.units),
        ncText("cell_methods", cellMethods),
      ],
      data: rows(arr),
    });
  }
  const dimensions = [...t.dimensions, { name: "wavelength", size: m }];
  if (ensemble) {
    dimensions.push({ name: "realization", size: ensemble.members });
    variables.push({
      name: "realization",
      type: "int",
      dimensions: ["realization"],
      attributes: [ncText("standard_name", "realization"), ncText("long_name", "ensemble member")],
      data: Int32Array.from({ length: ensemble.members }, (_, k) => k + 1),
    }, {
      name: `${name}_realizations`,
      type: "float",
      dimensions: ["realization", "time", "wavelength"],
      attributes: [
        ncNumber("_FillValue", "float", NaN),
        ncText("long_name", `${s.name}: ensemble members`),
        ncText("units", s.units),
        ...(perNm ? [ncText("standard_name", SPECTRAL_IRRADIANCE_STANDARD_NAME)] : []),
        ncText("cell_methods", cellMethods),
        ncText(
          "comment",
          "Members drawn jointly across bands: a member of an integral over wavelength is the " +
            "weighted sum of that member's bands.",
        ),
      ],
      data: {
        rows: ensemble.members,
        row: (k) => {
          const member = ensemble.member(k);
          const out = new Float32Array(n * m);
          for (let i = 0; i < n; i++) {
            for (let b = 0; b < m; b++) {
              const v = member[b][kept[i]];
              out[i * m + b] = Number.isFinite(v) ? v : NaN;
            }
          }
          return out;
        },
      },
    });
  }
  if (!dimensions.some((d) => d.name === "bnds")) dimensions.push({ name: "bnds", size: 2 });
  return {
    dataset: {
      dimensions,
      attributes: provenanceAttributes(prov, [ncText("calendar_conversion", t.axis.method)]),
      variables,
    },
    method: t.axis.method,
    dropped: t.axis.dropped,
  };
}
