/**
 * Portable run bundles: one self-contained JSON document with a run record, every input series
 * in full, its whole lineage of runs (recursively: input runs, e.g. the calibrated model a
 * reconstruction cites, and the runs that made input series, e.g. the darkening run behind a
 * PSI series), parameters, versions, seed and result digest.
 *
 * Importing trusts nothing it is given. Every field of every record is checked against the
 * schemas the API itself uses (ids with the API's patterns, ISO 8601 times, series through the
 * upload checks, parameters through the kind's request schema, unknown fields refused) and a
 * malformed bundle is a 422 naming the fields. A well-formed bundle is then verified: content
 * ids recomputed from the points, each run recomputed from the bundled inputs and its digest
 * compared. Only then is anything written, and what is written is what the service computed
 * (normalised series, the parsed parameters, the recomputed result), never the bundle's copy;
 * `stored` is true only when every record was written. The importer holds what it imported.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import type { OutputSeries } from "../runs/kind.ts";
import type { Config } from "../config.ts";
import type { HolderSpec, RunRecord, Store, StoredSeries, Viewer } from "../store/types.ts";
import type { RunService } from "../runs/service.ts";
import { collectSeriesIds, resultDigest } from "../runs/service.ts";
import { ProblemError, toPointer } from "../problems.ts";
import { problems, ResolutionSchema, RunStatusSchema } from "../schemas/common.ts";
import { InlineSeries, SeriesId } from "../schemas/series_ref.ts";
import { RunIdString } from "../schemas/ids.ts";
import type { Lineage } from "../runs/inherit.ts";
import { storedFromNormalised } from "../series_codec.ts";
import { ingestJson } from "../ingest/mod.ts";
import { canonicalJson } from "../canonical.ts";
import { SERVICE_VERSION } from "../version.ts";
import { requireJson } from "./media.ts";
import { findUnknownFields } from "./unknown_fields.ts";
import { contentDisposition } from "./content_disposition.ts";
import { principalOf } from "../auth/authenticate.ts";
import { holderOf, isLimited, viewerOf } from "../auth/principal.ts";
import { mustSeeRun } from "../auth/access.ts";
import { checkStorage } from "../limits/quotas.ts";

export const BUNDLE_FORMAT = "sunlag-run-bundle";
export const BUNDLE_FORMAT_VERSION = 1;

const Version = z.string().min(1).max(40).regex(
  /^[0-9A-Za-z][0-9A-Za-z.+_-]*$/,
  "must be a version like 3 or 0.1.0",
);
const Timestamp = z.iso.datetime({ offset: false }).openapi({
  description: "ISO 8601 UTC date-time, e.g. 2026-01-01T12:00:00.000Z",
});

const BundleSeries = z.object({
  id: SeriesId,
  name: InlineSeries.shape.name,
  quantity: InlineSeries.shape.quantity,
  units: InlineSeries.shape.units,
  description: z.string().max(4000).nullable(),
  source: z.string().max(2000).nullable(),
  version: z.string().max(40).nullable(),
  resolution: ResolutionSchema,
  derived_from: RunIdString.nullable(),
  time: z.array(z.number()).min(1).max(5_000_000),
  value: z.array(z.number()).max(5_000_000),
  uncertainty: z.array(z.number()).max(5_000_000).nullable(),
}).openapi("BundleSeries");

const BundleRun = z.object({
  id: RunIdString,
  kind: z.string().min(1).max(100),
  created_at: Timestamp,
  updated_at: Timestamp,
  status: RunStatusSchema,
  progress: z.number().min(0).max(1),
  params: z.record(z.string(), z.unknown()),
  input_series: z.array(SeriesId).max(1000),
  input_runs: z.array(RunIdString).max(100),
  service_version: Version,
  algorithm_version: Version,
  seed: z.number().int().nullable(),
  result: z.record(z.string(), z.unknown()).nullable(),
  result_digest: z.string().regex(/^[0-9a-f]{64}$/, "must be 64 lowercase hex digits")
    .nullable(),
  error: z.record(z.string(), z.unknown()).nullable(),
  eta_seconds: z.number().nullable(),
}).openapi("BundleRun");

export const Bundle = z.object({
  format: z.literal(BUNDLE_FORMAT),
  format_version: z.literal(BUNDLE_FORMAT_VERSION),
  exported_at: Timestamp,
  exported_by: z.string().max(200),
  run: BundleRun,
  input_runs: z.array(BundleRun).max(100).openapi({
    description: "The main run's lineage, dependencies first: the runs it takes as inputs " +
      "and the runs that made its input series (derived_from), recursively",
  }),
  series: z.array(BundleSeries).max(1000),
}).openapi("Bundle");

type BundleT = z.infer<typeof Bundle>;

const Verification = z.object({
  verified: z.boolean(),
  stored: z.boolean(),
  run_id: z.string(),
  result_digest: z.string().nullable(),
  differences: z.array(z.object({ where: z.string(), message: z.string() })),
}).openapi("BundleVerification");

/**
 * Collect a run and its whole lineage, dependencies first: its input runs, and the runs that
 * made its input series (a series saved from a run output names that run in `derived_from`),
 * with their own inputs, recursively. Every part must be visible to `viewer`: a bundle never
 * carries what its caller could not fetch.
 */
