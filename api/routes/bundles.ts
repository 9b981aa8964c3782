/**
 * Portable run bundles: one self-contained JSON document with a run record, every input series
 * in full, its whole lineage of runs (recursively: input runs, e.g. the calibrated model a
 * reconstruction cites, and the runs that made input series, e.g. the darkening run behind a
 * PSI series), parameters, versions, seed and result digest. Importing a bundle checks every content id and
 * digest, recomputes each run from the bundled inputs, and stores the bundle only when it
 * verifies, so a tampered bundle is reported and never stored as verified.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import type { RunRecord, Store, StoredSeries } from "../store/types.ts";
import type { RunService } from "../runs/service.ts";
import type { OutputSeries } from "../runs/kind.ts";
import type { Lineage } from "../runs/inherit.ts";
import { resultDigest } from "../runs/service.ts";
import { ProblemError } from "../problems.ts";
import { problems } from "../schemas/common.ts";
import { storedFromNormalised } from "../series_codec.ts";
import type { NormalisedSeries } from "../ingest/mod.ts";
import { SERVICE_VERSION } from "../version.ts";
import { requireJson } from "./media.ts";

export const BUNDLE_FORMAT = "sunlag-run-bundle";
export const BUNDLE_FORMAT_VERSION = 1;

const BundleSeries = z.object({
  id: z.string(),
  name: z.string(),
  quantity: z.string(),
  units: z.string(),
  description: z.string().nullable(),
  source: z.string().nullable(),
  version: z.string().nullable(),
  resolution: z.enum(["daily", "monthly", "annual", "irregular"]),
  derived_from: z.string().nullable(),
  time: z.array(z.number()),
  value: z.array(z.number()),
  uncertainty: z.array(z.number()).nullable(),
}).openapi("BundleSeries");

const BundleRun = z.object({
  id: z.string(),
  kind: z.string(),
  created_at: z.string(),
  updated_at: z.string(),
  status: z.string(),
  progress: z.number(),
  params: z.record(z.string(), z.unknown()),
  input_series: z.array(z.string()),
  input_runs: z.array(z.string()),
  service_version: z.string(),
  algorithm_version: z.string(),
  seed: z.number().nullable(),
  result: z.record(z.string(), z.unknown()).nullable(),
  result_digest: z.string().nullable(),
  error: z.record(z.string(), z.unknown()).nullable(),
  eta_seconds: z.number().nullable(),
}).openapi("BundleRun");

export const Bundle = z.object({
  format: z.literal(BUNDLE_FORMAT),
  format_version: z.literal(BUNDLE_FORMAT_VERSION),
  exported_at: z.string(),
  exported_by: z.string(),
  run: BundleRun,
  input_runs: z.array(BundleRun).openapi({
    description: "The main run's lineage, dependencies first: the runs it takes as inputs " +
      "and the runs that made its input series (derived_from), recursively",
  }),
  series: z.array(BundleSeries),
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
 * with their own inputs, recursively.
 */
