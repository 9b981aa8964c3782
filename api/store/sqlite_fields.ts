/**
 * Stored fields on the SQLite store (see field_types.ts for the contract). Each method is one
 * short transaction run synchronously to completion, like the rest of the SQLite store; an
 * upload writes its blocks one transaction each, so no write lock is held while the file is
 * read.
 *
 * @module
 */
import type { DatabaseSync, SQLInputValue, StatementSync } from "node:sqlite";
import { uuidv7 } from "uuidv7";
import type { FieldDescription, FieldFinal, FieldMeta, FieldStaging } from "./field_types.ts";
import type { HolderSpec, Holding, Page, Viewer, Visibility } from "./types.ts";
import { DEFAULT_HOLDER } from "./common.ts";
import {
  assembleSteps,
  blockCount,
  bytesLEToFloat32,
  checkFieldBlock,
  checkFieldStaging,
  checkStepRange,
  coordinateBlobs,
  FIELD_COORD_COLUMNS,
  FIELD_META_COLUMNS,
  fieldMetaValues,
  float32ToBytesLE,
  toFieldDescription,
  toFieldMeta,
} from "./field_common.ts";
import { checkPaging } from "./common.ts";
import { MissingInputError } from "./errors.ts";

type Row = Record<string, SQLInputValue>;

const META = FIELD_META_COLUMNS.filter((c) => c !== "created_at").map((c) => "f." + c).join(", ");
const HOLDING = `h.owner_id AS owner_id, h.visibility AS visibility, h.created_at AS created_at`;

/** SQL of the visibility test of a holding row aliased `h`, and of the order a viewer's is picked. */
export interface HoldingSql {
  visibleTo(h: string, v: Viewer): { sql: string; args: SQLInputValue[] };
  pickOrder(h: string, v: Viewer): { sql: string; args: SQLInputValue[] };
}

/** The field tables of one SQLite connection. */
export class SqliteFields {
  #stmts = new Map<string, StatementSync>();
  /**
   * @param onWriteEnd called as each write transaction ends, committed or rolled back (the
   *   store's access-check answers are remembered until then)
   */
  constructor(
    private readonly db: DatabaseSync,
    private readonly holdings: HoldingSql,
    private readonly onWriteEnd: () => void = () => {},
  ) {}