async function collect(store: Store, run: RunRecord, viewer: Viewer) {
  const runs: RunRecord[] = [];
  const seenRuns = new Set<string>([run.id]);
  const series = new Map<string, StoredSeries>();
  const mustRun = async (id: string, why: string) => {
    const r = await store.runHolding(id, viewer) ? await store.getRun(id) : null;
    if (!r) {
      throw new ProblemError(
        "conflict",
        `${why} run ${id}, which is no longer stored or not shared with you`,
      );
    }
    return r;
  };
  const visitSeries = async (id: string, user: RunRecord) => {
    if (series.has(id)) return;
    const s = await store.seriesHolding(id, viewer) ? await store.getSeries(id) : null;
    if (!s) {
      throw new ProblemError(
        "conflict",
        `run ${user.id} uses series ${id}, which is no longer stored or not shared with you`,
      );
    }
    series.set(id, s);
    if (s.derived_from && !seenRuns.has(s.derived_from)) {
      seenRuns.add(s.derived_from);
      const maker = await mustRun(s.derived_from, `series ${id} was derived from`);
      await visitRun(maker);
      runs.push(maker);
    }
  };
  const visitRun = async (r: RunRecord): Promise<void> => {
    for (const sid of r.input_series) await visitSeries(sid, r);
    for (const rid of r.input_runs) {
      if (seenRuns.has(rid)) continue;
      seenRuns.add(rid);
      const dep = await mustRun(rid, `run ${r.id} depends on`);
      await visitRun(dep);
      runs.push(dep);
    }
  };
  await visitRun(run);
  return { runs, series: [...series.keys()].sort().map((id) => series.get(id)!) };
}

function seriesJson(s: StoredSeries) {
  return {
    id: s.id,
    name: s.name,
    quantity: s.quantity,
    units: s.units,
    description: s.description,
    source: s.source,
    version: s.version,
    resolution: s.resolution,
    derived_from: s.derived_from,
    time: Array.from(s.time),
    value: Array.from(s.value),
    uncertainty: s.uncertainty ? Array.from(s.uncertainty) : null,
  };
}

/** List where two JSON values differ (at most `limit` entries). */
export function jsonDifferences(a: unknown, b: unknown, limit = 20, path = ""): string[] {
  const out: string[] = [];
  const walk = (x: unknown, y: unknown, p: string) => {
    if (out.length >= limit) return;
    if (x === y) return;
    if (typeof x === "number" && typeof y === "number") {
      out.push(`${p || "/"}: bundled ${x}, recomputed ${y}`);
      return;
    }
    if (Array.isArray(x) && Array.isArray(y)) {
      if (x.length !== y.length) {
        out.push(`${p || "/"}: bundled length ${x.length}, recomputed ${y.length}`);
      }
      for (let i = 0; i < Math.min(x.length, y.length); i++) walk(x[i], y[i], `${p}/${i}`);
      return;
    }
    if (x && y && typeof x === "object" && typeof y === "object") {
      const keys = new Set([...Object.keys(x), ...Object.keys(y)]);
      for (const k of [...keys].sort()) {
        walk((x as Record<string, unknown>)[k], (y as Record<string, unknown>)[k], `${p}/${k}`);
      }
      return;
    }
    out.push(
      `${p || "/"}: bundled ${JSON.stringify(x)?.slice(0, 80)}, recomputed ${
        JSON.stringify(y)?.slice(0, 80)
      }`,
    );
  };
  walk(a, b, path);
  return out;
}

