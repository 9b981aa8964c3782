/**
 * The embedded store: one SQLite file (or `:memory:`) through `node:sqlite`'s DatabaseSync.
 *
 * - WAL journal, `busy_timeout`, `synchronous = FULL` (an acknowledged write survives a crash
 *   of the process and of the machine), foreign keys on.
 * - Every write is one `BEGIN IMMEDIATE` transaction: the write lock is taken up front, so a
 *   second writer waits for it (up to the busy timeout) instead of failing with SQLITE_BUSY
 *   on a read-to-write upgrade. Reads that touch several tables run in one read transaction.
 * - The schema is built by numbered migrations, applied once and in order, each recorded in
 *   `schema_migrations`; a file written by a newer schema is refused.
 * - Series points are three blobs of little-endian doubles (time, value, uncertainty) in
 *   `series_points`, apart from the metadata so listings never read them.
 * - A run's input series and input runs live in link tables indexed by the input id, so
 *   `runsUsingSeries` and the in-use check of `deleteSeries` are index look-ups. Both link
 *   tables are foreign keys: a run whose inputs are not stored is refused
 *   (`MissingInputError`), and no delete can leave a run pointing at nothing.
 * - Owners, API keys (hashes only) and holdings: `series_holdings` and `run_holdings` say who
 *   holds each series or run and with what visibility, keyed by (content id, owner), so the
 *   same content uploaded by two owners is stored once and neither learns of the other.
 *   Reads for a viewer pick the holding it may see (its own first) in SQL, so listings page
 *   correctly.
 *
 * The methods are async to honour the `Store` interface, but each one runs synchronously to
 * completion: no transaction is ever held open across an `await`. A file store writes large
 * series in a worker with its own connection (api/store/sqlite_writer.ts), so the request
 * thread is not held by a long write.
 *
 * @module
 */
