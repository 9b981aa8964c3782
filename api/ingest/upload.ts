/**
 * A series upload from raw body bytes to a stored series: the UTF-8 check, JSON parsing and
 * schema validation (or the delimited-text reader), normalisation and the content hash. This
 * is the expensive part of an upload (about 0.6 s for a 30 MB JSON body on this machine), so
 * the service runs it in a Web Worker ({@link UploadPool}) and the request thread only moves
 * bytes: health checks and light requests keep answering while large uploads are read.
 *
 * Free of Hono and of the store; the worker and the in-thread fallback call the same
 * {@link ingestUpload}.
 *
 * @module
 */
import type { StoredSeries } from "../store/types.ts";
import { SeriesUpload, type TextUploadQuery } from "../schemas/ingest.ts";
import { type FieldError, zodFieldErrors } from "../problems.ts";
import { storedFromNormalised } from "../series_codec.ts";
import { ingestJson, type JsonSeriesInput } from "./json.ts";
import { ingestText } from "./text.ts";
import type { IngestReport } from "./types.ts";

/** What to ingest: the body bytes, and for text the (already validated) query. */
export type UploadRequest =
  | { format: "json"; bytes: Uint8Array }
  | { format: "text"; bytes: Uint8Array; query: TextUploadQuery };

/** A stored series ready to write, or the problem to answer. */
export type UploadOutcome =
  | { ok: true; series: StoredSeries; report: IngestReport }
  | {
    ok: false;
    type: "validation" | "malformed-json";
    detail: string;
    errors: FieldError[];
    omitted: number;
  };

const fatalUtf8 = new TextDecoder("utf-8", { fatal: true, ignoreBOM: false });

function failure(
  detail: string,
  errors: FieldError[],
  omitted = 0,
  type: "validation" | "malformed-json" = "validation",
): UploadOutcome {
  return { ok: false, type, detail, errors, omitted };
}

/**
 * Ingest an upload body (see the module documentation). JSON bodies must be UTF-8, like text
 * bodies: an invalid byte sequence is refused, never stored as U+FFFD.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { ingestUpload } from "./upload.ts";
 * const body = JSON.stringify({ name: "x", quantity: "other", units: "1",
 *   time: ["2001", "2002"], value: [1, 2] });
 * const ok = await ingestUpload({ format: "json", bytes: new TextEncoder().encode(body) });
 * assert.ok(ok.ok && ok.series.id.startsWith("sha256:"));
 * const bad = await ingestUpload({ format: "json", bytes: new Uint8Array([0x7b, 0xff, 0x7d]) });
 * assert.ok(!bad.ok && bad.type === "validation");
 * ```
 */
export async function ingestUpload(req: UploadRequest): Promise<UploadOutcome> {
  if (req.format === "text") return await toUploadOutcome(ingestText(req.bytes, req.query));
  let text: string;
  try {
    text = fatalUtf8.decode(req.bytes);
  } catch {
    return failure("The series was not stored: the body is not UTF-8 text", [{
      pointer: "",
      message: "the body is not UTF-8 text (invalid UTF-8 byte sequence); send UTF-8 JSON",
    }]);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    return failure(
      `The request body is not valid JSON: ${(e as Error).message.slice(0, 200)}`,
      [],
      0,
      "malformed-json",
    );
  }
  const parsed = SeriesUpload.safeParse(raw);
  if (!parsed.success) {
    const { errors, omitted } = zodFieldErrors(parsed.error.issues, "body");
    return failure(
      "The request body failed validation: " +
        errors.slice(0, 5).map((e) => `${e.pointer || "/"}: ${e.message}`).join("; "),
      errors,
      omitted,
    );
  }
  return await toUploadOutcome(ingestJson(parsed.data as JsonSeriesInput));
}

/** The outcome of a parsed upload (any format): the stored series with its id, or the problem. */
export async function toUploadOutcome(
  outcome: ReturnType<typeof ingestText>,
): Promise<UploadOutcome> {
  if (!outcome.ok) {
    return failure(
      `The series was not stored: ${outcome.errors.length + (outcome.omitted ?? 0)} ` +
        `problem(s); first: ${outcome.errors[0]?.message ?? "(none listed)"}`,
      outcome.errors,
      outcome.omitted ?? 0,
    );
  }
  return {
    ok: true,
    series: await storedFromNormalised(outcome.series, null),
    report: outcome.report,
  };
}

