/**
 * Service configuration from environment variables (all optional; the defaults are the
 * embedded ones `deno task start` uses). Documented in the README's Configuration section.
 *
 * | variable | default | meaning |
 * |---|---|---|
 * | `HOST` | `127.0.0.1` | bind address |
 * | `PORT` | `8080` | TCP port |
 * | `SUNLAG_STORE` | `sqlite:./data/sunlag.db` | store location (`sqlite:<file>`, `sqlite::memory:` or `postgres://...`) |
 * | `SUNLAG_DEMO` | `1` | load the demo data into an empty store at start (`0` to skip) |
 * | `SUNLAG_BODY_LIMIT_MB` | `25` | largest accepted request body, MB |
 * | `SUNLAG_FIELD_LIMIT_MB` | `200` | largest accepted gridded-field upload (`POST /v1/fields`), MB |
 * | `SUNLAG_WORKERS` | number of cores | Web Workers for heavy computation (`0` = in-thread) |
 * | `SUNLAG_ASYNC_SECONDS` | `2` | runs estimated to take longer are asynchronous by default |
 * | `SUNLAG_CORS_ORIGINS` | (empty: CORS off) | comma-separated list of allowed origins, or `*` |
 * | `SUNLAG_LOG` | `1` | one JSON line per request on stdout (`0` to silence) |
 * | `SUNLAG_ROLE` | `all` | `api` (HTTP only), `worker` (computes queued runs, no HTTP) or `all` |
 * | `SUNLAG_RUN_CONCURRENCY` | `1` | runs one worker process computes at once (queue engine pg-boss) |
 * | `SUNLAG_ADMIN_KEY` | (unset) | the instance's admin key (32+ characters); when set, every call needs a key |
 * | `SUNLAG_OPEN_NETWORK` | `0` | `1` serves a non-loopback address without keys (everyone is the local admin) |
 * | `SUNLAG_ALLOWED_HOSTS` | the bind address with its port | `Host` values served (`host` or `host:port`), or `*` |
 * | `SUNLAG_RUN_WALL_SECONDS` | `3600` | a run still computing after this fails with its reason (at most a week) |
 * | `SUNLAG_QUOTA_CONCURRENT_RUNS` | `4` | runs one owner computes at once (more wait, queued) |
 * | `SUNLAG_QUOTA_QUEUED_RUNS` | `20` | runs one owner may have waiting |
 * | `SUNLAG_QUOTA_COMPUTE_SECONDS` | `3600` | compute seconds one owner may use per hour |
 * | `SUNLAG_QUOTA_STORED_MB` | `1024` | MB one owner may hold (series points and run texts) |
 * | `SUNLAG_RATE_PER_SECOND` | `20` | requests per second per owner (anonymous: per address), token bucket |
 * | `SUNLAG_RATE_BURST` | `100` | bucket size of the request rate |
 * | `SUNLAG_INGEST_WORKERS` | `1` | Web Workers that parse and hash large uploads (`0` = in-thread) |
 * | `SUNLAG_BLAS` | `auto` | `auto`: the field-significance products use the system's OpenBLAS where it loads (else WebAssembly); `off`: always WebAssembly. Results are identical either way |
 *
 * Quotas and the request rate apply to owners that are not admins and to anonymous callers;
 * the single-user tool (the built-in local owner, an admin) is never limited by them.
 *
 * @module
 */

export interface Config {
  host: string;
  port: number;
  store: string;
  demo: boolean;
  bodyLimitBytes: number;
  /** Largest field upload (NetCDF body of `POST /v1/fields`, streamed to a temporary file). */
  fieldLimitBytes: number;
  workers: number;
  asyncSeconds: number;
  corsOrigins: string[];
  log: boolean;
  /** What this process does: serve HTTP, compute queued runs, or both. */
  role: "api" | "worker" | "all";
  /** Runs a worker process computes at once. */
  runConcurrency: number;
  /** The admin key; null = no keys required (the single-user tool on loopback). */
  adminKey: string | null;
  /** Serve a non-loopback address without keys (explicit opt-out). */
  openNetwork: boolean;
  /** `Host` values served: `host` (any port) or `host:port`; `*` = any. */
  allowedHosts: string[];
  /** Wall-time limit of one run, seconds. */
  runWallSeconds: number;
  quotas: Quotas;
  /** Web Workers for parsing and hashing large uploads (0 = in the request thread). */
  ingestWorkers: number;
  /** Use the system's OpenBLAS for the field-significance products where it loads. */
  blas: "auto" | "off";
}

