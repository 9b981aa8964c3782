/**
 * Write counters shared by the connections one process opens on one SQLite file: the request
 * thread's, a second store on the same file, the series-writer worker's. Each counts its write
 * transactions as they end (committed or rolled back) in one `Int32Array` over a
 * `SharedArrayBuffer`, so a check on any thread sees another connection's write as soon as it
 * ended, with one atomic load and no statement. (SQLite's own signal, `PRAGMA data_version`,
 * is a statement that takes the WAL's read lock: measured as half the requests per second of
 * a cached 304 without it, wrk on a toy server.)
 *
 * @module
 */

const counters = new Map<string, Int32Array>();

/**
 * The write counter of the SQLite file `key` (its real path) in this thread, made on first use.
 * A worker that opens the same file is given the counter's buffer (`SqliteStoreOptions.writeCounter`).
 */
export function sharedWriteCounter(key: string): Int32Array {
  let c = counters.get(key);
  if (!c) counters.set(key, c = new Int32Array(new SharedArrayBuffer(4)));
  return c;
}

/** Count one ended write transaction. */
export function countWrite(counter: Int32Array): void {
  Atomics.add(counter, 0, 1);
}

/** Write transactions ended so far, on any thread of this process. */
export function writesOf(counter: Int32Array): number {
  return Atomics.load(counter, 0);
}