/** The buffers of a stored series' arrays, for a transfer list. */
export function seriesBuffers(s: StoredSeries): ArrayBuffer[] {
  const out = [s.time.buffer, s.value.buffer];
  if (s.uncertainty) out.push(s.uncertainty.buffer);
  return [...new Set(out)] as ArrayBuffer[];
}

/** A body still arriving after this many milliseconds gives its reading turn away. */
export const SLOW_BODY_MS = 5000;

/**
 * A small pool of upload workers (`api/ingest/upload_worker.ts`); size 0 ingests in the
 * calling thread. Workers start on first use and are replaced if one fails.
 */
export class UploadPool {
  #workers: { worker: Worker; load: number }[] = [];
  #jobs = new Map<number, { resolve(o: UploadOutcome): void; reject(e: Error): void }>();
  #next = 1;
  #reading = 0;
  #readers: (() => void)[] = [];

  /**
   * @param size upload workers (0: ingest in the calling thread)
   * @param slowBodyMs a body still arriving after this gives its reading turn away
   *   @default SLOW_BODY_MS
   */
  constructor(readonly size: number, readonly slowBodyMs: number = SLOW_BODY_MS) {}

  /**
   * Read a request body, one per upload worker at a time. The thread that reads bodies also
   * does the service's network I/O: twenty 20 MB bodies read at once hold it for a few hundred
   * milliseconds and health checks wait; read in turns (the others wait unread, held back by
   * TCP flow control) they do not, and the workers cannot ingest more at once anyway. A body
   * still arriving after `slowBodyMs` gives its turn away, so a slow sender never holds up the
   * others for long.
   */
  async readBody(req: Request): Promise<Uint8Array> {
    const slots = Math.max(1, this.size);
    while (this.#reading >= slots) await new Promise<void>((ok) => this.#readers.push(ok));
    this.#reading++;
    let held = true;
    const release = () => {
      if (!held) return;
      held = false;
      this.#reading--;
      this.#readers.shift()?.();
    };
    const timer = setTimeout(release, this.slowBodyMs);
    try {
      return new Uint8Array(await req.arrayBuffer());
    } finally {
      clearTimeout(timer);
      release();
    }
  }

  #pick(): { worker: Worker; load: number } {
    if (this.#workers.length < this.size) {
      const worker = new Worker(new URL("./upload_worker.ts", import.meta.url).href, {
        type: "module",
      });
      const slot = { worker, load: 0 };
      worker.onmessage = (e) => {
        const { job, outcome } = e.data as { job: number; outcome: UploadOutcome };
        slot.load--;
        const j = this.#jobs.get(job);
        this.#jobs.delete(job);
        j?.resolve(outcome);
      };
      worker.onerror = (e) => {
        e.preventDefault();
        for (const [id, j] of this.#jobs) {
          this.#jobs.delete(id);
          j.reject(new Error(`upload worker failed: ${e.message}`));
        }
        worker.terminate();
        this.#workers = this.#workers.filter((w) => w !== slot);
      };
      this.#workers.push(slot);
      return slot;
    }
    return this.#workers.reduce((a, b) => (b.load < a.load ? b : a));
  }

  /** Ingest `req` in a worker (the bytes are transferred: the caller must not use them). */
  run(req: UploadRequest): Promise<UploadOutcome> {
    if (this.size === 0) return ingestUpload(req);
    const slot = this.#pick();
    slot.load++;
    const job = this.#next++;
    return new Promise((resolve, reject) => {
      this.#jobs.set(job, { resolve, reject });
      const bytes = req.bytes.byteOffset === 0 &&
          req.bytes.byteLength === req.bytes.buffer.byteLength
        ? req.bytes
        : req.bytes.slice();
      slot.worker.postMessage({ job, req: { ...req, bytes } }, [bytes.buffer as ArrayBuffer]);
    });
  }

  /** Stop the workers; uploads in flight fail. */
  terminate(): void {
    for (const w of this.#workers) w.worker.terminate();
    this.#workers = [];
    for (const j of this.#jobs.values()) j.reject(new Error("upload pool stopped"));
    this.#jobs.clear();
  }
}
