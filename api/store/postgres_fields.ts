/**
 * Stored fields on the PostgreSQL store (see field_types.ts for the contract). Blocks travel
 * as base64 text, decoded and encoded by the server, as series points do (postgres.ts says
 * why). `deleteField` takes the field row `FOR UPDATE` and a run that uses a field takes it
 * `FOR KEY SHARE`, so a delete and a run serialise and the in-use rule holds.
 *
 * @module
 */
import type postgres from "postgres";
import { Buffer } from "node:buffer";
import { uuidv7 } from "uuidv7";
import type { FieldDescription, FieldFinal, FieldMeta, FieldStaging } from "./field_types.ts";
import type { HolderSpec, Holding, Page, Viewer, Visibility } from "./types.ts";
import { DEFAULT_HOLDER } from "./common.ts";
import {
  blockCount,
  bytesLEToFloat32,
  checkFieldBlock,
  checkFieldStaging,
  checkStepRange,
  coordinateBlobs,
  copyBlockSteps,
  FIELD_COORD_COLUMNS,
  FIELD_META_COLUMNS,
  fieldMetaValues,
  float32ToBytesLE,
  toFieldDescription,
  toFieldMeta,
} from "./field_common.ts";
import { checkPaging } from "./common.ts";
import { MissingInputError } from "./errors.ts";

type Sql = postgres.Sql;
type Tx = postgres.TransactionSql;
type Row = Record<string, unknown>;

const b64 = (b: Uint8Array | null) => (b === null ? null : Buffer.from(b).toString("base64"));
const bytes = (
  s: unknown,
) => (s === null || s === undefined ? null : Buffer.from(String(s), "base64"));

/** SQL fragments of the visibility test of a holding row aliased `h`, and of the order. */
export interface PgHoldingSql {
  visible(tx: Sql | Tx, h: string, v: Viewer): postgres.PendingQuery<postgres.Row[]>;
  pickOrder(tx: Sql | Tx, h: string, v: Viewer): postgres.PendingQuery<postgres.Row[]>;
}

const META = FIELD_META_COLUMNS.filter((c) => c !== "created_at").map((c) => "f." + c);

/** The field tables of one PostgreSQL database. */
export class PostgresFields {
  constructor(private readonly sql: Sql, private readonly holdings: PgHoldingSql) {}

