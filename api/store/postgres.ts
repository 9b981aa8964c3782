/**
 * The PostgreSQL store, for a service shared by a group or run beside other databases. Same
 * contract and suite as the SQLite store; uses the `postgres` driver (connection pool,
 * transactions through `sql.begin`).
 *
 * - Every write is one transaction. Rows whose existence a write depends on are locked:
 *   `deleteSeries` takes the series row `FOR UPDATE` before checking its users, and `putRun`
 *   takes each input series `FOR KEY SHARE`, so a delete and a run that uses the series
 *   serialise and the in-use rule holds under concurrency (foreign keys back it up).
 * - Listings run in one REPEATABLE READ, READ ONLY transaction so count and page agree.
 * - Schema steps are recorded in `schema_migrations` and applied under a transaction-scoped
 *   advisory lock, so several service instances starting at once apply each step once.
 * - Points are `bytea` columns of little-endian doubles stored out of line without
 *   compression (`STORAGE EXTERNAL`: random doubles do not compress, trying costs time),
 *   sent and read as base64 text.
 * - Times and JSON are kept as text, exactly as written, like the SQLite store; a run's result
 *   as the bytes of its canonical JSON (`bytea`, lz4-compressed by TOAST), as in SQLite's BLOB.
 * - Owners, keys and holdings as in the SQLite store (same tables, same upgrade step: rows
 *   stored before owners existed go to the local owner, private).
 *
 * @module
 */
import postgres from "postgres";
import { Buffer } from "node:buffer";
import type {
  ApiKeyRecord,
  HolderSpec,
  Holding,
  OwnerRecord,
  Page,
  RunRecord,
  RunStatus,
  RunSummary,
  SeriesMeta,
  SeriesUsage,
  Store,
  StoredSeries,
  Viewer,
  Visibility,
} from "./types.ts";
import type { FieldDescription, FieldFinal, FieldMeta, FieldStaging } from "./field_types.ts";
import { bytesLEToFloat64, float64ToBytesLE } from "./float64_blob.ts";
import { FIELD_MIGRATION_NAME, POSTGRES_FIELD_SQL } from "./field_common.ts";
import { PostgresFields } from "./postgres_fields.ts";
import {
  checkPaging,
  checkSeries,
  checkVisibility,
  type DbRow,
  DEFAULT_HOLDER,
  encodeRunPatch,
  interruptedProblem,
  jsonOrNull,
  metaOf,
  type Migration,
  RUN_COLUMNS,
  RUN_SUMMARY_COLUMNS,
  runValues,
  SERIES_META_COLUMNS,
  seriesMetaValues,
  TENANCY_MIGRATION_NAME,
  text,
  toApiKey,
  toHolding,
  toOwner,
  toRunSummary,
  toSeriesMeta,
} from "./common.ts";
import { parseResult, resultBytes } from "./result_text.ts";
import {
  DuplicateOwnerError,
  DuplicateRunError,
  MissingInputError,
  RunNotFoundError,
  SchemaMismatchError,
  TerminalRunError,
} from "./errors.ts";
import { TERMINAL } from "./types.ts";