/** What verification found, and when it found nothing wrong, the records to store. */
export interface BundleVerification {
  differences: { where: string; message: string }[];
  /** Normalised series recomputed from the bundled points, by id. */
  series: Record<string, StoredSeries>;
  /** Run records as this service computed them, in dependency order. */
  runs: RunRecord[];
}

function sameJson(a: unknown, b: unknown): boolean {
  try {
    return canonicalJson(a) === canonicalJson(b);
  } catch {
    return false;
  }
}

/** Recompute one bundled series through the upload checks; its id must come out the same. */
async function verifySeries(
  s: BundleT["series"][number],
  where: string,
  differences: BundleVerification["differences"],
): Promise<StoredSeries | null> {
  const outcome = ingestJson({
    name: s.name,
    quantity: s.quantity,
    units: s.units,
    description: s.description,
    source: s.source,
    version: s.version,
    time: s.time,
    value: s.value,
    uncertainty: s.uncertainty,
  });
  if (!outcome.ok) {
    for (const e of outcome.errors.slice(0, 5)) {
      differences.push({ where: `${where}${e.pointer}`, message: e.message });
    }
    return null;
  }
  const stored = await storedFromNormalised(outcome.series, s.derived_from);
  if (stored.id !== s.id) {
    differences.push({
      where: `${where}/id`,
      message: `content of series ${s.id} hashes to ${stored.id}: the series was edited`,
    });
    return null;
  }
  if (stored.resolution !== s.resolution) {
    differences.push({
      where: `${where}/resolution`,
      message: `the points are ${stored.resolution}, the bundle says ${s.resolution}`,
    });
    return null;
  }
  return stored;
}

/** Verify one bundled run against this service; returns the record to store, or null. */
async function verifyRun(
  runs: RunService,
  rec: BundleT["run"],
  where: string,
  series: Record<string, StoredSeries>,
  verified: Map<string, RunRecord>,
  differences: BundleVerification["differences"],
): Promise<RunRecord | null> {
  const differ = (w: string, message: string) => {
    differences.push({ where: w, message });
    return null;
  };
  const kind = runs.kindOf(rec.kind);
  if (!kind) return differ(`${where}/kind`, `run kind "${rec.kind}" is unknown to this service`);
  if (rec.status !== "succeeded" || !rec.result || !rec.result_digest) {
    return differ(
      `${where}/status`,
      `run ${rec.id} has status ${rec.status}; only succeeded runs verify`,
    );
  }
  const claimed = await resultDigest(rec.result);
  if (claimed !== rec.result_digest) {
    differ(
      `${where}/result_digest`,
      `the bundled result hashes to ${claimed}, not the recorded digest ${rec.result_digest}: result or digest was edited`,
    );
  }
  if (kind.algorithmVersion !== rec.algorithm_version) {
    differ(
      `${where}/algorithm_version`,
      `algorithm of "${rec.kind}" is ${kind.algorithmVersion} here, ${rec.algorithm_version} in the bundle`,
    );
  }
  const parsed = kind.request.safeParse(rec.params);
  if (!parsed.success) {
    const first = parsed.error.issues.slice(0, 3)
      .map((i: { path: PropertyKey[]; message: string }) =>
        `${toPointer(i.path) || "/"}: ${i.message}`
      )
      .join("; ");
    return differ(`${where}/params`, `parameters do not validate for this kind: ${first}`);
  }
  const params = parsed.data as Record<string, unknown>;
  const unknown = findUnknownFields(rec.params, params, 3);
  if (unknown.errors.length) {
    return differ(
      `${where}/params`,
      `parameters this kind does not take: ${unknown.errors.map((e) => e.pointer).join(", ")}`,
    );
  }
  if (!sameJson(params, rec.params)) {
    return differ(
      `${where}/params`,
      "parameters are not as this service records them (every default filled in)",
    );
  }
  const inputSeries = [...collectSeriesIds(params).keys()].sort();
  const inputRuns = [...new Set(kind.runRefs?.(params as never) ?? [])].sort();
  if (!sameJson(inputSeries, rec.input_series) || !sameJson(inputRuns, rec.input_runs)) {
    return differ(`${where}/input_series`, "the input lists do not match the parameters");
  }
  const seed = typeof params.seed === "number" ? params.seed : null;
  if (seed !== rec.seed) return differ(`${where}/seed`, "the seed does not match the parameters");
  const missing = [
    ...inputSeries.filter((id) => !series[id]),
    ...inputRuns.filter((id) => !verified.has(id)),
  ];
  if (missing.length) {
    return differ(where, `inputs missing from the bundle or not verified: ${missing.join(", ")}`);
  }
  try {
    const inputs = {
      series: Object.fromEntries(inputSeries.map((id) => [id, series[id]])),
      runs: Object.fromEntries(inputRuns.map((id) => [id, verified.get(id)!])),
    };
    // the inherited context comes from the bundle's own lineage, verified before this run
    const lineage: Lineage = {
      run: (id) => Promise.resolve(verified.get(id) ?? null),
      seriesOrigin: (id) => Promise.resolve(series[id]?.derived_from ?? null),
    };
    const again = await runs.computeResult(kind, params, inputs, lineage);
    if (again.digest !== rec.result_digest) {
      differ(
        `${where}/result_digest`,
        `recomputed digest ${again.digest} differs from the recorded ${rec.result_digest}`,
      );
      for (const d of jsonDifferences(rec.result, again.result)) {
        differences.push({ where: `${where}/result`, message: d });
      }
      return null;
    }
    return {
      id: rec.id,
      kind: kind.kind,
      created_at: rec.created_at,
      updated_at: rec.updated_at,
      status: "succeeded",
      progress: 1,
      params,
      input_series: inputSeries,
      input_runs: inputRuns,
      service_version: rec.service_version,
      algorithm_version: kind.algorithmVersion,
      seed,
      result: again.result,
      result_digest: again.digest,
      error: null,
      eta_seconds: null,
    };
  } catch (e) {
    return differ(where, `recomputation failed: ${(e as Error).message}`);
  }
}

