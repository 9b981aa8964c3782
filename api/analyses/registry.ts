/**
 * The one list of analyses (run kinds) the service offers. Adding an analysis is one folder in
 * `api/analyses/<kind>/` plus one line here: routes, OpenAPI, replay, bundles, worker tasks,
 * charts and the page's forms all derive from this list (see `api/analyses/derive.ts`).
 *
 * @module
 */
import type { RunKind } from "../runs/kind.ts";
import { smoothingKind } from "./smoothing/mod.ts";
import { cyclesKind } from "./cycles/mod.ts";
import { spectraKind } from "./spectra/mod.ts";
import { cycleFitsKind } from "./cycle_fits/mod.ts";
import { cycleForecastsKind } from "./cycle_forecasts/mod.ts";
import { energyBalanceKind } from "./energy_balance/mod.ts";
import { compositeKind } from "./composites/mod.ts";
import { attributionKind } from "./attributions/mod.ts";
import { lagCorrelationKind } from "./lag_correlations/mod.ts";
import { resampleKind } from "./resampling/mod.ts";
import { anomalyKind } from "./anomalies/mod.ts";
import { alignKind } from "./alignments/mod.ts";
import { irradianceDarkening } from "./irradiance_darkening/mod.ts";
import { irradianceModels } from "./irradiance_models/mod.ts";
import { irradianceReconstructions } from "./irradiance_reconstructions/mod.ts";
import { forcing } from "./forcing/mod.ts";
import { spectralIrradianceModels } from "./spectral_irradiance_models/mod.ts";
import { spectralIrradianceReconstructions } from "./spectral_irradiance_reconstructions/mod.ts";
import { solarSignalMapKind } from "./solar_signal_maps/mod.ts";
import { fieldAreaMeanKind } from "./field_area_means/mod.ts";
import { fieldCompositeKind } from "./field_composites/mod.ts";

export const RUN_KINDS: readonly RunKind[] = [
  smoothingKind,
  cyclesKind,
  spectraKind,
  cycleFitsKind,
  cycleForecastsKind,
  energyBalanceKind,
  compositeKind,
  attributionKind,
  lagCorrelationKind,
  resampleKind,
  anomalyKind,
  alignKind,
  irradianceDarkening,
  irradianceModels,
  irradianceReconstructions,
  spectralIrradianceModels,
  spectralIrradianceReconstructions,
  forcing,
  fieldAreaMeanKind,
  solarSignalMapKind,
  fieldCompositeKind,
];