/** The schema history of the PostgreSQL store, oldest first. */
export const POSTGRES_MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    name: "series, points, runs and run inputs",
    sql: `
      CREATE TABLE series (
        seq BIGSERIAL PRIMARY KEY,
        id TEXT NOT NULL UNIQUE,
        name TEXT NOT NULL,
        quantity TEXT NOT NULL,
        units TEXT NOT NULL,
        description TEXT,
        source TEXT,
        version TEXT,
        resolution TEXT NOT NULL
          CHECK (resolution IN ('daily', 'monthly', 'annual', 'irregular')),
        n INTEGER NOT NULL CHECK (n >= 0),
        start_time DOUBLE PRECISION NOT NULL,
        end_time DOUBLE PRECISION NOT NULL,
        derived_from TEXT,
        created_at TEXT NOT NULL
      );
      CREATE INDEX series_newest ON series (created_at DESC, seq DESC);
      CREATE INDEX series_by_quantity ON series (quantity, created_at DESC, seq DESC);
      CREATE INDEX series_by_origin ON series (derived_from);

      CREATE TABLE series_points (
        series_id TEXT PRIMARY KEY REFERENCES series (id) ON DELETE CASCADE,
        time BYTEA NOT NULL,
        value BYTEA NOT NULL,
        uncertainty BYTEA
      );
      ALTER TABLE series_points ALTER COLUMN time SET STORAGE EXTERNAL,
        ALTER COLUMN value SET STORAGE EXTERNAL,
        ALTER COLUMN uncertainty SET STORAGE EXTERNAL;

      CREATE TABLE runs (
        seq BIGSERIAL PRIMARY KEY,
        id TEXT NOT NULL UNIQUE,
        kind TEXT NOT NULL,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL,
        status TEXT NOT NULL
          CHECK (status IN ('queued', 'running', 'succeeded', 'failed', 'cancelled')),
        progress DOUBLE PRECISION NOT NULL,
        params TEXT NOT NULL,
        service_version TEXT NOT NULL,
        algorithm_version TEXT NOT NULL,
        seed BIGINT,
        result TEXT,
        result_digest TEXT,
        error TEXT,
        eta_seconds DOUBLE PRECISION
      );
      CREATE INDEX runs_newest ON runs (created_at DESC, seq DESC);
      CREATE INDEX runs_by_kind ON runs (kind, created_at DESC, seq DESC);
      CREATE INDEX runs_by_status ON runs (status, created_at DESC, seq DESC);

      CREATE TABLE run_input_series (
        run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
        position INTEGER NOT NULL,
        series_id TEXT NOT NULL REFERENCES series (id),
        PRIMARY KEY (run_id, position)
      );
      CREATE INDEX run_input_series_by_series ON run_input_series (series_id);

      CREATE TABLE run_input_runs (
        run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
        position INTEGER NOT NULL,
        input_run_id TEXT NOT NULL REFERENCES runs (id),
        PRIMARY KEY (run_id, position)
      );
      CREATE INDEX run_input_runs_by_input ON run_input_runs (input_run_id);
    `,
  },
  {
    version: 2,
    name: "run leases",
    sql: `
      ALTER TABLE runs ADD COLUMN lease_holder TEXT;
      ALTER TABLE runs ADD COLUMN lease_expires TIMESTAMPTZ;
      CREATE INDEX runs_open ON runs (status) WHERE status IN ('queued', 'running');
    `,
  },
  {
    version: 3,
    name: TENANCY_MIGRATION_NAME,
    // Everything stored before owners existed goes to the built-in local owner, private.
    sql: `
      CREATE TABLE owners (
        id TEXT PRIMARY KEY,
        name TEXT NOT NULL,
        role TEXT NOT NULL CHECK (role IN ('reader', 'writer', 'admin')),
        group_name TEXT NOT NULL,
        created_at TEXT NOT NULL
      );
      INSERT INTO owners (id, name, role, group_name, created_at)
        VALUES ('local', 'Local owner', 'admin', 'default',
          to_char(now() AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"'));

      CREATE TABLE api_keys (
        id TEXT PRIMARY KEY,
        owner_id TEXT NOT NULL REFERENCES owners (id),
        key_hash TEXT NOT NULL,
        label TEXT,
        role TEXT CHECK (role IS NULL OR role IN ('reader', 'writer', 'admin')),
        created_at TEXT NOT NULL,
        expires_at TEXT,
        revoked_at TEXT
      );
      CREATE INDEX api_keys_by_owner ON api_keys (owner_id, created_at);

      CREATE TABLE series_holdings (
        seq BIGSERIAL PRIMARY KEY,
        series_id TEXT NOT NULL REFERENCES series (id) ON DELETE CASCADE,
        owner_id TEXT NOT NULL REFERENCES owners (id),
        visibility TEXT NOT NULL CHECK (visibility IN ('private', 'group', 'public')),
        created_at TEXT NOT NULL,
        UNIQUE (series_id, owner_id)
      );
      CREATE INDEX series_holdings_by_owner ON series_holdings (owner_id);
      INSERT INTO series_holdings (series_id, owner_id, visibility, created_at)
        SELECT id, 'local', 'private', created_at FROM series ORDER BY seq;

      CREATE TABLE run_holdings (
        seq BIGSERIAL PRIMARY KEY,
        run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
        owner_id TEXT NOT NULL REFERENCES owners (id),
        visibility TEXT NOT NULL CHECK (visibility IN ('private', 'group', 'public')),
        created_at TEXT NOT NULL,
        UNIQUE (run_id, owner_id)
      );
      CREATE INDEX run_holdings_by_owner ON run_holdings (owner_id);
      INSERT INTO run_holdings (run_id, owner_id, visibility, created_at)
        SELECT id, 'local', 'private', created_at FROM runs ORDER BY seq;
    `,
  },
  { version: 4, name: FIELD_MIGRATION_NAME, sql: POSTGRES_FIELD_SQL },
  {
    version: 5,
    name: "run results as bytes",
    // A result is its canonical JSON's UTF-8 bytes: rows stored as text keep exactly those
    // bytes (the database encoding is UTF-8). lz4 instead of the default pglz for TOAST
    // compression: JSON numbers compress about 2x either way, lz4 several times faster.
    sql: `
      ALTER TABLE runs ALTER COLUMN result TYPE bytea USING convert_to(result, 'UTF8');
      ALTER TABLE runs ALTER COLUMN result SET COMPRESSION lz4;
    `,
  },
];

const API_KEY_COLUMNS = [
  "id",
  "owner_id",
  "key_hash",
  "label",
  "role",
  "created_at",
  "expires_at",
  "revoked_at",
] as const;

/** The owner and visibility fields of a holding, as listings show them. */
function viewOf(h: Holding): { created_at: string; owner: string; visibility: Visibility } {
  return { created_at: h.created_at, owner: h.owner, visibility: h.visibility };
}

/** Options of {@link openPostgresStore}. */
export interface PostgresStoreOptions {
  /** Connection URL, e.g. `postgres://sunlag@127.0.0.1:5432/sunlag`. */
  url: string;
  /** Largest number of pooled connections. @default 10 */
  max?: number;
  /** Seconds to wait for a connection before failing. @default 10 */
  connectTimeoutSeconds?: number;
  /** Schema steps to apply; tests use this to simulate other versions. @default POSTGRES_MIGRATIONS */
  migrations?: readonly Migration[];
}

type Sql = postgres.Sql;
type Tx = postgres.TransactionSql;

/** Arbitrary fixed key of the advisory lock that serialises schema migrations. */
const MIGRATION_LOCK_KEY = 0x5_1a6_0001;

function seriesRow(s: SeriesMeta): Record<string, string | number | null> {
  const values = seriesMetaValues(s);
  return Object.fromEntries(SERIES_META_COLUMNS.map((c, i) => [c, values[i]]));
}

/** A run's columns without its result (written apart, see {@link resultSet}). */
function runRow(r: RunRecord): Record<string, string | number | null> {
  const values = runValues({ ...r, result: null }, "text") as (string | number | null)[];
  return Object.fromEntries(
    RUN_COLUMNS.flatMap((c, i) => (c === "result" ? [] : [[c, values[i]]])),
  );
}

/**
 * `, result = decode(<base64>, 'base64')` for a result's canonical bytes, or an empty fragment
 * when the patch has no result. Results travel as base64 for the reason points do
 * ({@link toBase64}); the bytes stored are the canonical bytes, unchanged.
 */
