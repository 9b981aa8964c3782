/**
 * Loading the SYNTHETIC demo scenario (fixtures/demo/, made by `deno task demo`) into a store.
 * `deno task start` calls {@link loadDemo} on an empty store so every README example has data.
 *
 * Each CSV named in fixtures/demo/manifest.json goes through the same text ingester as an
 * upload (`ingestText` with the manifest's column names and metadata), so a demo series has
 * exactly the id the same file would get from `POST /v1/series`.
 *
 * @module
 */
import { ingestText } from "./ingest/mod.ts";
import type { TextIngestOptions } from "./ingest/mod.ts";
import type { Store, StoredSeries } from "./store/types.ts";
import { LOCAL_OWNER } from "./store/types.ts";
import { storedFromNormalised } from "./series_codec.ts";
import { withNetcdf } from "./netcdf/open.ts";
import { storeNetcdfField } from "./fields/ingest.ts";
import type { QUANTITIES } from "../core/series/quantities.ts";

/** One NetCDF field entry of the demo manifest. */
export interface DemoFieldEntry {
  file: string;
  format: "netcdf";
  variable: string;
  upload: {
    name: string;
    quantity: (typeof QUANTITIES)[number];
    units: string;
    description: string;
    source: string;
  };
}

/** One CSV entry of the demo manifest. */
export interface DemoFileEntry {
  file: string;
  format: "csv";
  delimiter: string;
  time_column: string;
  value_column: string;
  uncertainty_column?: string;
  /** For a band of the spectral record: its bounds in nm. */
  band_nm?: { lower: number; upper: number };
  upload: {
    name: string;
    quantity: string;
    units: string;
    version: string | null;
    description: string;
    source: string;
  };
}

/** Where the demo files live. */
export const DEMO_DIR: URL = new URL("../fixtures/demo/", import.meta.url);

const DELIMITERS: Record<string, TextIngestOptions["delimiter"]> = {
  ",": "comma",
  ";": "semicolon",
  "\t": "tab",
};

/** The manifest's CSV entries, in manifest order. */
export async function demoFileEntries(dir: URL = DEMO_DIR): Promise<DemoFileEntry[]> {
  const manifest = JSON.parse(await Deno.readTextFile(new URL("manifest.json", dir)));
  return (manifest.files as { format: string }[])
    .filter((f): f is DemoFileEntry => f.format === "csv");
}

/** The ingest options the loader passes for one manifest entry. */
export function demoIngestOptions(entry: DemoFileEntry): TextIngestOptions {
  return {
    name: entry.upload.name,
    quantity: entry.upload.quantity,
    units: entry.upload.units,
    description: entry.upload.description,
    source: entry.upload.source,
    version: entry.upload.version,
    time: entry.time_column,
    value: entry.value_column,
    uncertainty: entry.uncertainty_column,
    delimiter: DELIMITERS[entry.delimiter] ?? "auto",
    time_format: "iso",
  };
}

/**
 * Read and ingest every demo series (nothing is stored).
 *
 * @throws {Error} when a demo file does not ingest (a broken checkout), naming the file and
 *   the first problems
 */
export async function readDemoSeries(
  dir: URL = DEMO_DIR,
): Promise<{ file: string; series: StoredSeries }[]> {
  const out: { file: string; series: StoredSeries }[] = [];
  for (const entry of await demoFileEntries(dir)) {
    const text = await Deno.readTextFile(new URL(entry.file, dir));
    const r = ingestText(text, demoIngestOptions(entry));
    if (!r.ok) {
      const first = r.errors.slice(0, 3).map((e) =>
        `${e.row ? `line ${e.row}: ` : ""}${e.message}`
      );
      throw new Error(`Cannot load demo file ${entry.file}: ${first.join("; ")}`);
    }
    out.push({ file: entry.file, series: await storedFromNormalised(r.series, null) });
  }
  return out;
}

/** The manifest's gridded-field entries, in manifest order. */
export async function demoFieldEntries(dir: URL = DEMO_DIR): Promise<DemoFieldEntry[]> {
  const manifest = JSON.parse(await Deno.readTextFile(new URL("manifest.json", dir)));
  return (manifest.files as { format: string }[])
    .filter((f): f is DemoFieldEntry => f.format === "netcdf");
}

/**
 * Store every demo field (the same decoding as `POST /v1/fields`, so a demo field has the id
 * the same file would get when uploaded with the manifest's options). Idempotent.
 *
 * @returns the field ids in manifest order
 */
export async function loadDemoFields(store: Store, dir: URL = DEMO_DIR): Promise<string[]> {
  const ids: string[] = [];
  for (const e of await demoFieldEntries(dir)) {
    const out = await withNetcdf(
      new URL(e.file, dir).pathname,
      (src) => storeNetcdfField(src, store, { variable: e.variable, ...e.upload }, {}),
    );
    ids.push(out.field.id);
  }
  return ids;
}

/**
 * Store every demo series and field, and return the series ids in manifest order (the fields'
 * ids come from {@link loadDemoFields}). Idempotent: what is already present (same content,
 * same id) is left as it is. The band series of the spectral record are stored first, so
 * listings (newest first) open with the demo's main series.
 *
 * @param store the store to fill (normally an empty one)
 * @returns the stored series ids
 */
export async function loadDemo(
  store: Store,
): Promise<string[]> {
  const entries = await demoFileEntries();
  const read = await readDemoSeries();
  // the 32 band series of the spectral record first, so that listings (newest first) open
  // with the demo's main series
  const order = read.map((_, i) => i);
  order.sort((a, b) => Number(!entries[a].band_nm) - Number(!entries[b].band_nm));
  for (const i of order) {
    // stamped when stored (the time it means), so the listing's order is the storing order
    const series = { ...read[i].series, created_at: new Date().toISOString() };
    // Public: on a shared instance every owner may try the demo.
    await store.putSeries(series, { owner: LOCAL_OWNER, visibility: "public" });
  }
  await loadDemoFields(store);
  return read.map((r) => r.series.id);
}