/** Per-owner limits (owners that are not admins, and anonymous callers). */
export interface Quotas {
  concurrentRuns: number;
  queuedRuns: number;
  computeSecondsPerHour: number;
  storedBytes: number;
  ratePerSecond: number;
  rateBurst: number;
}

/** Shortest admin key accepted (a key is a secret: 32 characters of a random token). */
export const MIN_ADMIN_KEY_LENGTH = 32;

/**
 * True for a loopback bind address (127.0.0.0/8, ::1, localhost).
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { isLoopback } from "./config.ts";
 * assert.equal(isLoopback("127.0.0.1"), true);
 * assert.equal(isLoopback("[::1]"), true);
 * assert.equal(isLoopback("0.0.0.0"), false);
 * ```
 */
export function isLoopback(host: string): boolean {
  const h = host.toLowerCase().replace(/^\[|\]$/g, "");
  return h === "localhost" || h === "::1" || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/.test(h);
}

/** The `Host` values served by default: the bind address (loopback: its three names) with the port. */
export function defaultAllowedHosts(host: string, port: number): string[] {
  const withPort = (h: string) => (port === 80 ? [h, `${h}:${port}`] : [`${h}:${port}`]);
  if (isLoopback(host)) return ["localhost", "127.0.0.1", "[::1]"].flatMap(withPort);
  const h = host.toLowerCase();
  if (h === "0.0.0.0" || h === "::" || h === "[::]") return [];
  return withPort(h.includes(":") && !h.startsWith("[") ? `[${h}]` : h);
}

/**
 * Why the service must not start with this configuration, or null. Bound to a non-loopback
 * address it needs an admin key (or the explicit `SUNLAG_OPEN_NETWORK=1`) and a list of the
 * `Host` names it answers to.
 */
export function startupRefusal(config: Config): string | null {
  if (isLoopback(config.host)) return null;
  if (config.adminKey === null && !config.openNetwork) {
    return `Refusing to serve ${config.host} without API keys: set SUNLAG_ADMIN_KEY to a secret ` +
      `of ${MIN_ADMIN_KEY_LENGTH}+ characters (see "Sharing an instance" in the README), or ` +
      "SUNLAG_OPEN_NETWORK=1 to let everyone who reaches it act as the local admin";
  }
  if (config.allowedHosts.length === 0) {
    return `Refusing to serve ${config.host} without SUNLAG_ALLOWED_HOSTS: list the host names ` +
      "clients use (e.g. sunlag.example.org,sunlag.example.org:8080), or * to answer any Host";
  }
  return null;
}

function num(env: Record<string, string | undefined>, name: string, dflt: number, min = 0): number {
  const raw = env[name];
  if (raw === undefined || raw === "") return dflt;
  const v = Number(raw);
  if (!Number.isFinite(v) || v < min) {
    throw new RangeError(
      `Cannot read configuration: ${name} must be a number >= ${min}, got "${raw}"`,
    );
  }
  return v;
}