function resultSet(sql: Sql | Tx, result: unknown): postgres.PendingQuery<postgres.Row[]> {
  if (result === undefined) return sql``;
  if (result === null) return sql`, result = NULL`;
  const b64 = Buffer.from(resultBytes(result as Record<string, unknown>)).toString("base64");
  return sql`, result = decode(${b64}, 'base64')`;
}

/** The run columns to select, the result as base64 text (decoded by {@link resultOfRow}). */
const RUN_SELECT = RUN_COLUMNS.map((c) =>
  c === "result" ? "encode(result, 'base64') AS result" : `"${c}"`
).join(", ");

/** A stored result (base64 of its bytes, or null) as a lazily parsed result. */
function resultOfRow(v: unknown): Record<string, unknown> | null {
  if (v === null || v === undefined) return null;
  const b = Buffer.from(String(v), "base64");
  return parseResult(new Uint8Array(b.buffer, b.byteOffset, b.length));
}

/**
 * Points travel as base64 text, decoded and encoded by the server: the driver's own bytea
 * format is hex, 2 characters per byte against base64's 4 per 3, and the transfer time is
 * proportional to the text (test/bench/store_medians.ts on this machine: gets about 2x and
 * puts about 3x faster than with hex).
 */
function toBase64(values: Float64Array): string {
  return Buffer.from(float64ToBytesLE(values).buffer).toString("base64");
}

/** Decode the server's base64 (which breaks lines every 76 characters; Buffer skips them). */
function fromBase64(b64: string, n: number): Float64Array {
  return bytesLEToFloat64(Buffer.from(b64, "base64"), n);
}

/** A `Store` on a PostgreSQL database. Create it with {@link openPostgresStore}. */
export class PostgresStore implements Store {
  readonly kind = "postgres";
  #sql: Sql;

  /** Use {@link openPostgresStore}; the constructor expects a migrated database. */
  #fields: PostgresFields;