import { DatabaseSync, type SQLInputValue, type StatementSync } from "node:sqlite";
import { dirname } from "node:path";
import type {
  ApiKeyRecord,
  HolderSpec,
  Holding,
  HoldingRef,
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
import { FIELD_MIGRATION_NAME, SQLITE_FIELD_SQL } from "./field_common.ts";
import { SqliteFields } from "./sqlite_fields.ts";
import { TERMINAL } from "./types.ts";
import { OFFLOAD_POINTS, SqliteWriter } from "./sqlite_writer.ts";
import { countWrite, sharedWriteCounter, writesOf } from "./sqlite_changes.ts";
import {
  checkPaging,
  checkSeries,
  checkVisibility,
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
import { LARGE_RESULT_BYTES, parseResult, resultBytesOf } from "./result_text.ts";

/** SQLite's default `wal_autocheckpoint`, restored after such a commit. */
const WAL_AUTOCHECKPOINT_PAGES = 1000;
import {
  DuplicateOwnerError,
  DuplicateRunError,
  MissingInputError,
  RunNotFoundError,
  SchemaMismatchError,
  TerminalRunError,
} from "./errors.ts";

/** The schema history of the SQLite store, oldest first. */
export const SQLITE_MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    name: "series, points, runs and run inputs",
    sql: `
      CREATE TABLE series (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
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
        start_time REAL NOT NULL,
        end_time REAL NOT NULL,
        derived_from TEXT,
        created_at TEXT NOT NULL
      );
      CREATE INDEX series_newest ON series (created_at DESC, seq DESC);
      CREATE INDEX series_by_quantity ON series (quantity, created_at DESC, seq DESC);
      CREATE INDEX series_by_origin ON series (derived_from);

      CREATE TABLE series_points (
        series_id TEXT PRIMARY KEY REFERENCES series (id) ON DELETE CASCADE,
        time BLOB NOT NULL,
        value BLOB NOT NULL,
        uncertainty BLOB
      );

      CREATE TABLE runs (
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
        id TEXT NOT NULL UNIQUE,
        kind TEXT NOT NULL,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL,
        status TEXT NOT NULL
          CHECK (status IN ('queued', 'running', 'succeeded', 'failed', 'cancelled')),
        progress REAL NOT NULL,
        params TEXT NOT NULL,
        service_version TEXT NOT NULL,
        algorithm_version TEXT NOT NULL,
        seed INTEGER,
        result TEXT,
        result_digest TEXT,
        error TEXT,
        eta_seconds REAL
      );
      CREATE INDEX runs_newest ON runs (created_at DESC, seq DESC);
      CREATE INDEX runs_by_kind ON runs (kind, created_at DESC, seq DESC);
      CREATE INDEX runs_by_status ON runs (status, created_at DESC, seq DESC);

      CREATE TABLE run_input_series (
        run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
        position INTEGER NOT NULL,
        series_id TEXT NOT NULL REFERENCES series (id),
        PRIMARY KEY (run_id, position)
      ) WITHOUT ROWID;
      CREATE INDEX run_input_series_by_series ON run_input_series (series_id);

      CREATE TABLE run_input_runs (
        run_id TEXT NOT NULL REFERENCES runs (id) ON DELETE CASCADE,
        position INTEGER NOT NULL,
        input_run_id TEXT NOT NULL REFERENCES runs (id),
        PRIMARY KEY (run_id, position)
      ) WITHOUT ROWID;
      CREATE INDEX run_input_runs_by_input ON run_input_runs (input_run_id);
    `,
  },
  {
    version: 2,
    name: "run leases",
    sql: `
      ALTER TABLE runs ADD COLUMN lease_holder TEXT;
      ALTER TABLE runs ADD COLUMN lease_expires_ms INTEGER;
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
        VALUES ('local', 'Local owner', 'admin', 'default', strftime('%Y-%m-%dT%H:%M:%fZ', 'now'));

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
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
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
        seq INTEGER PRIMARY KEY AUTOINCREMENT,
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
  { version: 4, name: FIELD_MIGRATION_NAME, sql: SQLITE_FIELD_SQL },
];

/** The visibility test of a holding row aliased `h` for a viewer, with its arguments. */
export function visibleTo(h: string, v: Viewer): { sql: string; args: SQLInputValue[] } {
  if (v.admin) return { sql: "1 = 1", args: [] };
  if (v.owner === null) return { sql: `${h}.visibility = 'public'`, args: [] };
  return {
    sql: `(${h}.owner_id = ? OR ${h}.visibility = 'public' OR (${h}.visibility = 'group' AND
      EXISTS (SELECT 1 FROM owners o WHERE o.id = ${h}.owner_id AND o.group_name = ?)))`,
    args: [v.owner, v.group ?? ""],
  };
}

/** The order in which a viewer's holding is chosen: its own, then the widest, then the oldest. */
export function pickOrder(h: string, v: Viewer): { sql: string; args: SQLInputValue[] } {
  return {
    sql: `ORDER BY (${h}.owner_id = ?) DESC,
      CASE ${h}.visibility WHEN 'public' THEN 0 WHEN 'group' THEN 1 ELSE 2 END, ${h}.seq`,
    args: [v.owner ?? ""],
  };
}

const API_KEY_COLUMNS = "id, owner_id, key_hash, label, role, created_at, expires_at, revoked_at";

/** The owner and visibility fields of a holding, as listings show them. */
function viewOf(h: Holding): { created_at: string; owner: string; visibility: Visibility } {
  return { created_at: h.created_at, owner: h.owner, visibility: h.visibility };
}

/** Most access-check answers a store remembers between changes of its database. */
const MAX_REMEMBERED_HOLDINGS = 10_000;

const HOLDING_COLUMNS =
  "h.owner_id AS h_owner, h.visibility AS h_visibility, h.created_at AS h_created";

/** Options of {@link openSqliteStore}. */
export interface SqliteStoreOptions {
  /** A file path (parent directories are created) or ":memory:". */
  path: string;
  /**
   * How long a writer waits for another connection's write lock before failing, ms.
   * @default 10000
   */
  busyTimeoutMs?: number;
  /**
   * The write counter shared with this process's other connections to the file (a worker
   * passes the one it was given); by default this thread's counter for the file.
   */
  writeCounter?: Int32Array;
  /**
   * How often, at most, access checks read `PRAGMA data_version` to see writes made by another
   * process or program (this process's own connections are counted at once), ms. @default 1
   */
  outsideCheckMs?: number;
  /** Schema steps to apply; tests use this to simulate other versions. @default SQLITE_MIGRATIONS */
  migrations?: readonly Migration[];
  /**
   * Write series of more than OFFLOAD_POINTS points in a worker with its own connection (file
   * stores only; see api/store/sqlite_writer.ts), and runs whose result has at least
   * LARGE_RESULT_BYTES bytes (api/store/result_text.ts). @default true
   */
  offload?: boolean;
  /**
   * Commit a large result without the automatic WAL checkpoint and checkpoint on this thread
   * once the commit has been answered (the writer worker's own store). @default false
   */
  checkpointLater?: boolean;
}

/** How often access checks read `PRAGMA data_version`, at most, ms (see `#checkHoldingsVersion`). */
const OUTSIDE_CHECK_MS = 1;

const SERIES_META = SERIES_META_COLUMNS.join(", ");
const RUN_ALL = RUN_COLUMNS.join(", ");
const marks = (n: number) => Array(n).fill("?").join(", ");

type Row = Record<string, SQLInputValue>;

/** Run synchronous work as a promise: a throw becomes a rejection, as callers of async expect. */
function settle<T>(fn: () => T): Promise<T> {
  try {
    return Promise.resolve(fn());
  } catch (e) {
    return Promise.reject(e);
  }
}

/** A `Store` on one SQLite database. Create it with {@link openSqliteStore}. */
export class SqliteStore implements Store {
  readonly kind = "sqlite";
  #db: DatabaseSync;
  #stmts = new Map<string, StatementSync>();
  /** Access-check answers since the database last changed (see `#holding`). */
  #holdings = new Map<string, Holding | null>();
  /** The write count and data_version the remembered answers were read at. */
  #holdingsWrites = -1;
  #holdingsDataVersion = -1;

  #writer: SqliteWriter | null;
  /** Checkpoint after a large result's commit on this thread (see `checkpointLater`). */
  #checkpointLater: boolean;

  /** Use {@link openSqliteStore}; the constructor expects a database already migrated. */
  constructor(
    db: DatabaseSync,
    readonly path: string,
    writer: SqliteWriter | null = null,
    counter: Int32Array = new Int32Array(new SharedArrayBuffer(4)),
    outsideCheckMs = OUTSIDE_CHECK_MS,
    checkpointLater = false,
  ) {
    this.#checkpointLater = checkpointLater;
    this.#db = db;
    this.#writer = writer;
    this.#writes = counter;
    this.#outsideCheckMs = outsideCheckMs;
    this.#fields = new SqliteFields(db, { visibleTo, pickOrder }, () => countWrite(counter));
  }

  #fields: SqliteFields;

  #stmt(sql: string): StatementSync {
    let s = this.#stmts.get(sql);
    if (!s) {
      s = this.#db.prepare(sql);
      this.#stmts.set(sql, s);
    }
    return s;
  }

  /** Run `fn` in one transaction opened by `begin`, committed on return, rolled back on throw. */
  #transaction<T>(begin: string, fn: () => T): T {
    this.#db.exec(begin);
    try {
      const out = fn();
      this.#db.exec("COMMIT");
      return out;
    } catch (e) {
      if (this.#db.isTransaction) this.#db.exec("ROLLBACK");
      throw e;
    } finally {
      if (begin !== "BEGIN") countWrite(this.#writes);
    }
  }

  /**
   * {@link #write} for a transaction that stores a run result: when the result is large, its
   * commit skips the automatic WAL checkpoint (which would copy the result into the database
   * file, and fsync it, before the request can answer) and the writer worker checkpoints
   * instead, off this thread (PASSIVE: it never waits for readers or writers). The commit itself
   * is as durable as any (WAL written and synced, `synchronous = FULL`); a later commit here
   * checkpoints as usual if the worker has not yet. Measured on a 38 MB result: the commit took
   * 230-400 ms with the checkpoint, 130-330 ms without (test/bench/http_peers.ts).
   */
  #writeResult<T>(
    result: unknown,
    fn: () => T,
    size = result ? resultBytesOf(result as object)?.length ?? 0 : 0,
  ): T {
    const writer = this.#writer;
    if (size < LARGE_RESULT_BYTES || (!writer && !this.#checkpointLater)) return this.#write(fn);
    try {
      return this.#withoutAutoCheckpoint(() => this.#write(fn));
    } finally {
      if (writer) writer.checkpoint();
      else {
        // after the caller has answered (a task, not a microtask)
        setTimeout(() => {
          try {
            this.checkpointWal();
          } catch {
            // busy or closing: the next commit's automatic checkpoint does it
          }
        }, 0);
      }
    }
  }

  /**
   * Run `fn` (its own write transactions) with the automatic WAL checkpoint off, then turn it
   * back on unless a field upload is in progress (see {@link SqliteStore.beginField}).
   */
  #withoutAutoCheckpoint<T>(fn: () => T): T {
    this.#db.exec("PRAGMA wal_autocheckpoint = 0");
    try {
      return fn();
    } finally {
      if (this.#uploading.size === 0) {
        this.#db.exec(`PRAGMA wal_autocheckpoint = ${WAL_AUTOCHECKPOINT_PAGES}`);
      }
    }
  }

  /** Field uploads in progress on a file store: staged, not yet committed or aborted. */
  #uploading = new Set<number>();

  /** An upload is over: the writer worker checkpoints what the WAL holds (PASSIVE). */
  #endUpload(stage: number): void {
    if (!this.#uploading.delete(stage)) return;
    if (this.#uploading.size === 0) {
      this.#db.exec(`PRAGMA wal_autocheckpoint = ${WAL_AUTOCHECKPOINT_PAGES}`);
    }
    this.#writer?.checkpoint();
  }

  /** Run `fn` in one write transaction taken with BEGIN IMMEDIATE. */
  #write<T>(fn: () => T): T {
    return this.#transaction("BEGIN IMMEDIATE", fn);
  }

  /** Run `fn` in one read transaction (a consistent snapshot across statements). */
  #read<T>(fn: () => T): T {
    return this.#transaction("BEGIN", fn);
  }

  ping(): Promise<boolean> {
    return settle(() => {
      try {
        const row = this.#stmt("SELECT 1 AS one").get() as Row | undefined;
        return row?.one === 1;
      } catch {
        return false;
      }
    });
  }

  /** Copy what the WAL holds into the database file, without waiting for anyone (PASSIVE). */
  checkpointWal(): void {
    this.#db.prepare("PRAGMA wal_checkpoint(PASSIVE)").get();
  }

  /** Result of `PRAGMA integrity_check`: "ok" for a sound file, else SQLite's findings. */
  integrityCheck(): string {
    const rows = this.#db.prepare("PRAGMA integrity_check").all() as Row[];
    return rows.map((r) => String(r.integrity_check)).join("\n");
  }

  /** The connection's durability and locking settings, as SQLite reports them. */
  settings(): {
    journal_mode: string;
    busy_timeout: number;
    synchronous: number;
    foreign_keys: number;
    wal_autocheckpoint: number;
  } {
    const one = (pragma: string) => {
      const row = this.#db.prepare(`PRAGMA ${pragma}`).get() as Row;
      return Object.values(row)[0];
    };
    return {
      journal_mode: String(one("journal_mode")),
      busy_timeout: Number(one("busy_timeout")),
      synchronous: Number(one("synchronous")),
      foreign_keys: Number(one("foreign_keys")),
      wal_autocheckpoint: Number(one("wal_autocheckpoint")),
    };
  }

  /** Applied schema steps, oldest first. */
  schemaVersions(): { version: number; name: string; applied_at: string }[] {
    const rows = this.#db.prepare(
      "SELECT version, name, applied_at FROM schema_migrations ORDER BY version",
    ).all() as Row[];
    return rows.map((r) => ({
      version: Number(r.version),
      name: text(r.name),
      applied_at: text(r.applied_at),
    }));
  }

  putSeries(
    s: StoredSeries,
    holder: HolderSpec = DEFAULT_HOLDER,
  ): Promise<{ created: boolean; series: SeriesMeta }> {
    if (this.#writer && s.n > OFFLOAD_POINTS) {
      try {
        checkSeries(s);
        checkVisibility(`store series ${s.id}`, holder.visibility);
      } catch (e) {
        return Promise.reject(e);
      }
      return this.#writer.putSeries(s, holder);
    }
    return settle(() => {
      checkSeries(s);
      checkVisibility(`store series ${s.id}`, holder.visibility);
      const out = this.#write(() => {
        const existing = this.#stmt(`SELECT ${SERIES_META} FROM series WHERE id = ?`)
          .get(s.id) as Row | undefined;
        const meta = existing ? toSeriesMeta(existing) : metaOf(s);
        if (!existing) {
          this.#stmt(
            `INSERT INTO series (${SERIES_META}) VALUES (${marks(SERIES_META_COLUMNS.length)})`,
          ).run(...seriesMetaValues(s));
          this.#stmt(
            "INSERT INTO series_points (series_id, time, value, uncertainty) VALUES (?, ?, ?, ?)",
          ).run(
            s.id,
            float64ToBytesLE(s.time),
            float64ToBytesLE(s.value),
            s.uncertainty === null ? null : float64ToBytesLE(s.uncertainty),
          );
        }
        const held = this.#stmt(
          `SELECT ${HOLDING_COLUMNS} FROM series_holdings h WHERE h.series_id = ? AND h.owner_id = ?`,
        ).get(s.id, holder.owner) as Row | undefined;
        if (held) return { created: false, series: { ...meta, ...viewOf(toHolding(held)) } };
        this.#stmt(
          `INSERT INTO series_holdings (series_id, owner_id, visibility, created_at)
           VALUES (?, ?, ?, ?)`,
        ).run(s.id, holder.owner, holder.visibility, s.created_at);
        return {
          created: true,
          series: { ...meta, ...viewOf({ ...holder, created_at: s.created_at }) },
        };
      });
      return out;
    });
  }

  getSeries(id: string): Promise<StoredSeries | null> {
    return settle(() => {
      const row = this.#stmt(
        `SELECT ${
          SERIES_META_COLUMNS.map((c) => "s." + c).join(", ")
        }, p.time AS p_time, p.value AS p_value, p.uncertainty AS p_uncertainty
         FROM series s JOIN series_points p ON p.series_id = s.id WHERE s.id = ?`,
      ).get(id) as Row | undefined;
      if (!row) return null;
      const meta = toSeriesMeta(row);
      return ({
        ...meta,
        time: bytesLEToFloat64(row.p_time as Uint8Array, meta.n),
        value: bytesLEToFloat64(row.p_value as Uint8Array, meta.n),
        uncertainty: row.p_uncertainty === null
          ? null
          : bytesLEToFloat64(row.p_uncertainty as Uint8Array, meta.n),
      });
    });
  }

  getSeriesMeta(id: string): Promise<SeriesMeta | null> {
    return settle(() => {
      const row = this.#stmt(`SELECT ${SERIES_META} FROM series WHERE id = ?`).get(id) as
        | Row
        | undefined;
      return row ? toSeriesMeta(row) : null;
    });
  }

  listSeries(
    q: { quantity?: string; limit: number; offset: number; viewer?: Viewer },
  ): Promise<Page<SeriesMeta>> {
    return settle(() => {
      checkPaging("list series", q.limit, q.offset);
      const page = this.#read(() => {
        const where = q.quantity === undefined ? "" : "WHERE quantity = ?";
        const args: SQLInputValue[] = q.quantity === undefined ? [] : [q.quantity];
        if (q.viewer === undefined) {
          const total = Number(
            (this.#stmt(`SELECT count(*) AS n FROM series ${where}`).get(...args) as Row).n,
          );
          const rows = this.#stmt(
            `SELECT ${SERIES_META} FROM series ${where}
             ORDER BY created_at DESC, seq DESC LIMIT ? OFFSET ?`,
          ).all(...args, q.limit, q.offset) as Row[];
          return { items: rows.map(toSeriesMeta), total };
        }
        const vis = visibleTo("h2", q.viewer);
        const order = pickOrder("h2", q.viewer);
        const cond = q.quantity === undefined ? "" : "AND s.quantity = ?";
        const total = Number(
          (this.#stmt(
            `SELECT count(*) AS n FROM series s WHERE EXISTS (
               SELECT 1 FROM series_holdings h2 WHERE h2.series_id = s.id AND ${vis.sql}) ${cond}`,
          ).get(...vis.args, ...args) as Row).n,
        );
        const rows = this.#stmt(
          `SELECT ${SERIES_META_COLUMNS.map((c) => "s." + c).join(", ")}, ${HOLDING_COLUMNS}
           FROM series s JOIN series_holdings h ON h.seq = (
             SELECT h2.seq FROM series_holdings h2 WHERE h2.series_id = s.id AND ${vis.sql}
             ${order.sql} LIMIT 1)
           WHERE 1 = 1 ${cond}
           ORDER BY h.created_at DESC, h.seq DESC LIMIT ? OFFSET ?`,
        ).all(...vis.args, ...order.args, ...args, q.limit, q.offset) as Row[];
        return {
          items: rows.map((r) => {
            const hold = toHolding(r);
            return { ...toSeriesMeta(r), ...viewOf(hold) };
          }),
          total,
        };
      });
      return page;
    });
  }

  seriesHolding(id: string, viewer: Viewer): Promise<Holding | null> {
    return settle(() => this.#holding("series_holdings", "series_id", id, viewer));
  }

  runHolding(id: string, viewer: Viewer): Promise<Holding | null> {
    return settle(() => this.#holding("run_holdings", "run_id", id, viewer));
  }

  holdings(items: readonly HoldingRef[], viewer: Viewer): Promise<(Holding | null)[]> {
    return settle(() => this.holdingsNow(items, viewer));
  }

  holdingsNow(items: readonly HoldingRef[], viewer: Viewer): (Holding | null)[] {
    this.#checkHoldingsVersion();
    return items.map((it) =>
      it.kind === "run"
        ? this.#remembered("run_holdings", "run_id", it.id, viewer)
        : this.#remembered("series_holdings", "series_id", it.id, viewer)
    );
  }

  /**
   * The holding through which `viewer` sees an item: every GET and 304 asks, so answers are
   * remembered until the database changes in any way: this connection's writes are counted as
   * its write transactions end ({@link #writesEnded}), and `PRAGMA data_version` changes when
   * another connection commits (another process, the series writer), so a visibility, holding
   * or group change anywhere is seen by the next check (see {@link #checkHoldingsVersion}). The
   * visibility query this saves joins holdings and owners. `holdings` asks once for several
   * items.
   */
  #holding(table: string, key: string, id: string, viewer: Viewer): Holding | null {
    this.#checkHoldingsVersion();
    return this.#remembered(table, key, id, viewer);
  }

  /** Write transactions ended on this process's connections to the file (sqlite_changes.ts). */
  #writes: Int32Array;
  /** `PRAGMA data_version` as last read, when (Date.now()), and how often it is read. */
  #dataVersion = 0;
  #dataVersionAt = -Infinity;
  #outsideCheckMs: number;

  /**
   * Forget remembered holdings when the database changed since the last check.
   *
   * Every connection this process opens on the file (this one, another store's, the series
   * writer's in its worker) counts its write transactions in one shared counter
   * (api/store/sqlite_changes.ts), so any change made through sunlag in this process is seen by
   * the next check, with one atomic load. A SQLite file is served by one process; writes by
   * another program or process are seen through `PRAGMA data_version`, read when the last read
   * is {@link SqliteStoreOptions.outsideCheckMs} (1 ms) old or more. That statement takes the
   * WAL's read lock: read on every request it halved the requests per second of a cached 304.
   */
  #checkHoldingsVersion(): void {
    // Date.now() (a V8 builtin, where performance.now() is a call into the runtime); a clock
    // set back reads at once
    const now = Date.now();
    const age = now - this.#dataVersionAt;
    if (age >= this.#outsideCheckMs || age < 0) {
      this.#dataVersion = Number((this.#stmt("PRAGMA data_version").get() as Row).data_version);
      this.#dataVersionAt = now;
    }
    const writes = writesOf(this.#writes);
    if (writes !== this.#holdingsWrites || this.#dataVersion !== this.#holdingsDataVersion) {
      this.#holdings.clear();
      this.#holdingsWrites = writes;
      this.#holdingsDataVersion = this.#dataVersion;
    }
  }

  /** The holding, from what is remembered since the last version check or else queried. */
  #remembered(table: string, key: string, id: string, viewer: Viewer): Holding | null {
    const k = `${table}\u0000${id}\u0000${viewer.admin ? 1 : 0}\u0000${viewer.owner ?? ""}\u0000${
      viewer.group ?? ""
    }`;
    const hit = this.#holdings.get(k);
    if (hit !== undefined) return hit && { ...hit };
    const vis = visibleTo("h", viewer);
    const order = pickOrder("h", viewer);
    const row = this.#stmt(
      `SELECT ${HOLDING_COLUMNS} FROM ${table} h WHERE h.${key} = ? AND ${vis.sql}
       ${order.sql} LIMIT 1`,
    ).get(id, ...vis.args, ...order.args) as Row | undefined;
    const found = row ? toHolding(row) : null;
    if (this.#holdings.size >= MAX_REMEMBERED_HOLDINGS) this.#holdings.clear();
    this.#holdings.set(k, found && { ...found });
    return found;
  }

  setSeriesVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    return this.#setVisibility("series_holdings", "series_id", id, owner, visibility);
  }

  setRunVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    return this.#setVisibility("run_holdings", "run_id", id, owner, visibility);
  }

  #setVisibility(
    table: string,
    key: string,
    id: string,
    owner: string,
    visibility: Visibility,
  ): Promise<boolean> {
    return settle(() => {
      checkVisibility(`share ${id}`, visibility);
      return this.#write(() =>
        Number(
          this.#stmt(`UPDATE ${table} SET visibility = ? WHERE ${key} = ? AND owner_id = ?`)
            .run(visibility, id, owner).changes,
        ) > 0
      );
    });
  }

  #usage(id: string, owner: string): SeriesUsage {
    const own = this.#stmt(
      `SELECT DISTINCT r.id AS id, r.created_at AS created_at, r.seq AS seq
       FROM run_input_series l JOIN runs r ON r.id = l.run_id
       JOIN run_holdings h ON h.run_id = r.id AND h.owner_id = ?
       WHERE l.series_id = ? ORDER BY r.created_at DESC, r.seq DESC`,
    ).all(owner, id) as Row[];
    const others = Number(
      (this.#stmt(
        `SELECT count(DISTINCT l.run_id) AS n FROM run_input_series l
         WHERE l.series_id = ? AND NOT EXISTS (
           SELECT 1 FROM run_holdings h WHERE h.run_id = l.run_id AND h.owner_id = ?)`,
      ).get(id, owner) as Row).n,
    );
    return { own: own.map((r) => text(r.id)), others };
  }

  seriesUsage(id: string, owner: string): Promise<SeriesUsage> {
    return settle(() => this.#read(() => this.#usage(id, owner)));
  }

  deleteSeriesHolding(id: string, owner: string): Promise<"deleted" | "not_found" | "in_use"> {
    return settle(() =>
      this.#write((): "deleted" | "not_found" | "in_use" => {
        const mine = this.#stmt(
          "SELECT 1 AS one FROM series_holdings WHERE series_id = ? AND owner_id = ?",
        );
        if (!mine.get(id, owner)) return "not_found";
        const usage = this.#usage(id, owner);
        if (usage.own.length) return "in_use";
        const others = this.#stmt(
          "SELECT 1 AS one FROM series_holdings WHERE series_id = ? AND owner_id <> ? LIMIT 1",
        ).get(id, owner);
        if (others) {
          this.#stmt("DELETE FROM series_holdings WHERE series_id = ? AND owner_id = ?").run(
            id,
            owner,
          );
          return "deleted";
        }
        if (usage.others > 0) return "in_use";
        this.#stmt("DELETE FROM series_points WHERE series_id = ?").run(id);
        this.#stmt("DELETE FROM series WHERE id = ?").run(id);
        return "deleted";
      })
    );
  }

  deleteSeries(id: string): Promise<"deleted" | "not_found" | "in_use"> {
    return settle(() => {
      const out = this.#write((): "deleted" | "not_found" | "in_use" => {
        if (!this.#stmt("SELECT 1 AS one FROM series WHERE id = ?").get(id)) return "not_found";
        if (
          this.#stmt("SELECT 1 AS one FROM run_input_series WHERE series_id = ? LIMIT 1").get(id)
        ) {
          return "in_use";
        }
        this.#stmt("DELETE FROM series_points WHERE series_id = ?").run(id);
        this.#stmt("DELETE FROM series WHERE id = ?").run(id);
        return "deleted";
      });
      return out;
    });
  }

  #writeLinks(runId: string, inputSeries: readonly string[], inputRuns: readonly string[]): void {
    const ins = this.#stmt(
      "INSERT INTO run_input_series (run_id, position, series_id) VALUES (?, ?, ?)",
    );
    inputSeries.forEach((sid, i) => ins.run(runId, i, sid));
    const inr = this.#stmt(
      "INSERT INTO run_input_runs (run_id, position, input_run_id) VALUES (?, ?, ?)",
    );
    inputRuns.forEach((rid, i) => inr.run(runId, i, rid));
  }

  #checkInputs(runId: string, inputSeries: readonly string[], inputRuns: readonly string[]) {
    const hasSeries = this.#stmt("SELECT 1 AS one FROM series WHERE id = ?");
    for (const id of inputSeries) {
      if (!hasSeries.get(id)) throw new MissingInputError(runId, "series", id);
    }
    const hasRun = this.#stmt("SELECT 1 AS one FROM runs WHERE id = ?");
    for (const id of inputRuns) {
      if (!hasRun.get(id)) throw new MissingInputError(runId, "run", id);
    }
  }

  /**
   * Insert a new run, atomically with its input links.
   * @throws {DuplicateRunError} when the id is taken.
   * @throws {MissingInputError} when an input series or input run is not stored.
   */
  putRun(r: RunRecord, holder: HolderSpec = DEFAULT_HOLDER): Promise<void> {
    const bytes = resultBytesOf(r.result);
    if (this.#writer && bytes && bytes.length >= LARGE_RESULT_BYTES) {
      try {
        checkVisibility(`insert run ${r.id}`, holder.visibility);
      } catch (e) {
        return Promise.reject(e);
      }
      return this.#writer.putRun(r, bytes, holder);
    }
    return settle(() => {
      checkVisibility(`insert run ${r.id}`, holder.visibility);
      this.#writeResult(r.result, () => {
        if (this.#stmt("SELECT 1 AS one FROM runs WHERE id = ?").get(r.id)) {
          throw new DuplicateRunError(r.id);
        }
        this.#checkInputs(r.id, r.input_series, r.input_runs);
        this.#stmt(
          `INSERT INTO runs (${RUN_ALL}) VALUES (${marks(RUN_COLUMNS.length)})`,
        ).run(...runValues(r, "bytes"));
        this.#writeLinks(r.id, r.input_series, r.input_runs);
        if (r.input_fields?.length) this.#fields.linkRun(r.id, r.input_fields);
        this.#stmt(
          `INSERT INTO run_holdings (run_id, owner_id, visibility, created_at) VALUES (?, ?, ?, ?)`,
        ).run(r.id, holder.owner, holder.visibility, r.created_at);
      }, bytes?.length ?? 0);
      return undefined;
    });
  }

  addRunHolding(id: string, holder: HolderSpec): Promise<boolean> {
    return settle(() => {
      checkVisibility(`hold run ${id}`, holder.visibility);
      return this.#write(() => {
        if (!this.#stmt("SELECT 1 AS one FROM runs WHERE id = ?").get(id)) {
          throw new RunNotFoundError(id);
        }
        const res = this.#stmt(
          `INSERT INTO run_holdings (run_id, owner_id, visibility, created_at)
           VALUES (?, ?, ?, ?) ON CONFLICT (run_id, owner_id) DO NOTHING`,
        ).run(id, holder.owner, holder.visibility, new Date().toISOString());
        return Number(res.changes) > 0;
      });
    });
  }

  /**
   * Change the given fields of a run. `updated_at` is set to now unless the patch carries it.
   * Input lists in the patch replace the stored ones.
   * @throws {RunNotFoundError} when no run has this id.
   * @throws {MissingInputError} when a new input series or input run is not stored.
   */
  updateRun(
    id: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<void> {
    return settle(() => {
      const cols = encodeRunPatch(id, patch, new Date().toISOString(), "bytes");
      const sets = cols.map(([c]) => `${c} = ?`);
      const args = cols.map(([, v]) => v);
      this.#writeResult(patch.result, () => {
        const res = this.#db.prepare(
          `UPDATE runs SET ${sets.join(", ")} WHERE id = ? AND status IN ('queued', 'running')`,
        ).run(...args, id);
        if (Number(res.changes) === 0) {
          if (!this.#stmt("SELECT 1 AS one FROM runs WHERE id = ?").get(id)) {
            throw new RunNotFoundError(id);
          }
          throw new TerminalRunError(id);
        }
        if (patch.input_series !== undefined || patch.input_runs !== undefined) {
          this.#checkInputs(id, patch.input_series ?? [], patch.input_runs ?? []);
          if (patch.input_series !== undefined) {
            this.#stmt("DELETE FROM run_input_series WHERE run_id = ?").run(id);
          }
          if (patch.input_runs !== undefined) {
            this.#stmt("DELETE FROM run_input_runs WHERE run_id = ?").run(id);
          }
          this.#writeLinks(id, patch.input_series ?? [], patch.input_runs ?? []);
        }
      });
      return undefined;
    });
  }

  #links(runIds: string[]): Map<string, { series: string[]; runs: string[] }> {
    const out = new Map<string, { series: string[]; runs: string[] }>();
    for (const id of runIds) out.set(id, { series: [], runs: [] });
    if (runIds.length === 0) return out;
    const ids = JSON.stringify(runIds);
    const srows = this.#stmt(
      `SELECT run_id, series_id FROM run_input_series
       WHERE run_id IN (SELECT value FROM json_each(?)) ORDER BY run_id, position`,
    ).all(ids) as Row[];
    for (const r of srows) out.get(text(r.run_id))!.series.push(text(r.series_id));
    const rrows = this.#stmt(
      `SELECT run_id, input_run_id FROM run_input_runs
       WHERE run_id IN (SELECT value FROM json_each(?)) ORDER BY run_id, position`,
    ).all(ids) as Row[];
    for (const r of rrows) out.get(text(r.run_id))!.runs.push(text(r.input_run_id));
    return out;
  }

  getRun(id: string): Promise<RunRecord | null> {
    return settle(() => this.#getRunSync(id));
  }

  #getRunSync(id: string): RunRecord | null {
    return this.#read(() => {
      const row = this.#stmt(`SELECT ${RUN_ALL} FROM runs WHERE id = ?`).get(id) as
        | Row
        | undefined;
      if (!row) return null;
      const links = this.#links([id]).get(id)!;
      const fields = this.#fields.runFields(id);
      const record: RunRecord = {
        ...toRunSummary(row, links.series, links.runs),
        ...(fields.length ? { input_fields: fields } : {}),
        params: JSON.parse(text(row.params)),
        result: parseResult(row.result),
        error: jsonOrNull(row.error),
      };
      return record;
    });
  }

  listRuns(
    q: { kind?: string; status?: RunStatus; limit: number; offset: number; viewer?: Viewer },
  ): Promise<Page<RunSummary>> {
    return settle(() => {
      checkPaging("list runs", q.limit, q.offset);
      const page = this.#read(() => {
        const conds: string[] = [];
        const args: SQLInputValue[] = [];
        if (q.kind !== undefined) {
          conds.push("r.kind = ?");
          args.push(q.kind);
        }
        if (q.status !== undefined) {
          conds.push("r.status = ?");
          args.push(q.status);
        }
        const cols = RUN_SUMMARY_COLUMNS.map((c) => "r." + c).join(", ");
        let total: number;
        let rows: Row[];
        if (q.viewer === undefined) {
          const where = conds.length ? "WHERE " + conds.join(" AND ") : "";
          total = Number(
            (this.#stmt(`SELECT count(*) AS n FROM runs r ${where}`).get(...args) as Row).n,
          );
          rows = this.#stmt(
            `SELECT ${cols} FROM runs r ${where}
             ORDER BY r.created_at DESC, r.seq DESC LIMIT ? OFFSET ?`,
          ).all(...args, q.limit, q.offset) as Row[];
        } else {
          const vis = visibleTo("h2", q.viewer);
          const order = pickOrder("h2", q.viewer);
          const more = conds.length ? "AND " + conds.join(" AND ") : "";
          total = Number(
            (this.#stmt(
              `SELECT count(*) AS n FROM runs r WHERE EXISTS (
                 SELECT 1 FROM run_holdings h2 WHERE h2.run_id = r.id AND ${vis.sql}) ${more}`,
            ).get(...vis.args, ...args) as Row).n,
          );
          rows = this.#stmt(
            `SELECT ${cols}, ${HOLDING_COLUMNS}
             FROM runs r JOIN run_holdings h ON h.seq = (
               SELECT h2.seq FROM run_holdings h2 WHERE h2.run_id = r.id AND ${vis.sql}
               ${order.sql} LIMIT 1)
             WHERE 1 = 1 ${more}
             ORDER BY r.created_at DESC, r.seq DESC LIMIT ? OFFSET ?`,
          ).all(...vis.args, ...order.args, ...args, q.limit, q.offset) as Row[];
        }
        const links = this.#links(rows.map((r) => text(r.id)));
        const items = rows.map((r) => {
          const l = links.get(text(r.id))!;
          const summary = toRunSummary(r, l.series, l.runs);
          return q.viewer === undefined ? summary : { ...summary, ...viewOf(toHolding(r)) };
        });
        return { items, total };
      });
      return page;
    });
  }

  runsUsingSeries(id: string, viewer?: Viewer): Promise<string[]> {
    return settle(() => {
      const vis = viewer ? visibleTo("h", viewer) : { sql: "1 = 1", args: [] };
      const rows = this.#stmt(
        `SELECT DISTINCT r.id AS id, r.created_at AS created_at, r.seq AS seq
         FROM run_input_series l JOIN runs r ON r.id = l.run_id
         WHERE l.series_id = ? AND EXISTS (
           SELECT 1 FROM run_holdings h WHERE h.run_id = r.id AND ${vis.sql})
         ORDER BY r.created_at DESC, r.seq DESC`,
      ).all(id, ...vis.args) as Row[];
      return rows.map((r) => text(r.id));
    });
  }

  /**
   * Mark every queued or running run failed, as after a restart that lost them. The error is
   * an RFC 9457 problem body `{ type, title, status: 500, detail: reason }`.
   */
  claimRun(id: string, holder: string, leaseSeconds: number): Promise<RunRecord | null> {
    return settle(() => {
      const claimed = this.#write(() =>
        Number(
          this.#stmt(
            `UPDATE runs SET status = 'running', lease_holder = ?, lease_expires_ms = ? + ?,
               updated_at = ?
             WHERE id = ? AND (status = 'queued' OR (status = 'running' AND
               (lease_expires_ms IS NULL OR lease_expires_ms < ?)))`,
          ).run(holder, nowMs(), leaseSeconds * 1000, new Date().toISOString(), id, nowMs())
            .changes,
        )
      );
      return claimed ? this.#getRunSync(id) : null;
    });
  }

  renewLease(id: string, holder: string, leaseSeconds: number): Promise<boolean> {
    return settle(() =>
      this.#write(() =>
        Number(
          this.#stmt(
            `UPDATE runs SET lease_expires_ms = ? + ?
             WHERE id = ? AND lease_holder = ? AND status = 'running'`,
          ).run(nowMs(), leaseSeconds * 1000, id, holder).changes,
        ) === 1
      )
    );
  }

  updateLeased(
    id: string,
    holder: string,
    patch: Partial<Omit<RunRecord, "id" | "kind" | "created_at">>,
  ): Promise<boolean> {
    return settle(() => {
      const cols = encodeRunPatch(id, patch, new Date().toISOString(), "bytes");
      const sets = cols.map(([c]) => `${c} = ?`);
      const args = cols.map(([, v]) => v);
      const ended = patch.status !== undefined && TERMINAL.has(patch.status);
      return this.#writeResult(patch.result, () =>
        Number(
          this.#db.prepare(
            `UPDATE runs SET ${sets.join(", ")}${ended ? ", lease_holder = NULL" : ""}
             WHERE id = ? AND lease_holder = ? AND status = 'running'`,
          ).run(...args, id, holder).changes,
        ) === 1);
    });
  }

  cancelRun(id: string): Promise<{ status: RunStatus; changed: boolean } | null> {
    return settle(() =>
      this.#write(() => {
        const row = this.#stmt("SELECT status FROM runs WHERE id = ?").get(id) as Row | undefined;
        if (!row) return null;
        const status = text(row.status) as RunStatus;
        if (TERMINAL.has(status)) return { status, changed: false };
        this.#stmt(
          `UPDATE runs SET status = 'cancelled', eta_seconds = NULL, lease_holder = NULL,
             updated_at = ? WHERE id = ?`,
        ).run(new Date().toISOString(), id);
        return { status: "cancelled" as const, changed: true };
      })
    );
  }

  failOrphaned(reason: string, opts: { all: boolean; graceSeconds?: number }): Promise<number> {
    return settle(() => {
      const error = JSON.stringify(interruptedProblem(reason));
      return this.#write(() =>
        Number(
          this.#stmt(
            `UPDATE runs SET status = 'failed', error = ?, eta_seconds = NULL, lease_holder = NULL,
               updated_at = ?
             WHERE (status IN ('queued', 'running') AND ? = 1)
                OR (status = 'running' AND (lease_expires_ms IS NULL OR lease_expires_ms < ?))`,
          ).run(
            error,
            new Date().toISOString(),
            opts.all ? 1 : 0,
            nowMs() - (opts.graceSeconds ?? 0) * 1000,
          ).changes,
        )
      );
    });
  }

  putOwner(o: OwnerRecord): Promise<void> {
    return settle(() => {
      this.#write(() => {
        if (this.#stmt("SELECT 1 AS one FROM owners WHERE id = ?").get(o.id)) {
          throw new DuplicateOwnerError(o.id);
        }
        this.#stmt(
          "INSERT INTO owners (id, name, role, group_name, created_at) VALUES (?, ?, ?, ?, ?)",
        ).run(o.id, o.name, o.role, o.group, o.created_at);
      });
      return undefined;
    });
  }

  getOwner(id: string): Promise<OwnerRecord | null> {
    return settle(() => {
      const row = this.#stmt(
        "SELECT id, name, role, group_name, created_at FROM owners WHERE id = ?",
      ).get(id) as Row | undefined;
      return row ? toOwner(row) : null;
    });
  }

  listOwners(): Promise<OwnerRecord[]> {
    return settle(() =>
      (this.#stmt(
        "SELECT id, name, role, group_name, created_at FROM owners ORDER BY created_at, id",
      ).all() as Row[]).map(toOwner)
    );
  }

  putApiKey(k: ApiKeyRecord): Promise<void> {
    return settle(() => {
      this.#write(() => {
        if (!this.#stmt("SELECT 1 AS one FROM owners WHERE id = ?").get(k.owner)) {
          throw new RangeError(`Cannot add key ${k.id}: no owner has id "${k.owner}"`);
        }
        if (this.#stmt("SELECT 1 AS one FROM api_keys WHERE id = ?").get(k.id)) {
          throw new RangeError(`Cannot add key ${k.id}: the id is taken`);
        }
        this.#stmt(
          `INSERT INTO api_keys (${API_KEY_COLUMNS}) VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
        ).run(k.id, k.owner, k.hash, k.label, k.role, k.created_at, k.expires_at, k.revoked_at);
      });
      return undefined;
    });
  }

  getApiKey(id: string): Promise<ApiKeyRecord | null> {
    return settle(() => {
      const row = this.#stmt(`SELECT ${API_KEY_COLUMNS} FROM api_keys WHERE id = ?`).get(id) as
        | Row
        | undefined;
      return row ? toApiKey(row) : null;
    });
  }

  listApiKeys(owner?: string): Promise<ApiKeyRecord[]> {
    return settle(() => {
      const rows = owner === undefined
        ? this.#stmt(`SELECT ${API_KEY_COLUMNS} FROM api_keys ORDER BY created_at, id`).all()
        : this.#stmt(
          `SELECT ${API_KEY_COLUMNS} FROM api_keys WHERE owner_id = ? ORDER BY created_at, id`,
        ).all(owner);
      return (rows as Row[]).map(toApiKey);
    });
  }

  revokeApiKey(id: string, at: string): Promise<boolean> {
    return settle(() =>
      this.#write(() =>
        Number(
          this.#stmt("UPDATE api_keys SET revoked_at = ? WHERE id = ? AND revoked_at IS NULL")
            .run(at, id).changes,
        ) > 0
      )
    );
  }

  storedBytes(owner: string): Promise<number> {
    return settle(() => {
      const row = this.#read(() =>
        this.#stmt(
          `SELECT
             COALESCE((SELECT sum(s.n) FROM series_holdings h JOIN series s ON s.id = h.series_id
                       WHERE h.owner_id = ?), 0) * 24 +
             COALESCE((SELECT sum(length(CAST(r.params AS BLOB)) +
                              COALESCE(length(CAST(r.result AS BLOB)), 0))
                       FROM run_holdings h JOIN runs r ON r.id = h.run_id
                       WHERE h.owner_id = ?), 0) +
             COALESCE((SELECT sum(f.n_time * f.n_lat * f.n_lon) FROM field_holdings h
                       JOIN fields f ON f.id = h.field_id WHERE h.owner_id = ?), 0) * 4 AS n`,
        ).get(owner, owner, owner) as Row
      );
      return Number(row.n);
    });
  }

  /**
   * Stage a field. On a file store, its blocks are then committed by the writer worker (WAL
   * written and synced, `synchronous = FULL`, each block durable) without the automatic
   * checkpoint, which would copy every block a second time, into the database file, and fsync
   * it, in the writer's path; and this connection's commits skip it too until the upload ends,
   * so that no request here copies an upload's blocks. When the field is committed or aborted
   * the writer checkpoints once, off the request path (PASSIVE: it never waits for readers or
   * writers). Measured on 38 blocks of 4 MiB: the commits took about 60 % as long without the
   * automatic checkpoint (test/bench/sqlite_field_blocks.ts).
   */
  beginField(f: FieldStaging): Promise<number> {
    return settle(() => {
      const stage = this.#fields.begin(f);
      if (this.#writer) {
        this.#uploading.add(stage);
        this.#db.exec("PRAGMA wal_autocheckpoint = 0");
      }
      return stage;
    });
  }

  putFieldBlock(
    stage: number,
    index: number,
    tStart: number,
    rows: number,
    values: Float32Array,
  ): Promise<void> {
    // a file store writes blocks in its writer worker (sqlite_writer.ts), off the request thread
    if (this.#writer) return this.#writer.putFieldBlock(stage, index, tStart, rows, values);
    // the WAL keeps the blocks until the field's commit checkpoints (see beginField)
    return settle(() =>
      this.#withoutAutoCheckpoint(() => this.#fields.putBlock(stage, index, tStart, rows, values))
    );
  }

  commitField(
    stage: number,
    id: string,
    final?: FieldFinal,
    holder?: HolderSpec,
  ): Promise<{ created: boolean; field: FieldMeta }> {
    // (see beginField) without a writer, the commit's automatic checkpoint copies the blocks
    if (!this.#writer) return settle(() => this.#fields.commit(stage, id, final, holder));
    return settle(() => {
      const done = this.#withoutAutoCheckpoint(() => this.#fields.commit(stage, id, final, holder));
      this.#endUpload(stage);
      return done;
    });
  }

  abortField(stage: number): Promise<void> {
    return settle(() => {
      try {
        this.#fields.abort(stage);
      } finally {
        this.#endUpload(stage);
      }
    });
  }

  dropStagedFields(olderThanSeconds: number): Promise<number> {
    return settle(() => this.#fields.dropStaged(olderThanSeconds));
  }

  getField(id: string, viewer?: Viewer): Promise<FieldDescription | null> {
    return settle(() => this.#fields.get(id, viewer));
  }

  listFields(q: { limit: number; offset: number; viewer?: Viewer }): Promise<Page<FieldMeta>> {
    return settle(() => this.#fields.list(q));
  }

  fieldHolding(id: string, viewer: Viewer): Promise<Holding | null> {
    return settle(() => this.#fields.holding(id, viewer));
  }

  setFieldVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    return settle(() => this.#fields.setVisibility(id, owner, visibility));
  }

  deleteFieldHolding(id: string, owner: string): Promise<"deleted" | "not_found" | "in_use"> {
    return settle(() => this.#fields.deleteHolding(id, owner));
  }

  readFieldSteps(id: string, tStart: number, tEnd: number): Promise<Float32Array> {
    return settle(() => this.#fields.readSteps(id, tStart, tEnd));
  }

  readFieldCell(id: string, cell: number): Promise<Float32Array> {
    return settle(() => this.#fields.readCell(id, cell));
  }

  deleteField(id: string): Promise<"deleted" | "not_found" | "in_use"> {
    return settle(() => this.#fields.delete(id));
  }

  runsUsingField(id: string): Promise<string[]> {
    return settle(() => this.#fields.runsUsing(id));
  }

  async close(): Promise<void> {
    await this.#writer?.close();
    this.#writer = null;
    if (this.#db.isOpen) {
      this.#stmts.clear();
      this.#fields.clear();
      this.#db.close();
    }
  }
}

/** Milliseconds since the epoch on this machine's clock (one machine shares a SQLite file). */
function nowMs(): number {
  return Date.now();
}

/** Apply the missing schema steps in one BEGIN IMMEDIATE transaction (safe when racing). */
function migrate(db: DatabaseSync, migrations: readonly Migration[]): void {
  migrations.forEach((m, i) => {
    if (m.version !== i + 1) {
      throw new SchemaMismatchError(
        `Cannot migrate store: migration versions must be 1, 2, 3...; position ${i} has ${m.version}`,
      );
    }
  });
  db.exec("BEGIN IMMEDIATE");
  try {
    db.exec(`CREATE TABLE IF NOT EXISTS schema_migrations (
      version INTEGER PRIMARY KEY,
      name TEXT NOT NULL,
      applied_at TEXT NOT NULL
    )`);
    const applied = (db.prepare("SELECT version, name FROM schema_migrations ORDER BY version")
      .all() as Row[]).map((r) => ({ version: Number(r.version), name: text(r.name) }));
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
    const record = db.prepare(
      "INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)",
    );
    for (const m of migrations.slice(applied.length)) {
      db.exec(m.sql);
      record.run(m.version, m.name, new Date().toISOString());
    }
    db.exec("COMMIT");
  } catch (e) {
    if (db.isTransaction) db.exec("ROLLBACK");
    throw e;
  }
}

/**
 * Open (creating when needed) the SQLite store at `path`, a file path or ":memory:", and bring
 * its schema up to date.
 *
 * @throws {SchemaMismatchError} when the file was written by a newer or different schema.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { openSqliteStore } from "./sqlite.ts";
 * const store = await openSqliteStore({ path: ":memory:" });
 * assert.equal(await store.ping(), true);
 * assert.equal((await store.listSeries({ limit: 10, offset: 0 })).total, 0);
 * await store.close();
 * ```
 */
export async function openSqliteStore(options: SqliteStoreOptions): Promise<SqliteStore> {
  const path = options.path;
  if (path === "") throw new RangeError("Cannot open SQLite store: path must not be empty");
  if (path !== ":memory:") await Deno.mkdir(dirname(path), { recursive: true });
  const db = new DatabaseSync(path);
  try {
    db.exec(`PRAGMA busy_timeout = ${Math.max(0, Math.round(options.busyTimeoutMs ?? 10_000))}`);
    const mode = (db.prepare("PRAGMA journal_mode = WAL").get() as Row).journal_mode;
    if (path !== ":memory:" && mode !== "wal") {
      throw new Error(`Cannot open SQLite store ${path}: WAL journal refused (mode is ${mode})`);
    }
    db.exec("PRAGMA synchronous = FULL");
    // After a checkpoint, shrink a write-ahead log that a large upload grew beyond 64 MiB.
    db.exec("PRAGMA journal_size_limit = 67108864");
    db.exec("PRAGMA foreign_keys = ON");
    migrate(db, options.migrations ?? SQLITE_MIGRATIONS);
  } catch (e) {
    db.close();
    throw e;
  }
  const counter = options.writeCounter ??
    (path === ":memory:"
      ? new Int32Array(new SharedArrayBuffer(4))
      : sharedWriteCounter(Deno.realPathSync(path)));
  const offload = path !== ":memory:" && (options.offload ?? true);
  const writer = offload
    ? new SqliteWriter(path, options.busyTimeoutMs ?? 10_000, counter.buffer as SharedArrayBuffer)
    : null;
  return new SqliteStore(
    db,
    path,
    writer,
    counter,
    options.outsideCheckMs ?? OUTSIDE_CHECK_MS,
    options.checkpointLater ?? false,
  );
}