async function collect(store: Store, run: RunRecord) {
  const runs: RunRecord[] = [];
  const seenRuns = new Set<string>([run.id]);
  const series = new Map<string, StoredSeries>();
  const mustRun = async (id: string, why: string) => {
    const r = await store.getRun(id);
    if (!r) throw new ProblemError("conflict", `${why} run ${id}, which is no longer stored`);
    return r;
  };
  const visitSeries = async (id: string, user: RunRecord) => {
    if (series.has(id)) return;
    const s = await store.getSeries(id);
    if (!s) {
      throw new ProblemError(
        "conflict",
        `run ${user.id} uses series ${id}, which is no longer stored`,
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

/** Verify a bundle; returns the differences and, when verified, what to store. */
export async function verifyBundle(runs: RunService, b: BundleT) {
  const differences: { where: string; message: string }[] = [];
  const series: Record<string, StoredSeries> = {};
  for (const [i, s] of b.series.entries()) {
    const n: NormalisedSeries = {
      name: s.name,
      quantity: s.quantity as NormalisedSeries["quantity"],
      units: s.units,
      description: s.description,
      source: s.source,
      version: s.version,
      resolution: s.resolution,
      time: Float64Array.from(s.time),
      value: Float64Array.from(s.value),
      uncertainty: s.uncertainty ? Float64Array.from(s.uncertainty) : null,
    };
    const stored = await storedFromNormalised(n, s.derived_from);
    if (stored.id !== s.id) {
      differences.push({
        where: `/series/${i}`,
        message: `content of series ${s.id} hashes to ${stored.id}: the series was edited`,
      });
    }
    series[s.id] = { ...stored, id: s.id };
  }
  const verifiedRuns: Record<string, RunRecord> = {};
  const all = [...b.input_runs.map((r, i) => ({ r, where: `/input_runs/${i}` })), {
    r: b.run,
    where: "/run",
  }];
  for (const { r, where } of all) {
    const rec = r as RunRecord;
    const kind = runs.kindOf(rec.kind);
    if (!kind) {
      differences.push({ where, message: `run kind "${rec.kind}" is unknown to this service` });
      continue;
    }
    if (rec.status !== "succeeded" || !rec.result || !rec.result_digest) {
      differences.push({
        where,
        message: `run ${rec.id} has status ${rec.status}; only succeeded runs verify`,
      });
      continue;
    }
    const claimed = await resultDigest(rec.result);
    if (claimed !== rec.result_digest) {
      differences.push({
        where: `${where}/result_digest`,
        message:
          `the bundled result hashes to ${claimed}, not the recorded digest ${rec.result_digest}: result or digest was edited`,
      });
    }
    if (kind.algorithmVersion !== rec.algorithm_version) {
      differences.push({
        where: `${where}/algorithm_version`,
        message:
          `algorithm of "${rec.kind}" is ${kind.algorithmVersion} here, ${rec.algorithm_version} in the bundle`,
      });
    }
    const missing = rec.input_series.filter((id) => !series[id]);
    const missingRuns = rec.input_runs.filter((id) => !verifiedRuns[id]);
    if (missing.length || missingRuns.length) {
      differences.push({
        where,
        message: `inputs missing from the bundle: ${[...missing, ...missingRuns].join(", ")}`,
      });
      continue;
    }
    const parsed = kind.request.safeParse(rec.params);
    if (!parsed.success) {
      differences.push({
        where: `${where}/params`,
        message: "parameters do not validate for this kind",
      });
      continue;
    }
    try {
      const inputs = {
        series: Object.fromEntries(rec.input_series.map((id) => [id, series[id]])),
        runs: Object.fromEntries(rec.input_runs.map((id) => [id, verifiedRuns[id]])),
      };
      // the inherited context comes from the bundle's own lineage, verified before this run
      const lineage: Lineage = {
        run: (id) => Promise.resolve(verifiedRuns[id] ?? null),
        seriesOrigin: (id) => Promise.resolve(series[id]?.derived_from ?? null),
      };
      const again = await runs.computeResult(
        kind,
        parsed.data as Record<string, unknown>,
        inputs,
        lineage,
      );
      if (again.digest !== rec.result_digest) {
        differences.push({
          where: `${where}/result_digest`,
          message:
            `recomputed digest ${again.digest} differs from the recorded ${rec.result_digest}`,
        });
        for (const d of jsonDifferences(rec.result, again.result)) {
          differences.push({ where: `${where}/result`, message: d });
        }
      }
    } catch (e) {
      differences.push({ where, message: `recomputation failed: ${(e as Error).message}` });
      continue;
    }
    verifiedRuns[rec.id] = rec;
  }
  differences.push(...await checkDerivedSeries(runs, b, verifiedRuns));
  return { differences, series, verifiedRuns };
}

/**
 * Every bundled series that names a bundled run in `derived_from` must be an output of that
 * run as this service saves it (same content id), so lineage cannot be claimed falsely.
 */
async function checkDerivedSeries(
  runs: RunService,
  b: BundleT,
  verifiedRuns: Record<string, RunRecord>,
): Promise<{ where: string; message: string }[]> {
  const out: { where: string; message: string }[] = [];
  const bundled = new Set([...b.input_runs.map((r) => r.id), b.run.id]);
  for (const [i, s] of b.series.entries()) {
    if (!s.derived_from || !bundled.has(s.derived_from)) continue;
    const maker = verifiedRuns[s.derived_from];
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

export function registerBundleRoutes(app: App, deps: { store: Store; runs: RunService }): void {
  const { store, runs } = deps;

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/bundle",
      tags: ["Runs"],
      summary: "A self-contained, portable JSON bundle of a run and all of its inputs",
      request: {
        params: z.object({ id: z.string().openapi({ param: { name: "id", in: "path" } }) }),
      },
      responses: {
        200: { description: "The bundle", content: { "application/json": { schema: Bundle } } },
        ...problems(404, 409),
      },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const run = await store.getRun(id);
      if (!run) throw new ProblemError("not-found", `No run has id ${id}`);
      if (run.status !== "succeeded") {
        throw new ProblemError(
          "conflict",
          `Run ${id} has status ${run.status}; only succeeded runs can be bundled`,
        );
      }
      const { runs: deps, series } = await collect(store, run);
      c.header("Content-Disposition", `attachment; filename="sunlag-run-${run.id}.json"`);
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
        ...problems(400, 413, 415, 422),
      },
    }),
    async (c) => {
      const b = c.req.valid("json");
      const { differences, series, verifiedRuns } = await verifyBundle(runs, b);
      const verified = differences.length === 0;
      let stored = false;
      if (verified) {
        for (const s of Object.values(series)) await store.putSeries(s);
        for (const r of [...b.input_runs, b.run] as RunRecord[]) {
          if (!(await store.getRun(r.id))) await store.putRun(verifiedRuns[r.id] ?? r);
        }
        stored = true;
      }
      return c.json({
        verified,
        stored,
        run_id: b.run.id,
        result_digest: b.run.result_digest,
        differences,
      }, 200);
    },
  );
}
