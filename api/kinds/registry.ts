/**
 * Every run kind the service offers. Adding an analysis = one file in `api/kinds/` plus one
 * line here; routes, OpenAPI, replay, bundles and workers pick it up from this list.
 *
 * @module
 */
import type { RunKind } from "../runs/kind.ts";
import { smoothingKind } from "./smoothing.ts";
import { cyclesKind } from "./cycles.ts";
import { spectraKind } from "./spectra.ts";
import { cycleFitsKind } from "./cycle_fits.ts";
import { cycleForecastsKind } from "./cycle_forecasts.ts";
import { energyBalanceKind } from "./energy_balance.ts";
import { compositeKind } from "./composites.ts";
import { attributionKind } from "./attributions.ts";
import { lagCorrelationKind } from "./lag_correlations.ts";
import { resampleKind } from "./resample.ts";
import { anomalyKind } from "./anomaly.ts";
import { alignKind } from "./align.ts";
import { irradianceDarkening } from "./irradiance_darkening.ts";
import { irradianceModels } from "./irradiance_models.ts";
import { irradianceReconstructions } from "./irradiance_reconstructions.ts";
import { forcing } from "./forcing.ts";

export const RUN_KINDS: RunKind[] = [
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
  forcing,
];
