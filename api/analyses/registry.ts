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
import { energyBalanceKind } from "../kinds/energy_balance.ts";
import { compositeKind } from "../kinds/composites.ts";
import { attributionKind } from "../kinds/attributions.ts";
import { lagCorrelationKind } from "../kinds/lag_correlations.ts";
import { resampleKind } from "../kinds/resample.ts";
import { anomalyKind } from "../kinds/anomaly.ts";
import { alignKind } from "../kinds/align.ts";
import { irradianceDarkening } from "../kinds/irradiance_darkening.ts";
import { irradianceModels } from "../kinds/irradiance_models.ts";
import { irradianceReconstructions } from "../kinds/irradiance_reconstructions.ts";
import { forcing } from "../kinds/forcing.ts";

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
  forcing,
];