  constructor(sql: Sql) {
    this.#sql = sql;
    this.#fields = new PostgresFields(sql, {
      visible: (tx, h, v) => this.#visible(tx, h, v),
      pickOrder: (tx, h, v) => this.#pickOrder(tx, h, v),
    });
  }

  /** The visibility test of a holding aliased `h` for a viewer (a query fragment). */
  #visible(tx: Sql | Tx, h: string, v: Viewer) {
    const col = (c: string) => tx.unsafe(`${h}.${c}`);
    if (v.admin) return tx`TRUE`;
    if (v.owner === null) return tx`${col("visibility")} = 'public'`;
    return tx`(${col("owner_id")} = ${v.owner} OR ${col("visibility")} = 'public' OR
      (${col("visibility")} = 'group' AND EXISTS (
        SELECT 1 FROM owners o WHERE o.id = ${col("owner_id")} AND o.group_name = ${
      v.group ?? ""
    })))`;
  }

  /** The order in which a viewer's holding is chosen: its own, then the widest, the oldest. */
  #pickOrder(tx: Sql | Tx, h: string, v: Viewer) {
    const col = (c: string) => tx.unsafe(`${h}.${c}`);
    return tx`ORDER BY (${col("owner_id")} = ${v.owner ?? ""}) DESC,
      CASE ${col("visibility")} WHEN 'public' THEN 0 WHEN 'group' THEN 1 ELSE 2 END,
      ${col("seq")}`;
  }

  /** True when the server answers `SELECT 1` within `timeoutMs` (default 2 s). */
  async ping(timeoutMs = 2000): Promise<boolean> {
    let timer: ReturnType<typeof setTimeout> | undefined;
    const late = new Promise<boolean>((ok) => timer = setTimeout(() => ok(false), timeoutMs));
    const answer = this.#sql`SELECT 1 AS one`.then((rows) => rows[0]?.one === 1, () => false);
    try {
      return await Promise.race([answer, late]);
    } finally {
      clearTimeout(timer);
    }
  }

  async putSeries(
    s: StoredSeries,
    holder: HolderSpec = DEFAULT_HOLDER,
  ): Promise<{ created: boolean; series: SeriesMeta }> {
    checkSeries(s);
    checkVisibility(`store series ${s.id}`, holder.visibility);
    const attempt = () =>
      this.#sql.begin(async (tx: Tx) => {
        const inserted = await tx`
          INSERT INTO series ${tx(seriesRow(s))} ON CONFLICT (id) DO NOTHING RETURNING id`;
        let meta: SeriesMeta = metaOf(s);
        if (inserted.length === 0) {
          const [row] = await tx`
            SELECT ${tx([...SERIES_META_COLUMNS])} FROM series WHERE id = ${s.id} FOR KEY SHARE`;
          meta = toSeriesMeta(row);
        } else {
          await tx`
            INSERT INTO series_points (series_id, time, value, uncertainty) VALUES (
              ${s.id}, decode(${toBase64(s.time)}, 'base64'),
              decode(${toBase64(s.value)}, 'base64'),
              decode(${s.uncertainty === null ? null : toBase64(s.uncertainty)}, 'base64'))`;
        }
        const added = await tx`
          INSERT INTO series_holdings (series_id, owner_id, visibility, created_at)
          VALUES (${s.id}, ${holder.owner}, ${holder.visibility}, ${s.created_at})
          ON CONFLICT (series_id, owner_id) DO NOTHING RETURNING seq`;
        if (added.length) {
          return {
            created: true,
            series: { ...meta, ...viewOf({ ...holder, created_at: s.created_at }) },
          };
        }
        const [held] = await tx`
          SELECT owner_id AS h_owner, visibility AS h_visibility, created_at AS h_created
          FROM series_holdings WHERE series_id = ${s.id} AND owner_id = ${holder.owner}`;
        return { created: false, series: { ...meta, ...viewOf(toHolding(held)) } };
      });
    try {
      return await attempt();
    } catch (e) {
      // The content's last holding was deleted between the two inserts: store it afresh.
      if ((e as { code?: string })?.code === "23503") return await attempt();
      throw e;
    }
  }

  async getSeries(id: string): Promise<StoredSeries | null> {
    const rows = await this.#sql`
      SELECT ${this.#sql(SERIES_META_COLUMNS.map((c) => "s." + c))},
        encode(p.time, 'base64') AS p_time, encode(p.value, 'base64') AS p_value,
        encode(p.uncertainty, 'base64') AS p_uncertainty
      FROM series s JOIN series_points p ON p.series_id = s.id WHERE s.id = ${id}`;
    if (rows.length === 0) return null;
    const row = rows[0];
    const meta = toSeriesMeta(row);
    return {
      ...meta,
      time: fromBase64(row.p_time, meta.n),
      value: fromBase64(row.p_value, meta.n),
      uncertainty: row.p_uncertainty === null ? null : fromBase64(row.p_uncertainty, meta.n),
    };
  }

  async getSeriesMeta(id: string): Promise<SeriesMeta | null> {
    const rows = await this.#sql`
      SELECT ${this.#sql([...SERIES_META_COLUMNS])} FROM series WHERE id = ${id}`;
    return rows.length ? toSeriesMeta(rows[0]) : null;
  }

  async listSeries(
    q: { quantity?: string; limit: number; offset: number; viewer?: Viewer },
  ): Promise<Page<SeriesMeta>> {
    checkPaging("list series", q.limit, q.offset);
    return await this.#sql.begin("ISOLATION LEVEL REPEATABLE READ READ ONLY", async (tx: Tx) => {
      if (q.viewer === undefined) {
        const where = q.quantity === undefined ? tx`` : tx`WHERE quantity = ${q.quantity}`;
        const [{ n }] = await tx`SELECT count(*) AS n FROM series ${where}`;
        const rows = await tx`
          SELECT ${tx([...SERIES_META_COLUMNS])} FROM series ${where}
          ORDER BY created_at DESC, seq DESC LIMIT ${q.limit} OFFSET ${q.offset}`;
        return { items: rows.map((r) => toSeriesMeta(r)), total: Number(n) };
      }
      const v = q.viewer;
      const cond = q.quantity === undefined ? tx`` : tx`AND s.quantity = ${q.quantity}`;
      const [{ n }] = await tx`
        SELECT count(*) AS n FROM series s WHERE EXISTS (
          SELECT 1 FROM series_holdings h2 WHERE h2.series_id = s.id AND ${
        this.#visible(tx, "h2", v)
      }) ${cond}`;
      const rows = await tx`
        SELECT ${tx(SERIES_META_COLUMNS.map((c) => "s." + c))},
          h.owner_id AS h_owner, h.visibility AS h_visibility, h.created_at AS h_created
        FROM series s JOIN series_holdings h ON h.seq = (
          SELECT h2.seq FROM series_holdings h2 WHERE h2.series_id = s.id AND ${
        this.#visible(tx, "h2", v)
      }
          ${this.#pickOrder(tx, "h2", v)} LIMIT 1)
        WHERE TRUE ${cond}
        ORDER BY h.created_at DESC, h.seq DESC LIMIT ${q.limit} OFFSET ${q.offset}`;
      return {
        items: rows.map((r) => ({ ...toSeriesMeta(r), ...viewOf(toHolding(r)) })),
        total: Number(n),
      };
    });
  }

  async #holding(table: "series_holdings" | "run_holdings", id: string, v: Viewer) {
    const key = this.#sql.unsafe(table === "series_holdings" ? "h.series_id" : "h.run_id");
    const rows = await this.#sql`
      SELECT h.owner_id AS h_owner, h.visibility AS h_visibility, h.created_at AS h_created
      FROM ${this.#sql(table)} h WHERE ${key} = ${id} AND ${this.#visible(this.#sql, "h", v)}
      ${this.#pickOrder(this.#sql, "h", v)} LIMIT 1`;
    return rows.length ? toHolding(rows[0]) : null;
  }

  async seriesHolding(id: string, viewer: Viewer): Promise<Holding | null> {
    return await this.#holding("series_holdings", id, viewer);
  }

  async runHolding(id: string, viewer: Viewer): Promise<Holding | null> {
    return await this.#holding("run_holdings", id, viewer);
  }

  async setSeriesVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    return await this.#setVisibility("series_holdings", "series_id", id, owner, visibility);
  }

  async setRunVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    return await this.#setVisibility("run_holdings", "run_id", id, owner, visibility);
  }

  async #setVisibility(
    table: string,
    key: string,
    id: string,
    owner: string,
    visibility: Visibility,
  ): Promise<boolean> {
    checkVisibility(`share ${id}`, visibility);
    const res = await this.#sql`
      UPDATE ${this.#sql(table)} SET visibility = ${visibility}
      WHERE ${this.#sql(key)} = ${id} AND owner_id = ${owner}`;
    return res.count > 0;
  }

  async #usage(tx: Sql | Tx, id: string, owner: string): Promise<SeriesUsage> {
    const own = await tx`
      SELECT DISTINCT r.id, r.created_at, r.seq
      FROM run_input_series l JOIN runs r ON r.id = l.run_id
      JOIN run_holdings h ON h.run_id = r.id AND h.owner_id = ${owner}
      WHERE l.series_id = ${id} ORDER BY r.created_at DESC, r.seq DESC`;
    const [{ n }] = await tx`
      SELECT count(DISTINCT l.run_id) AS n FROM run_input_series l
      WHERE l.series_id = ${id} AND NOT EXISTS (
        SELECT 1 FROM run_holdings h WHERE h.run_id = l.run_id AND h.owner_id = ${owner})`;
    return { own: own.map((r) => text(r.id)), others: Number(n) };
  }

  async seriesUsage(id: string, owner: string): Promise<SeriesUsage> {
    return await this.#usage(this.#sql, id, owner);
  }

  async deleteSeriesHolding(
    id: string,
    owner: string,
  ): Promise<"deleted" | "not_found" | "in_use"> {
    return await this.#sql.begin(async (tx: Tx) => {
      // Lock the content row first, as deleteSeries and putRun do, so the checks hold.
      const found = await tx`SELECT id FROM series WHERE id = ${id} FOR UPDATE`;
      if (found.length === 0) return "not_found" as const;
      const mine = await tx`
        SELECT 1 FROM series_holdings WHERE series_id = ${id} AND owner_id = ${owner}`;
      if (mine.length === 0) return "not_found" as const;
      const usage = await this.#usage(tx, id, owner);
      if (usage.own.length) return "in_use" as const;
      const others = await tx`
        SELECT 1 FROM series_holdings WHERE series_id = ${id} AND owner_id <> ${owner} LIMIT 1`;
      if (others.length) {
        await tx`DELETE FROM series_holdings WHERE series_id = ${id} AND owner_id = ${owner}`;
        return "deleted" as const;
      }
      if (usage.others > 0) return "in_use" as const;
      await tx`DELETE FROM series_points WHERE series_id = ${id}`;
      await tx`DELETE FROM series WHERE id = ${id}`;
      return "deleted" as const;
    });
  }

  async deleteSeries(id: string): Promise<"deleted" | "not_found" | "in_use"> {
    return await this.#sql.begin(async (tx: Tx) => {
      const found = await tx`SELECT id FROM series WHERE id = ${id} FOR UPDATE`;
      if (found.length === 0) return "not_found" as const;
      const users = await tx`SELECT 1 FROM run_input_series WHERE series_id = ${id} LIMIT 1`;
      if (users.length) return "in_use" as const;
      await tx`DELETE FROM series_points WHERE series_id = ${id}`;
      await tx`DELETE FROM series WHERE id = ${id}`;
      return "deleted" as const;
    });
  }

  /** Lock and check the inputs of a run; throws MissingInputError for the first absent one. */
  async #checkInputs(
    tx: Tx,
    runId: string,
    inputSeries: readonly string[],
    inputRuns: readonly string[],
  ): Promise<void> {
    if (inputSeries.length) {
      const rows = await tx`
        SELECT id FROM series WHERE id IN ${tx([...inputSeries])} FOR KEY SHARE`;
      const have = new Set(rows.map((r) => text(r.id)));
      const missing = inputSeries.find((s) => !have.has(s));
      if (missing !== undefined) throw new MissingInputError(runId, "series", missing);
    }
    if (inputRuns.length) {
      const rows = await tx`SELECT id FROM runs WHERE id IN ${tx([...inputRuns])} FOR KEY SHARE`;
      const have = new Set(rows.map((r) => text(r.id)));
      const missing = inputRuns.find((r) => !have.has(r));
      if (missing !== undefined) throw new MissingInputError(runId, "run", missing);
    }
  }

  async #writeLinks(
    tx: Tx,
    runId: string,
    inputSeries: readonly string[],
    inputRuns: readonly string[],
  ): Promise<void> {
    if (inputSeries.length) {
      const rows = inputSeries.map((series_id, position) => ({
        run_id: runId,
        position,
        series_id,
      }));
      await tx`INSERT INTO run_input_series ${tx(rows)}`;
    }
    if (inputRuns.length) {
      const rows = inputRuns.map((input_run_id, position) => ({
        run_id: runId,
        position,
        input_run_id,
      }));
      await tx`INSERT INTO run_input_runs ${tx(rows)}`;
    }
  }

  /**
   * Insert a new run, atomically with its input links.
   * @throws {DuplicateRunError} when the id is taken.
   * @throws {MissingInputError} when an input series or input run is not stored.
   */
  async putRun(r: RunRecord, holder: HolderSpec = DEFAULT_HOLDER): Promise<void> {
    checkVisibility(`insert run ${r.id}`, holder.visibility);
    await this.#sql.begin(async (tx: Tx) => {
      await this.#checkInputs(tx, r.id, r.input_series, r.input_runs);
      const inserted = await tx`
        INSERT INTO runs ${tx(runRow(r))} ON CONFLICT (id) DO NOTHING RETURNING id`;
      if (inserted.length === 0) throw new DuplicateRunError(r.id);
      if (r.result !== null) {
        await tx`UPDATE runs SET updated_at = ${r.updated_at}${resultSet(tx, r.result)}
          WHERE id = ${r.id}`;
      }
      await this.#writeLinks(tx, r.id, r.input_series, r.input_runs);
      await this.#fields.linkRun(tx, r.id, r.input_fields ?? []);
      await tx`
        INSERT INTO run_holdings (run_id, owner_id, visibility, created_at)
        VALUES (${r.id}, ${holder.owner}, ${holder.visibility}, ${r.created_at})`;
    });
  }

  async addRunHolding(id: string, holder: HolderSpec): Promise<boolean> {
    checkVisibility(`hold run ${id}`, holder.visibility);
    return await this.#sql.begin(async (tx: Tx) => {
      const found = await tx`SELECT id FROM runs WHERE id = ${id} FOR KEY SHARE`;
      if (found.length === 0) throw new RunNotFoundError(id);
      const added = await tx`
        INSERT INTO run_holdings (run_id, owner_id, visibility, created_at)
        VALUES (${id}, ${holder.owner}, ${holder.visibility}, ${new Date().toISOString()})
        ON CONFLICT (run_id, owner_id) DO NOTHING RETURNING seq`;
      return added.length > 0;
    });
  }

  /**
   * Change the given fields of a run. `updated_at` is set to now unless the patch carries it.
   * Input lists in the patch replace the stored ones.
   * @throws {RunNotFoundError} when no run has this id.
   * @throws {MissingInputError} when a new input series or input run is not stored.
   */
  async updateRun(
    id: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<void> {
    const { result, ...rest } = patch;
    const cols = Object.fromEntries(encodeRunPatch(id, rest, new Date().toISOString()));
    await this.#sql.begin(async (tx: Tx) => {
      const updated = await tx`UPDATE runs SET ${tx(cols)}${resultSet(tx, result)}
        WHERE id = ${id} AND status IN ('queued', 'running') RETURNING id`;
      if (updated.length === 0) {
        const exists = await tx`SELECT 1 FROM runs WHERE id = ${id}`;
        if (exists.length === 0) throw new RunNotFoundError(id);
        throw new TerminalRunError(id);
      }
      if (patch.input_series !== undefined || patch.input_runs !== undefined) {
        await this.#checkInputs(tx, id, patch.input_series ?? [], patch.input_runs ?? []);
        if (patch.input_series !== undefined) {
          await tx`DELETE FROM run_input_series WHERE run_id = ${id}`;
        }
        if (patch.input_runs !== undefined) {
          await tx`DELETE FROM run_input_runs WHERE run_id = ${id}`;
        }
        await this.#writeLinks(tx, id, patch.input_series ?? [], patch.input_runs ?? []);
      }
    });
  }

  async #links(
    tx: Tx,
    runIds: string[],
  ): Promise<Map<string, { series: string[]; runs: string[] }>> {
    const out = new Map<string, { series: string[]; runs: string[] }>();
    for (const id of runIds) out.set(id, { series: [], runs: [] });
    if (runIds.length === 0) return out;
    const srows = await tx`
      SELECT run_id, series_id FROM run_input_series WHERE run_id IN ${tx(runIds)}
      ORDER BY run_id, position`;
    for (const r of srows) out.get(text(r.run_id))!.series.push(text(r.series_id));
    const rrows = await tx`
      SELECT run_id, input_run_id FROM run_input_runs WHERE run_id IN ${tx(runIds)}
      ORDER BY run_id, position`;
    for (const r of rrows) out.get(text(r.run_id))!.runs.push(text(r.input_run_id));
    return out;
  }

  async getRun(id: string): Promise<RunRecord | null> {
    return await this.#sql.begin("ISOLATION LEVEL REPEATABLE READ READ ONLY", async (tx: Tx) => {
      const rows = await tx`SELECT ${tx.unsafe(RUN_SELECT)} FROM runs WHERE id = ${id}`;
      if (rows.length === 0) return null;
      const row: DbRow = rows[0];
      const links = (await this.#links(tx, [id])).get(id)!;
      const fields = await this.#fields.runFields(tx, id);
      const record: RunRecord = {
        ...toRunSummary(row, links.series, links.runs),
        ...(fields.length ? { input_fields: fields } : {}),
        params: JSON.parse(text(row.params)),
        result: resultOfRow(row.result),
        error: jsonOrNull(row.error),
      };
      return record;
    });
  }

  async listRuns(
    q: { kind?: string; status?: RunStatus; limit: number; offset: number; viewer?: Viewer },
  ): Promise<Page<RunSummary>> {
    checkPaging("list runs", q.limit, q.offset);
    return await this.#sql.begin("ISOLATION LEVEL REPEATABLE READ READ ONLY", async (tx: Tx) => {
      const kind = q.kind === undefined ? tx`` : tx`AND r.kind = ${q.kind}`;
      const status = q.status === undefined ? tx`` : tx`AND r.status = ${q.status}`;
      const cols = tx(RUN_SUMMARY_COLUMNS.map((c) => "r." + c));
      const v = q.viewer;
      const [{ n }] = v === undefined
        ? await tx`SELECT count(*) AS n FROM runs r WHERE TRUE ${kind} ${status}`
        : await tx`
          SELECT count(*) AS n FROM runs r WHERE EXISTS (
            SELECT 1 FROM run_holdings h2 WHERE h2.run_id = r.id AND ${
          this.#visible(tx, "h2", v)
        }) ${kind} ${status}`;
      const rows = v === undefined
        ? await tx`
          SELECT ${cols} FROM runs r WHERE TRUE ${kind} ${status}
          ORDER BY r.created_at DESC, r.seq DESC LIMIT ${q.limit} OFFSET ${q.offset}`
        : await tx`
          SELECT ${cols},
            h.owner_id AS h_owner, h.visibility AS h_visibility, h.created_at AS h_created
          FROM runs r JOIN run_holdings h ON h.seq = (
            SELECT h2.seq FROM run_holdings h2 WHERE h2.run_id = r.id AND ${
          this.#visible(tx, "h2", v)
        }
            ${this.#pickOrder(tx, "h2", v)} LIMIT 1)
          WHERE TRUE ${kind} ${status}
          ORDER BY r.created_at DESC, r.seq DESC LIMIT ${q.limit} OFFSET ${q.offset}`;
      const links = await this.#links(tx, rows.map((r) => text(r.id)));
      const items = rows.map((r) => {
        const l = links.get(text(r.id))!;
        const summary = toRunSummary(r, l.series, l.runs);
        return v === undefined ? summary : { ...summary, ...viewOf(toHolding(r)) };
      });
      return { items, total: Number(n) };
    });
  }

  async runsUsingSeries(id: string, viewer?: Viewer): Promise<string[]> {
    const vis = viewer ? this.#visible(this.#sql, "h", viewer) : this.#sql`TRUE`;
    const rows = await this.#sql`
      SELECT DISTINCT r.id, r.created_at, r.seq
      FROM run_input_series l JOIN runs r ON r.id = l.run_id
      WHERE l.series_id = ${id} AND EXISTS (
        SELECT 1 FROM run_holdings h WHERE h.run_id = r.id AND ${vis})
      ORDER BY r.created_at DESC, r.seq DESC`;
    return rows.map((r) => text(r.id));
  }

  async claimRun(id: string, holder: string, leaseSeconds: number): Promise<RunRecord | null> {
    // The database's clock decides expiry, so machines with skewed clocks agree.
    const res = await this.#sql`
      UPDATE runs SET status = 'running', lease_holder = ${holder},
        lease_expires = now() + make_interval(secs => ${leaseSeconds}),
        updated_at = ${new Date().toISOString()}
      WHERE id = ${id} AND (status = 'queued' OR (status = 'running' AND
        (lease_expires IS NULL OR lease_expires < now())))
      RETURNING id`;
    return res.length ? await this.getRun(id) : null;
  }

  async renewLease(id: string, holder: string, leaseSeconds: number): Promise<boolean> {
    const res = await this.#sql`
      UPDATE runs SET lease_expires = now() + make_interval(secs => ${leaseSeconds})
      WHERE id = ${id} AND lease_holder = ${holder} AND status = 'running'`;
    return res.count === 1;
  }

  async updateLeased(
    id: string,
    holder: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<boolean> {
    const { result, ...rest } = patch;
    const cols: Record<string, unknown> = Object.fromEntries(
      encodeRunPatch(id, rest, new Date().toISOString()),
    );
    if (patch.status !== undefined && TERMINAL.has(patch.status)) cols.lease_holder = null;
    const res = await this.#sql`
      UPDATE runs SET ${this.#sql(cols as Record<string, string>)}${resultSet(this.#sql, result)}
      WHERE id = ${id} AND lease_holder = ${holder} AND status = 'running'`;
    return res.count === 1;
  }

  async cancelRun(id: string): Promise<{ status: RunStatus; changed: boolean } | null> {
    return await this.#sql.begin(async (tx: Tx) => {
      const rows = await tx`SELECT status FROM runs WHERE id = ${id} FOR UPDATE`;
      if (rows.length === 0) return null;
      const status = text(rows[0].status) as RunStatus;
      if (TERMINAL.has(status)) return { status, changed: false };
      await tx`UPDATE runs SET status = 'cancelled', eta_seconds = NULL, lease_holder = NULL,
        updated_at = ${new Date().toISOString()} WHERE id = ${id}`;
      return { status: "cancelled" as const, changed: true };
    });
  }

  /**
   * Fail orphaned runs (see `Store.failOrphaned`). The error is an RFC 9457 problem body
   * `{ type, title, status: 500, detail: reason }`.
   */
  async failOrphaned(
    reason: string,
    opts: { all: boolean; graceSeconds?: number },
  ): Promise<number> {
    const error = JSON.stringify(interruptedProblem(reason));
    const res = await this.#sql`
      UPDATE runs SET status = 'failed', error = ${error}, eta_seconds = NULL,
        lease_holder = NULL, updated_at = ${new Date().toISOString()}
      WHERE (status IN ('queued', 'running') AND ${opts.all})
         OR (status = 'running' AND (lease_expires IS NULL OR
           lease_expires < now() - make_interval(secs => ${opts.graceSeconds ?? 0})))`;
    return res.count;
  }

  async putOwner(o: OwnerRecord): Promise<void> {
    const rows = await this.#sql`
      INSERT INTO owners (id, name, role, group_name, created_at)
      VALUES (${o.id}, ${o.name}, ${o.role}, ${o.group}, ${o.created_at})
      ON CONFLICT (id) DO NOTHING RETURNING id`;
    if (rows.length === 0) throw new DuplicateOwnerError(o.id);
  }

  async getOwner(id: string): Promise<OwnerRecord | null> {
    const rows = await this.#sql`
      SELECT id, name, role, group_name, created_at FROM owners WHERE id = ${id}`;
    return rows.length ? toOwner(rows[0]) : null;
  }

  async listOwners(): Promise<OwnerRecord[]> {
    const rows = await this.#sql`
      SELECT id, name, role, group_name, created_at FROM owners ORDER BY created_at, id`;
    return rows.map((r) => toOwner(r));
  }

  async putApiKey(k: ApiKeyRecord): Promise<void> {
    await this.#sql.begin(async (tx: Tx) => {
      const owner = await tx`SELECT id FROM owners WHERE id = ${k.owner} FOR KEY SHARE`;
      if (owner.length === 0) {
        throw new RangeError(`Cannot add key ${k.id}: no owner has id "${k.owner}"`);
      }
      const rows = await tx`
        INSERT INTO api_keys ${
        tx({
          id: k.id,
          owner_id: k.owner,
          key_hash: k.hash,
          label: k.label,
          role: k.role,
          created_at: k.created_at,
          expires_at: k.expires_at,
          revoked_at: k.revoked_at,
        })
      } ON CONFLICT (id) DO NOTHING RETURNING id`;
      if (rows.length === 0) throw new RangeError(`Cannot add key ${k.id}: the id is taken`);
    });
  }

  async getApiKey(id: string): Promise<ApiKeyRecord | null> {
    const rows = await this.#sql`
      SELECT ${this.#sql([...API_KEY_COLUMNS])} FROM api_keys WHERE id = ${id}`;
    return rows.length ? toApiKey(rows[0]) : null;
  }

  async listApiKeys(owner?: string): Promise<ApiKeyRecord[]> {
    const where = owner === undefined ? this.#sql`` : this.#sql`WHERE owner_id = ${owner}`;
    const rows = await this.#sql`
      SELECT ${this.#sql([...API_KEY_COLUMNS])} FROM api_keys ${where} ORDER BY created_at, id`;
    return rows.map((r) => toApiKey(r));
  }

  async revokeApiKey(id: string, at: string): Promise<boolean> {
    const res = await this.#sql`
      UPDATE api_keys SET revoked_at = ${at} WHERE id = ${id} AND revoked_at IS NULL`;
    return res.count > 0;
  }

  async storedBytes(owner: string): Promise<number> {
    const [{ n }] = await this.#sql`
      SELECT
        COALESCE((SELECT sum(s.n) FROM series_holdings h JOIN series s ON s.id = h.series_id
                  WHERE h.owner_id = ${owner}), 0) * 24 +
        COALESCE((SELECT sum(octet_length(r.params) + COALESCE(octet_length(r.result), 0))
                  FROM run_holdings h JOIN runs r ON r.id = h.run_id
                  WHERE h.owner_id = ${owner}), 0) +
        COALESCE((SELECT sum(f.n_time::bigint * f.n_lat * f.n_lon) FROM field_holdings h
                  JOIN fields f ON f.id = h.field_id WHERE h.owner_id = ${owner}), 0) * 4 AS n`;
    return Number(n);
  }

  beginField(f: FieldStaging): Promise<number> {
    return this.#fields.begin(f);
  }

  putFieldBlock(
    stage: number,
    index: number,
    tStart: number,
    rows: number,
    values: Float32Array,
  ): Promise<void> {
    return this.#fields.putBlock(stage, index, tStart, rows, values);
  }

  commitField(
    stage: number,
    id: string,
    final?: FieldFinal,
    holder?: HolderSpec,
  ): Promise<{ created: boolean; field: FieldMeta }> {
    return this.#fields.commit(stage, id, final, holder);
  }

  abortField(stage: number): Promise<void> {
    return this.#fields.abort(stage);
  }

  dropStagedFields(olderThanSeconds: number): Promise<number> {
    return this.#fields.dropStaged(olderThanSeconds);
  }

  getField(id: string, viewer?: Viewer): Promise<FieldDescription | null> {
    return this.#fields.get(id, viewer);
  }

  listFields(q: { limit: number; offset: number; viewer?: Viewer }): Promise<Page<FieldMeta>> {
    return this.#fields.list(q);
  }

  fieldHolding(id: string, viewer: Viewer): Promise<Holding | null> {
    return this.#fields.holding(id, viewer);
  }

  setFieldVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    return this.#fields.setVisibility(id, owner, visibility);
  }

  deleteFieldHolding(id: string, owner: string): Promise<"deleted" | "not_found" | "in_use"> {
    return this.#fields.deleteHolding(id, owner);
  }

  readFieldSteps(id: string, tStart: number, tEnd: number): Promise<Float32Array> {
    return this.#fields.readSteps(id, tStart, tEnd);
  }

  readFieldCell(id: string, cell: number): Promise<Float32Array> {
    return this.#fields.readCell(id, cell);
  }

  deleteField(id: string): Promise<"deleted" | "not_found" | "in_use"> {
    return this.#fields.delete(id);
  }

  runsUsingField(id: string): Promise<string[]> {
    return this.#fields.runsUsing(id);
  }

  /** Applied schema steps, oldest first. */
  async schemaVersions(): Promise<{ version: number; name: string; applied_at: string }[]> {
    const rows = await this.#sql`
      SELECT version, name, applied_at FROM schema_migrations ORDER BY version`;
    return rows.map((r) => ({
      version: Number(r.version),
      name: text(r.name),
      applied_at: text(r.applied_at),
    }));
  }

  /** Close every pooled connection (waiting up to 5 s for queries in flight). Idempotent. */
  async close(): Promise<void> {
    await this.#sql.end({ timeout: 5 });
  }
}

/** Apply the missing schema steps in one transaction under an advisory lock. */
async function migrate(sql: Sql, migrations: readonly Migration[]): Promise<void> {
  migrations.forEach((m, i) => {
    if (m.version !== i + 1) {
      throw new SchemaMismatchError(
        `Cannot migrate store: migration versions must be 1, 2, 3...; position ${i} has ${m.version}`,
      );
    }
  });
  await sql.begin(async (tx: Tx) => {
    await tx`SELECT pg_advisory_xact_lock(${MIGRATION_LOCK_KEY})`;
    await tx`CREATE TABLE IF NOT EXISTS schema_migrations (
      version INTEGER PRIMARY KEY,
      name TEXT NOT NULL,
      applied_at TEXT NOT NULL
    )`;
    const applied = (await tx`SELECT version, name FROM schema_migrations ORDER BY version`)
      .map((r) => ({ version: Number(r.version), name: text(r.name) }));
    const newest = applied.length ? applied[applied.length - 1].version : 0;
    if (newest > migrations.length) {
      throw new SchemaMismatchError(
        `Cannot open store: its schema version ${newest} is newer than this service knows ` +
          `(${migrations.length}); upgrade the service`,
      );
    }
    applied.forEach((a, i) => {
      const m = migrations[i];
      if (a.version !== m.version || a.name !== m.name) {
        throw new SchemaMismatchError(
          `Cannot open store: applied schema step ${a.version} "${a.name}" differs from this ` +
            `service's step ${m.version} "${m.name}"`,
        );
      }
    });
    for (const m of migrations.slice(applied.length)) {
      await tx.unsafe(m.sql);
      await tx`INSERT INTO schema_migrations (version, name, applied_at)
        VALUES (${m.version}, ${m.name}, ${new Date().toISOString()})`;
    }
  });
}

/**
 * Connect to the PostgreSQL database at `url` and bring its schema up to date.
 *
 * @throws {SchemaMismatchError} when the database holds a newer or different schema.
 * @throws {Error} from the driver when the server cannot be reached.
 */
export async function openPostgresStore(options: PostgresStoreOptions): Promise<PostgresStore> {
  const sql = postgres(options.url, {
    max: options.max ?? 10,
    connect_timeout: options.connectTimeoutSeconds ?? 10,
    onnotice: () => {},
  });
  try {
    await migrate(sql, options.migrations ?? POSTGRES_MIGRATIONS);
  } catch (e) {
    await sql.end({ timeout: 1 });
    throw e;
  }
  return new PostgresStore(sql);
}
