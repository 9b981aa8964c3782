/**
 * Ids of the demo series (content hashes of fixtures/demo/, the same on every machine), from
 * the one list the API's request examples use (api/schemas/examples.ts).
 *
 * @module
 */
import { DEMO_FIELD, DEMO_SERIES } from "../../api/schemas/examples.ts";

export const { SSN, AREA, MG, TSI, TSIM, TEMP, ENSO, AOD } = DEMO_SERIES;
/** The demo's gridded field (monthly 10° air temperature; a field id, not a series id). */
export const FIELD = DEMO_FIELD;