/** Verify a bundle; returns the differences and, when there are none, what to store. */
export async function verifyBundle(runs: RunService, b: BundleT): Promise<BundleVerification> {
  const differences: BundleVerification["differences"] = [];
  const series: Record<string, StoredSeries> = {};
  for (const [i, s] of b.series.entries()) {
    const stored = await verifySeries(s, `/series/${i}`, differences);
    if (stored) series[s.id] = stored;
  }
  const verified = new Map<string, RunRecord>();
  const all = [
    ...b.input_runs.map((r, i) => ({ r, where: `/input_runs/${i}` })),
    { r: b.run, where: "/run" },
  ];
  const seen = new Set<string>();
  for (const { r, where } of all) {
    if (seen.has(r.id)) {
      differences.push({ where: `${where}/id`, message: `run ${r.id} appears twice` });
      continue;
    }
    seen.add(r.id);
    const record = await verifyRun(runs, r, where, series, verified, differences);
    if (record) verified.set(record.id, record);
  }
  differences.push(...await checkDerivedSeries(runs, b, verified));
  return { differences, series, runs: [...verified.values()] };
}

/**
 * Every bundled series that names a bundled run in `derived_from` must be an output of that
 * run as this service saves it (same content id), so lineage cannot be claimed falsely.
 */
async function checkDerivedSeries(
  runs: RunService,
  b: BundleT,
  verified: Map<string, RunRecord>,
): Promise<{ where: string; message: string }[]> {
  const out: { where: string; message: string }[] = [];
  const bundled = new Set([...b.input_runs.map((r) => r.id), b.run.id]);
  for (const [i, s] of b.series.entries()) {
    if (!s.derived_from || !bundled.has(s.derived_from)) continue;
    const maker = verified.get(s.derived_from);
    if (!maker) continue; // its own verification failed and was reported
    const outputs = (maker.result?.outputs ?? {}) as Record<string, OutputSeries>;
    let found = false;
    for (const o of Object.values(outputs)) {
      try {
        if ((await runs.codec.fromOutput(o, maker.id)).id === s.id) found = true;
      } catch {
        // an output that is not a calendar series cannot be the one saved
      }
      if (found) break;
    }
    if (!found) {
      out.push({
        where: `/series/${i}/derived_from`,
        message: `series ${s.id} is not an output of run ${s.derived_from}, which it names`,
      });
    }
  }
  return out;
}

/**
 * Write what a verified bundle holds, for `holder`: series, then runs in dependency order. A
 * run already stored (the same bundle imported before, by anyone) gains a holding when its
 * digest is the one verified; a different run under the same id is refused before anything
 * is written.
 */