/** Read the configuration; throws RangeError naming the variable when one is malformed. */
export function readConfig(env: Record<string, string | undefined>): Config {
  const cores = typeof navigator !== "undefined" && navigator.hardwareConcurrency
    ? navigator.hardwareConcurrency
    : 2;
  const host = env.HOST || "127.0.0.1";
  const port = num(env, "PORT", 8080, 0);
  return {
    host,
    port,
    store: env.SUNLAG_STORE || "sqlite:./data/sunlag.db",
    demo: env.SUNLAG_DEMO !== "0",
    bodyLimitBytes: Math.round(num(env, "SUNLAG_BODY_LIMIT_MB", 25, 0.001) * 1024 * 1024),
    fieldLimitBytes: Math.round(num(env, "SUNLAG_FIELD_LIMIT_MB", 200, 0.001) * 1024 * 1024),
    workers: Math.floor(num(env, "SUNLAG_WORKERS", cores, 0)),
    asyncSeconds: num(env, "SUNLAG_ASYNC_SECONDS", 2, 0),
    corsOrigins: list(env.SUNLAG_CORS_ORIGINS),
    log: env.SUNLAG_LOG !== "0",
    role: readRole(env.SUNLAG_ROLE),
    runConcurrency: Math.floor(num(env, "SUNLAG_RUN_CONCURRENCY", 1, 1)),
    adminKey: adminKey(env.SUNLAG_ADMIN_KEY),
    openNetwork: env.SUNLAG_OPEN_NETWORK === "1",
    allowedHosts: env.SUNLAG_ALLOWED_HOSTS
      ? list(env.SUNLAG_ALLOWED_HOSTS).map((h) => h.toLowerCase())
      : defaultAllowedHosts(host, port),
    runWallSeconds: Math.min(num(env, "SUNLAG_RUN_WALL_SECONDS", 3600, 1), 7 * 86400),
    quotas: {
      concurrentRuns: Math.floor(num(env, "SUNLAG_QUOTA_CONCURRENT_RUNS", 4, 1)),
      queuedRuns: Math.floor(num(env, "SUNLAG_QUOTA_QUEUED_RUNS", 20, 0)),
      computeSecondsPerHour: num(env, "SUNLAG_QUOTA_COMPUTE_SECONDS", 3600, 1),
      storedBytes: Math.round(num(env, "SUNLAG_QUOTA_STORED_MB", 1024, 0) * 1024 * 1024),
      ratePerSecond: num(env, "SUNLAG_RATE_PER_SECOND", 20, 0.001),
      rateBurst: Math.max(1, Math.floor(num(env, "SUNLAG_RATE_BURST", 100, 1))),
    },
    ingestWorkers: Math.floor(num(env, "SUNLAG_INGEST_WORKERS", 1, 0)),
    blas: readBlas(env.SUNLAG_BLAS),
  };
}

function list(raw: string | undefined): string[] {
  return (raw ?? "").split(",").map((s) => s.trim()).filter(Boolean);
}

function adminKey(raw: string | undefined): string | null {
  if (raw === undefined || raw === "") return null;
  if (raw.length < MIN_ADMIN_KEY_LENGTH || /\s/.test(raw)) {
    throw new RangeError(
      `Cannot read configuration: SUNLAG_ADMIN_KEY must be ${MIN_ADMIN_KEY_LENGTH}+ characters ` +
        `without blanks (e.g. the output of \`openssl rand -base64 32\`), got ${raw.length} characters`,
    );
  }
  return raw;
}

function readBlas(raw: string | undefined): Config["blas"] {
  if (raw === undefined || raw === "") return "auto";
  if (raw === "auto" || raw === "off") return raw;
  throw new RangeError(`Cannot read configuration: SUNLAG_BLAS must be auto or off, got "${raw}"`);
}

function readRole(raw: string | undefined): Config["role"] {
  if (raw === undefined || raw === "") return "all";
  if (raw === "api" || raw === "worker" || raw === "all") return raw;
  throw new RangeError(
    `Cannot read configuration: SUNLAG_ROLE must be api, worker or all, got "${raw}"`,
  );
}

/**
 * Defaults for tests: in-memory store, no demo, no workers, no log, and `localhost` (any
 * port) among the allowed hosts, since `app.request("/path")` addresses http://localhost/.
 */
export function testConfig(overrides: Partial<Config> = {}): Config {
  const base = readConfig({});
  return {
    ...base,
    store: "sqlite::memory:",
    demo: false,
    workers: 0,
    ingestWorkers: 0,
    log: false,
    allowedHosts: [...base.allowedHosts, "localhost"],
    ...overrides,
  };
}