  /** The join to the holding a viewer sees (or, without a viewer, the oldest). */
  #pick(tx: Sql | Tx, v: Viewer | undefined) {
    if (!v) {
      return tx`JOIN field_holdings h ON h.seq =
        (SELECT min(h2.seq) FROM field_holdings h2 WHERE h2.field_id = f.id)`;
    }
    return tx`JOIN field_holdings h ON h.seq = (SELECT h2.seq FROM field_holdings h2
      WHERE h2.field_id = f.id AND ${this.holdings.visible(tx, "h2", v)}
      ${this.holdings.pickOrder(tx, "h2", v)} LIMIT 1)`;
  }

  #meta(tx: Tx | Sql, v: Viewer | undefined, where: postgres.PendingQuery<postgres.Row[]>) {
    return tx`
      SELECT ${tx(META)}, h.owner_id, h.visibility, h.created_at
      FROM fields f ${this.#pick(tx, v)}
      WHERE f.state = 'ready' ${where}`;
  }

  async begin(f: FieldStaging): Promise<number> {
    checkFieldStaging(f);
    const values = fieldMetaValues(`staging:${uuidv7()}`, f);
    const coords = coordinateBlobs(f);
    const row: Record<string, unknown> = {
      ...Object.fromEntries(FIELD_META_COLUMNS.map((c, i) => [c, values[i]])),
      ...Object.fromEntries(
        FIELD_COORD_COLUMNS.map((c, i) => [c, coords[i] === null ? null : Buffer.from(coords[i]!)]),
      ),
      state: "staging",
    };
    // deno-lint-ignore no-explicit-any
    const [ins] = await this.sql`INSERT INTO fields ${this.sql(row as any)} RETURNING seq`;
    return Number(ins.seq);
  }

  async #staged(tx: Tx, stage: number): Promise<Row> {
    const rows = await tx`
      SELECT n_time, n_lat, n_lon, block_rows FROM fields
      WHERE seq = ${stage} AND state = 'staging' FOR UPDATE`;
    if (rows.length === 0) throw new RangeError(`Cannot store field: no staged field ${stage}`);
    return rows[0];
  }

  async putBlock(
    stage: number,
    index: number,
    tStart: number,
    rows: number,
    values: Float32Array,
  ): Promise<void> {
    await this.sql.begin(async (tx: Tx) => {
      const m = await this.#staged(tx, stage);
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
      await tx`
        INSERT INTO field_blocks (field_seq, block, t_start, rows, data) VALUES (${stage},
          ${index}, ${tStart}, ${rows}, decode(${b64(float32ToBytesLE(values))}, 'base64'))`;
    });
  }

  async commit(
    stage: number,
    id: string,
    final?: FieldFinal,
    holder: HolderSpec = DEFAULT_HOLDER,
  ): Promise<{ created: boolean; field: FieldMeta }> {
    return await this.sql.begin(async (tx: Tx) => {
      const m = await this.#staged(tx, stage);
      const [{ n }] = await tx`SELECT count(*) AS n FROM field_blocks WHERE field_seq = ${stage}`;
      const want = blockCount({ n_time: Number(m.n_time), block_rows: Number(m.block_rows) });
      if (Number(n) !== want) {
        throw new RangeError(`Cannot commit field ${id}: ${n} of ${want} blocks were stored`);
      }
      // serialise commits of the same content
      await tx`SELECT pg_advisory_xact_lock(hashtext(${id}))`;
      const now = new Date().toISOString();
      const existing = await tx`SELECT seq FROM fields WHERE id = ${id} AND state = 'ready'`;
      let created = false;
      if (existing.length) {
        await tx`DELETE FROM field_blocks WHERE field_seq = ${stage}`;
        await tx`DELETE FROM fields WHERE seq = ${stage}`;
      } else {
        if (final) {
          await tx`UPDATE fields SET missing = ${final.missing}, info = ${
            JSON.stringify(final.info)
          }
            WHERE seq = ${stage}`;
        }
        await tx`UPDATE fields SET id = ${id}, state = 'ready', created_at = ${now}
          WHERE seq = ${stage}`;
        created = true;
      }
      const held = await tx`
        INSERT INTO field_holdings (field_id, owner_id, visibility, created_at)
        VALUES (${id}, ${holder.owner}, ${holder.visibility}, ${now})
        ON CONFLICT (field_id, owner_id) DO NOTHING RETURNING seq`;
      const [row] = await this.#meta(
        tx,
        { owner: holder.owner, group: null, admin: false },
        tx`AND f.id = ${id}`,
      );
      return { created: created || held.length === 1, field: toFieldMeta(row) };
    });
  }

  async abort(stage: number): Promise<void> {
    await this.sql.begin(async (tx: Tx) => {
      await tx`DELETE FROM field_blocks WHERE field_seq IN
        (SELECT seq FROM fields WHERE seq = ${stage} AND state = 'staging')`;
      await tx`DELETE FROM fields WHERE seq = ${stage} AND state = 'staging'`;
    });
  }

  async dropStaged(olderThanSeconds: number): Promise<number> {
    const before = new Date(Date.now() - olderThanSeconds * 1000).toISOString();
    return await this.sql.begin(async (tx: Tx) => {
      await tx`DELETE FROM field_blocks WHERE field_seq IN
        (SELECT seq FROM fields WHERE state = 'staging' AND created_at < ${before})`;
      const gone = await tx`
        DELETE FROM fields WHERE state = 'staging' AND created_at < ${before} RETURNING seq`;
      return gone.length;
    });
  }

  async get(id: string, v?: Viewer): Promise<FieldDescription | null> {
    const rows = await this.sql`
      SELECT ${this.sql(META)}, h.owner_id, h.visibility, h.created_at,
        ${
      this.sql.unsafe(
        FIELD_COORD_COLUMNS.map((c) => `encode(f.${c}, 'base64') AS ${c}`).join(", "),
      )
    }
      FROM fields f ${this.#pick(this.sql, v)}
      WHERE f.state = 'ready' AND f.id = ${id}`;
    if (rows.length === 0) return null;
    const row = rows[0];
    return toFieldDescription(row, (c) => bytes(row[c]));
  }

  async list(q: { limit: number; offset: number; viewer?: Viewer }): Promise<Page<FieldMeta>> {
    checkPaging("list fields", q.limit, q.offset);
    return await this.sql.begin("ISOLATION LEVEL REPEATABLE READ READ ONLY", async (tx: Tx) => {
      const [{ n }] = await tx`SELECT count(*) AS n FROM fields f ${this.#pick(tx, q.viewer)}
        WHERE f.state = 'ready'`;
      const rows = await this.#meta(
        tx,
        q.viewer,
        tx`ORDER BY h.created_at DESC, h.seq DESC LIMIT ${q.limit} OFFSET ${q.offset}`,
      );
      return { items: rows.map((r) => toFieldMeta(r)), total: Number(n) };
    });
  }

  async holding(id: string, v: Viewer): Promise<Holding | null> {
    const rows = await this.sql`
      SELECT h.owner_id, h.visibility, h.created_at FROM field_holdings h
      JOIN fields f ON f.id = h.field_id AND f.state = 'ready'
      WHERE h.field_id = ${id} AND ${this.holdings.visible(this.sql, "h", v)}
      ${this.holdings.pickOrder(this.sql, "h", v)} LIMIT 1`;
    if (rows.length === 0) return null;
    const r = rows[0];
    return {
      owner: String(r.owner_id),
      visibility: String(r.visibility) as Visibility,
      created_at: String(r.created_at),
    };
  }

  async setVisibility(id: string, owner: string, visibility: Visibility): Promise<boolean> {
    const res = await this.sql`UPDATE field_holdings SET visibility = ${visibility}
      WHERE field_id = ${id} AND owner_id = ${owner}`;
    return res.count === 1;
  }

  async deleteHolding(id: string, owner: string): Promise<"deleted" | "not_found" | "in_use"> {
    return await this.sql.begin(async (tx: Tx) => {
      const found =
        await tx`SELECT seq FROM fields WHERE id = ${id} AND state = 'ready' FOR UPDATE`;
      if (found.length === 0) return "not_found" as const;
      const mine = await tx`SELECT 1 FROM field_holdings WHERE field_id = ${id}
        AND owner_id = ${owner}`;
      if (mine.length === 0) return "not_found" as const;
      const [{ own, others }] = await tx`SELECT
        (SELECT count(DISTINCT l.run_id) FROM run_input_fields l JOIN run_holdings h
           ON h.run_id = l.run_id AND h.owner_id = ${owner} WHERE l.field_id = ${id}) AS own,
        (SELECT count(DISTINCT l.run_id) FROM run_input_fields l WHERE l.field_id = ${id}
           AND NOT EXISTS (SELECT 1 FROM run_holdings h WHERE h.run_id = l.run_id
             AND h.owner_id = ${owner})) AS others`;
      if (Number(own) > 0) return "in_use" as const;
      const rest = await tx`SELECT 1 FROM field_holdings WHERE field_id = ${id}
        AND owner_id <> ${owner} LIMIT 1`;
      if (rest.length) {
        await tx`DELETE FROM field_holdings WHERE field_id = ${id} AND owner_id = ${owner}`;
        return "deleted" as const;
      }
      if (Number(others) > 0) return "in_use" as const;
      await tx`DELETE FROM field_holdings WHERE field_id = ${id}`;
      await tx`DELETE FROM field_blocks WHERE field_seq = ${found[0].seq}`;
      await tx`DELETE FROM fields WHERE seq = ${found[0].seq}`;
      return "deleted" as const;
    });
  }

  async #head(tx: Tx | Sql, id: string) {
    const rows = await tx`
      SELECT seq, n_time, n_lat, n_lon FROM fields WHERE id = ${id} AND state = 'ready'`;
    if (rows.length === 0) throw new RangeError(`Cannot read field ${id}: no such field`);
    const r = rows[0];
    return { seq: r.seq, nTime: Number(r.n_time), per: Number(r.n_lat) * Number(r.n_lon) };
  }

  async readSteps(id: string, tStart: number, tEnd: number): Promise<Float32Array> {
    return await this.sql.begin("ISOLATION LEVEL REPEATABLE READ READ ONLY", async (tx: Tx) => {
      const h = await this.#head(tx, id);
      checkStepRange(id, h.nTime, tStart, tEnd);
      const out = new Float32Array((tEnd - tStart) * h.per);
      // one block at a time
      const idx = await tx`
        SELECT block FROM field_blocks WHERE field_seq = ${h.seq} AND t_start < ${tEnd}
          AND t_start + rows > ${tStart} ORDER BY block`;
      for (const { block } of idx) {
        const [b] = await tx`SELECT t_start, rows, encode(data, 'base64') AS data FROM field_blocks
          WHERE field_seq = ${h.seq} AND block = ${block}`;
        const values = bytesLEToFloat32(bytes(b.data)!, Number(b.rows) * h.per);
        copyBlockSteps(
          out,
          { t_start: Number(b.t_start), rows: Number(b.rows), values },
          h.per,
          tStart,
          tEnd,
        );
      }
      return out;
    });
  }

  async readCell(id: string, cell: number): Promise<Float32Array> {
    return await this.sql.begin("ISOLATION LEVEL REPEATABLE READ READ ONLY", async (tx: Tx) => {
      const h = await this.#head(tx, id);
      if (!(Number.isInteger(cell) && cell >= 0 && cell < h.per)) {
        throw new RangeError(`Cannot read field ${id}: cell ${cell} is not within 0..${h.per}`);
      }
      const out = new Float32Array(h.nTime);
      // the server picks the cell's 4 bytes out of each block
      const rows = await tx`
        SELECT t_start, rows, encode(data, 'base64') AS data FROM (
          SELECT t_start, rows, (SELECT string_agg(substring(data FROM (t * ${h.per} + ${cell}) * 4 + 1 FOR 4), ''::bytea ORDER BY t)
            FROM generate_series(0, rows - 1) AS t) AS data
          FROM field_blocks WHERE field_seq = ${h.seq}) s ORDER BY t_start`;
      for (const b of rows) {
        const v = bytesLEToFloat32(bytes(b.data)!, Number(b.rows));
        out.set(v, Number(b.t_start));
      }
      return out;
    });
  }

  async delete(id: string): Promise<"deleted" | "not_found" | "in_use"> {
    return await this.sql.begin(async (tx: Tx) => {
      const found =
        await tx`SELECT seq FROM fields WHERE id = ${id} AND state = 'ready' FOR UPDATE`;
      if (found.length === 0) return "not_found" as const;
      const users = await tx`SELECT 1 FROM run_input_fields WHERE field_id = ${id} LIMIT 1`;
      if (users.length) return "in_use" as const;
      await tx`DELETE FROM field_holdings WHERE field_id = ${id}`;
      await tx`DELETE FROM field_blocks WHERE field_seq = ${found[0].seq}`;
      await tx`DELETE FROM fields WHERE seq = ${found[0].seq}`;
      return "deleted" as const;
    });
  }

  async runsUsing(id: string): Promise<string[]> {
    const rows = await this.sql`
      SELECT DISTINCT r.id, r.created_at, r.seq
      FROM run_input_fields l JOIN runs r ON r.id = l.run_id
      WHERE l.field_id = ${id} ORDER BY r.created_at DESC, r.seq DESC`;
    return rows.map((r) => String(r.id));
  }

  /** Inside the caller's transaction: lock and check a run's input fields, then link them. */
  async linkRun(tx: Tx, runId: string, fieldIds: readonly string[]): Promise<void> {
    if (fieldIds.length === 0) return;
    const rows = await tx`
      SELECT id FROM fields WHERE id IN ${tx([...fieldIds])} AND state = 'ready' FOR KEY SHARE`;
    const have = new Set(rows.map((r) => String(r.id)));
    const missing = fieldIds.find((f) => !have.has(f));
    if (missing !== undefined) throw new MissingInputError(runId, "field", missing);
    await tx`INSERT INTO run_input_fields ${
      tx(fieldIds.map((field_id, position) => ({ run_id: runId, position, field_id })))
    }`;
  }

  /** Inside the caller's transaction: a run's input fields in order. */
  async runFields(tx: Tx, runId: string): Promise<string[]> {
    const rows = await tx`
      SELECT field_id FROM run_input_fields WHERE run_id = ${runId} ORDER BY position`;
    return rows.map((r) => String(r.field_id));
  }
}