async function storeVerified(
  store: Store,
  v: BundleVerification,
  holder: HolderSpec,
): Promise<{ where: string; message: string }[]> {
  for (const r of v.runs) {
    const existing = await store.getRun(r.id);
    if (existing && existing.result_digest !== r.result_digest) {
      return [{ where: "/run/id", message: `run id ${r.id} is already used by a different run` }];
    }
  }
  for (const s of Object.values(v.series)) await store.putSeries(s, holder);
  for (const r of v.runs) {
    if (await store.getRun(r.id)) await store.addRunHolding(r.id, holder);
    else await store.putRun(r, holder);
  }
  return [];
}

export function registerBundleRoutes(
  app: App,
  deps: { store: Store; runs: RunService; config?: Config },
): void {
  const { store, runs } = deps;

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/bundle",
      tags: ["Runs"],
      summary: "A self-contained, portable JSON bundle of a run and all of its inputs",
      request: {
        params: z.object({ id: RunIdString.openapi({ param: { name: "id", in: "path" } }) }),
      },
      responses: {
        200: { description: "The bundle", content: { "application/json": { schema: Bundle } } },
        ...problems(404, 409, 422),
      },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const principal = principalOf(c);
      await mustSeeRun(store, principal, id);
      const run = await store.getRun(id);
      if (!run) throw new ProblemError("not-found", `No run has id ${id}`);
      if (run.status !== "succeeded") {
        throw new ProblemError(
          "conflict",
          `Run ${id} has status ${run.status}; only succeeded runs can be bundled`,
        );
      }
      const { runs: deps, series } = await collect(store, run, viewerOf(principal));
      const onField = [run, ...deps].find((r) => (r.input_fields?.length ?? 0) > 0);
      if (onField) {
        throw new ProblemError(
          "conflict",
          `Run ${onField.id} uses gridded field(s) ${onField.input_fields!.join(", ")}, which a ` +
            "JSON bundle does not carry (a field may be 200 MB): replay the run here, or upload " +
            "the same NetCDF file to the other instance (it gets the same field id) and run the " +
            "same request there",
          { fields: onField.input_fields },
        );
      }
      c.header("Content-Disposition", contentDisposition(`sunlag-run-${run.id}.json`));
      return c.json({
        format: BUNDLE_FORMAT,
        format_version: BUNDLE_FORMAT_VERSION,
        exported_at: new Date().toISOString(),
        exported_by: `sunlag ${SERVICE_VERSION}`,
        run,
        input_runs: deps,
        series: series.map(seriesJson),
      } as never, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/bundles",
      tags: ["Runs"],
      summary:
        "Import a bundle: check content ids and digests, recompute, store only when verified",
      middleware: [requireJson()] as const,
      request: { body: { required: true, content: { "application/json": { schema: Bundle } } } },
      responses: {
        200: {
          description: "Verification outcome (verified or not, with differences)",
          content: { "application/json": { schema: Verification } },
        },
        ...problems(400, 401, 403, 413, 415, 422, 429),
      },
    }),
    async (c) => {
      const b = c.req.valid("json");
      const unknown = findUnknownFields(await c.req.json(), b);
      if (unknown.errors.length) {
        throw new ProblemError(
          "validation",
          `The bundle has ${
            unknown.errors.length + unknown.omitted
          } field(s) the format does not know`,
          { errors: unknown.errors, errors_omitted: unknown.omitted },
        );
      }
      const principal = principalOf(c);
      const v = await verifyBundle(runs, b);
      const differences = [...v.differences];
      let stored = false;
      if (differences.length === 0) {
        if (isLimited(principal) && deps.config) {
          const bytes = Object.values(v.series).reduce((a, s) => a + s.n * 24, 0) +
            v.runs.reduce((a, r) => a + JSON.stringify(r.result).length, 0);
          await checkStorage(store, principal.owner!, bytes, deps.config.quotas);
        }
        differences.push(...await storeVerified(store, v, holderOf(principal)));
        stored = differences.length === 0;
      }
      return c.json({
        verified: v.differences.length === 0,
        stored,
        run_id: b.run.id,
        result_digest: stored ? v.runs[v.runs.length - 1].result_digest : b.run.result_digest,
        differences: differences.slice(0, 50),
      }, 200);
    },
  );
}