  /** The join to the holding a viewer sees (or, without a viewer, the oldest). */
  #pick(v: Viewer | undefined): { sql: string; args: SQLInputValue[] } {
    if (!v) {
      return {
        sql: `JOIN field_holdings h ON h.seq =
          (SELECT min(h2.seq) FROM field_holdings h2 WHERE h2.field_id = f.id)`,
        args: [],
      };
    }
    const vis = this.holdings.visibleTo("h2", v), order = this.holdings.pickOrder("h2", v);
    return {
      sql: `JOIN field_holdings h ON h.seq = (SELECT h2.seq FROM field_holdings h2
        WHERE h2.field_id = f.id AND ${vis.sql} ${order.sql} LIMIT 1)`,
      args: [...vis.args, ...order.args],
    };
  }

  #stmt(sql: string): StatementSync {
    let s = this.#stmts.get(sql);
    if (!s) {
      s = this.db.prepare(sql);
      this.#stmts.set(sql, s);
    }
    return s;
  }

  #tx<T>(begin: string, fn: () => T): T {
    this.db.exec(begin);
    try {
      const out = fn();
      this.db.exec("COMMIT");
      return out;
    } catch (e) {
      if (this.db.isTransaction) this.db.exec("ROLLBACK");
      throw e;
    } finally {
      if (begin !== "BEGIN") this.onWriteEnd();
    }
  }

  begin(f: FieldStaging): number {
    checkFieldStaging(f);
    const cols = [...FIELD_META_COLUMNS, ...FIELD_COORD_COLUMNS, "state"];
    return this.#tx("BEGIN IMMEDIATE", () =>
      Number(
        this.#stmt(
          `INSERT INTO fields (${cols.join(", ")}) VALUES (${cols.map(() => "?").join(", ")})`,
        ).run(
          ...fieldMetaValues(`staging:${uuidv7()}`, f),
          ...coordinateBlobs(f),
          "staging",
        ).lastInsertRowid,
      ));
  }

  #staged(stage: number): Row {
    const row = this.#stmt(
      "SELECT n_time, n_lat, n_lon, block_rows FROM fields WHERE seq = ? AND state = 'staging'",
    ).get(stage) as Row | undefined;
    if (!row) throw new RangeError(`Cannot store field: no staged field ${stage}`);
    return row;
  }

  putBlock(stage: number, index: number, tStart: number, rows: number, values: Float32Array) {
    this.#tx("BEGIN IMMEDIATE", () => {
      const m = this.#staged(stage);
      checkFieldBlock(
        {
          n_time: Number(m.n_time),
          n_lat: Number(m.n_lat),
          n_lon: Number(m.n_lon),
          block_rows: Number(m.block_rows),
        },
        index,
        tStart,
        rows,
        values,
      );
      this.#stmt(
        "INSERT INTO field_blocks (field_seq, block, t_start, rows, data) VALUES (?, ?, ?, ?, ?)",
      ).run(stage, index, tStart, rows, float32ToBytesLE(values));
    });
  }

  commit(
    stage: number,
    id: string,
    final?: FieldFinal,
    holder: HolderSpec = DEFAULT_HOLDER,
  ): { created: boolean; field: FieldMeta } {
    return this.#tx("BEGIN IMMEDIATE", () => {
      const m = this.#staged(stage);
      const n = Number(
        (this.#stmt("SELECT count(*) AS n FROM field_blocks WHERE field_seq = ?").get(stage) as Row)
          .n,
      );
      const want = blockCount({ n_time: Number(m.n_time), block_rows: Number(m.block_rows) });
      if (n !== want) {
        throw new RangeError(`Cannot commit field ${id}: ${n} of ${want} blocks were stored`);
      }
      const now = new Date().toISOString();
      const existing = this.#stmt("SELECT seq FROM fields WHERE id = ? AND state = 'ready'")
        .get(id) as Row | undefined;
      let created = false;
      if (existing) {
        this.#stmt("DELETE FROM field_blocks WHERE field_seq = ?").run(stage);
        this.#stmt("DELETE FROM fields WHERE seq = ?").run(stage);
      } else {
        if (final) {
          this.#stmt("UPDATE fields SET missing = ?, info = ? WHERE seq = ?")
            .run(final.missing, JSON.stringify(final.info), stage);
        }
        this.#stmt("UPDATE fields SET id = ?, state = 'ready', created_at = ? WHERE seq = ?")
          .run(id, now, stage);
        created = true;
      }
      const held = this.#stmt(
        "INSERT OR IGNORE INTO field_holdings (field_id, owner_id, visibility, created_at) VALUES (?, ?, ?, ?)",
      ).run(id, holder.owner, holder.visibility, now);
      const field = this.#meta(id, { owner: holder.owner, group: null, admin: false })!;
      return { created: created || Number(held.changes) === 1, field };
    });
  }

  abort(stage: number): void {
    this.#tx("BEGIN IMMEDIATE", () => {
      this.#stmt(
        "DELETE FROM field_blocks WHERE field_seq IN (SELECT seq FROM fields WHERE seq = ? AND state = 'staging')",
      ).run(stage);
      this.#stmt("DELETE FROM fields WHERE seq = ? AND state = 'staging'").run(stage);
    });
  }

  dropStaged(olderThanSeconds: number): number {
    const before = new Date(Date.now() - olderThanSeconds * 1000).toISOString();
    return this.#tx("BEGIN IMMEDIATE", () => {
      this.#stmt(
        `DELETE FROM field_blocks WHERE field_seq IN
           (SELECT seq FROM fields WHERE state = 'staging' AND created_at < ?)`,
      ).run(before);
      return Number(
        this.#stmt("DELETE FROM fields WHERE state = 'staging' AND created_at < ?").run(before)
          .changes,
      );
    });
  }

  #meta(id: string, v?: Viewer): FieldMeta | null {
    const pick = this.#pick(v);
    const row = this.db.prepare(
      `SELECT ${META}, ${HOLDING} FROM fields f ${pick.sql} WHERE f.id = ? AND f.state = 'ready'`,
    ).get(...pick.args, id) as Row | undefined;
    return row ? toFieldMeta(row) : null;
  }

  get(id: string, v?: Viewer): FieldDescription | null {
    const pick = this.#pick(v);
    const row = this.db.prepare(
      `SELECT ${META}, ${HOLDING}, ${FIELD_COORD_COLUMNS.map((c) => "f." + c).join(", ")}
       FROM fields f ${pick.sql} WHERE f.id = ? AND f.state = 'ready'`,
    ).get(...pick.args, id) as Row | undefined;
    if (!row) return null;
    return toFieldDescription(row, (c) => (row[c] === null ? null : row[c] as Uint8Array));
  }

  list(q: { limit: number; offset: number; viewer?: Viewer }): Page<FieldMeta> {
    checkPaging("list fields", q.limit, q.offset);
    const pick = this.#pick(q.viewer);
    return this.#tx("BEGIN", () => {
      const total = Number(
        (this.db.prepare(
          `SELECT count(*) AS n FROM fields f ${pick.sql} WHERE f.state = 'ready'`,
        ).get(...pick.args) as Row).n,
      );
      const rows = this.db.prepare(
        `SELECT ${META}, ${HOLDING} FROM fields f ${pick.sql} WHERE f.state = 'ready'
         ORDER BY h.created_at DESC, h.seq DESC LIMIT ? OFFSET ?`,
      ).all(...pick.args, q.limit, q.offset) as Row[];
      return { items: rows.map(toFieldMeta), total };
    });
  }

  holding(id: string, v: Viewer): Holding | null {
    const vis = this.holdings.visibleTo("h", v), order = this.holdings.pickOrder("h", v);
    const row = this.db.prepare(
      `SELECT h.owner_id AS owner_id, h.visibility AS visibility, h.created_at AS created_at
       FROM field_holdings h JOIN fields f ON f.id = h.field_id AND f.state = 'ready'
       WHERE h.field_id = ? AND ${vis.sql} ${order.sql} LIMIT 1`,
    ).get(id, ...vis.args, ...order.args) as Row | undefined;
    return row
      ? {
        owner: String(row.owner_id),
        visibility: String(row.visibility) as Visibility,
        created_at: String(row.created_at),
      }
      : null;
  }

  setVisibility(id: string, owner: string, visibility: Visibility): boolean {
    return this.#tx("BEGIN IMMEDIATE", () =>
      Number(
        this.#stmt("UPDATE field_holdings SET visibility = ? WHERE field_id = ? AND owner_id = ?")
          .run(visibility, id, owner).changes,
      ) === 1);
  }

  /** Runs using the field: those `owner` holds, and how many others. */
  #usage(id: string, owner: string): { own: number; others: number } {
    const own = Number(
      (this.#stmt(
        `SELECT count(DISTINCT l.run_id) AS n FROM run_input_fields l
         JOIN run_holdings h ON h.run_id = l.run_id AND h.owner_id = ? WHERE l.field_id = ?`,
      ).get(owner, id) as Row).n,
    );
    const others = Number(
      (this.#stmt(
        `SELECT count(DISTINCT l.run_id) AS n FROM run_input_fields l WHERE l.field_id = ?
         AND NOT EXISTS (SELECT 1 FROM run_holdings h WHERE h.run_id = l.run_id AND h.owner_id = ?)`,
      ).get(id, owner) as Row).n,
    );
    return { own, others };
  }

  deleteHolding(id: string, owner: string): "deleted" | "not_found" | "in_use" {
    return this.#tx("BEGIN IMMEDIATE", (): "deleted" | "not_found" | "in_use" => {
      const mine = this.#stmt(
        "SELECT 1 AS one FROM field_holdings WHERE field_id = ? AND owner_id = ?",
      ).get(id, owner);
      if (!mine) return "not_found";
      const usage = this.#usage(id, owner);
      if (usage.own > 0) return "in_use";
      const others = this.#stmt(
        "SELECT 1 AS one FROM field_holdings WHERE field_id = ? AND owner_id <> ? LIMIT 1",
      ).get(id, owner);
      if (others) {
        this.#stmt("DELETE FROM field_holdings WHERE field_id = ? AND owner_id = ?").run(id, owner);
        return "deleted";
      }
      if (usage.others > 0) return "in_use";
      const row = this.#stmt("SELECT seq FROM fields WHERE id = ?").get(id) as Row;
      this.#stmt("DELETE FROM field_holdings WHERE field_id = ?").run(id);
      this.#stmt("DELETE FROM field_blocks WHERE field_seq = ?").run(row.seq);
      this.#stmt("DELETE FROM fields WHERE seq = ?").run(row.seq);
      return "deleted";
    });
  }

  #blocks(id: string, tStart: number, tEnd: number) {
    const row = this.#stmt(
      "SELECT seq, n_time, n_lat, n_lon FROM fields WHERE id = ? AND state = 'ready'",
    ).get(id) as Row | undefined;
    if (!row) throw new RangeError(`Cannot read field ${id}: no such field`);
    const nTime = Number(row.n_time), per = Number(row.n_lat) * Number(row.n_lon);
    checkStepRange(id, nTime, tStart, tEnd);
    const rows = this.#stmt(
      `SELECT t_start, rows, data FROM field_blocks
       WHERE field_seq = ? AND t_start < ? AND t_start + rows > ? ORDER BY block`,
    ).all(row.seq, tEnd, tStart) as Row[];
    return {
      per,
      nTime,
      blocks: rows.map((b) => ({
        t_start: Number(b.t_start),
        rows: Number(b.rows),
        values: bytesLEToFloat32(b.data as Uint8Array, Number(b.rows) * per),
      })),
    };
  }

  readSteps(id: string, tStart: number, tEnd: number): Float32Array {
    return this.#tx("BEGIN", () => {
      const { per, blocks } = this.#blocks(id, tStart, tEnd);
      return assembleSteps(blocks, per, tStart, tEnd);
    });
  }

  readCell(id: string, cell: number): Float32Array {
    return this.#tx("BEGIN", () => {
      const row = this.#stmt(
        "SELECT seq, n_time, n_lat, n_lon FROM fields WHERE id = ? AND state = 'ready'",
      ).get(id) as Row | undefined;
      if (!row) throw new RangeError(`Cannot read field ${id}: no such field`);
      const nTime = Number(row.n_time), per = Number(row.n_lat) * Number(row.n_lon);
      if (!(Number.isInteger(cell) && cell >= 0 && cell < per)) {
        throw new RangeError(`Cannot read field ${id}: cell ${cell} is not within 0..${per}`);
      }
      const out = new Float32Array(nTime);
      // one block in memory at a time
      const it = this.#stmt(
        "SELECT t_start, rows, data FROM field_blocks WHERE field_seq = ? ORDER BY block",
      ).iterate(row.seq) as Iterable<Row>;
      for (const b of it) {
        const t0 = Number(b.t_start), rows = Number(b.rows);
        const v = bytesLEToFloat32(b.data as Uint8Array, rows * per);
        for (let t = 0; t < rows; t++) out[t0 + t] = v[t * per + cell];
      }
      return out;
    });
  }

  delete(id: string): "deleted" | "not_found" | "in_use" {
    return this.#tx("BEGIN IMMEDIATE", () => {
      const row = this.#stmt("SELECT seq FROM fields WHERE id = ? AND state = 'ready'").get(id) as
        | Row
        | undefined;
      if (!row) return "not_found";
      if (this.#stmt("SELECT 1 AS one FROM run_input_fields WHERE field_id = ? LIMIT 1").get(id)) {
        return "in_use";
      }
      this.#stmt("DELETE FROM field_holdings WHERE field_id = ?").run(id);
      this.#stmt("DELETE FROM field_blocks WHERE field_seq = ?").run(row.seq);
      this.#stmt("DELETE FROM fields WHERE seq = ?").run(row.seq);
      return "deleted";
    });
  }

  runsUsing(id: string): string[] {
    const rows = this.#stmt(
      `SELECT DISTINCT r.id AS id, r.created_at AS created_at, r.seq AS seq
       FROM run_input_fields l JOIN runs r ON r.id = l.run_id
       WHERE l.field_id = ? ORDER BY r.created_at DESC, r.seq DESC`,
    ).all(id) as Row[];
    return rows.map((r) => String(r.id));
  }

  /** Inside the caller's write transaction: check the run's input fields exist, link them. */
  linkRun(runId: string, fieldIds: readonly string[]): void {
    const has = this.#stmt("SELECT 1 AS one FROM fields WHERE id = ? AND state = 'ready'");
    for (const id of fieldIds) {
      if (!has.get(id)) throw new MissingInputError(runId, "field", id);
    }
    const ins = this.#stmt(
      "INSERT INTO run_input_fields (run_id, position, field_id) VALUES (?, ?, ?)",
    );
    fieldIds.forEach((fid, i) => ins.run(runId, i, fid));
  }

  /** Inside the caller's read transaction: a run's input fields in order. */
  runFields(runId: string): string[] {
    const rows = this.#stmt(
      "SELECT field_id FROM run_input_fields WHERE run_id = ? ORDER BY position",
    ).all(runId) as Row[];
    return rows.map((r) => String(r.field_id));
  }

  clear(): void {
    this.#stmts.clear();
  }
}
