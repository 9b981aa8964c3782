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
 * | `SUNLAG_WORKERS` | number of cores | Web Workers for heavy computation (`0` = in-thread) |
 * | `SUNLAG_ASYNC_SECONDS` | `2` | runs estimated to take longer are asynchronous by default |
 * | `SUNLAG_CORS_ORIGINS` | (empty: CORS off) | comma-separated list of allowed origins, or `*` |
 * | `SUNLAG_LOG` | `1` | one JSON line per request on stdout (`0` to silence) |
 * | `SUNLAG_ROLE` | `all` | `api` (HTTP only), `worker` (computes queued runs, no HTTP) or `all` |
 * | `SUNLAG_RUN_CONCURRENCY` | `1` | runs one worker process computes at once (queue engine pg-boss) |
 * | `SUNLAG_RUN_WALL_SECONDS` | `3600` | a run still computing after this fails with its reason (at most a week) |
 *
 * @module
 */

export interface Config {
  host: string;
  port: number;
  store: string;
  demo: boolean;
  bodyLimitBytes: number;
  workers: number;
  asyncSeconds: number;
  corsOrigins: string[];
  log: boolean;
  /** What this process does: serve HTTP, compute queued runs, or both. */
  role: "api" | "worker" | "all";
  /** Runs a worker process computes at once. */
  runConcurrency: number;
  /** Wall-time limit of one run, seconds. */
  runWallSeconds: number;
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
  return {
    host: env.HOST || "127.0.0.1",
    port: num(env, "PORT", 8080, 0),
    store: env.SUNLAG_STORE || "sqlite:./data/sunlag.db",
    demo: env.SUNLAG_DEMO !== "0",
    bodyLimitBytes: Math.round(num(env, "SUNLAG_BODY_LIMIT_MB", 25, 0.001) * 1024 * 1024),
    workers: Math.floor(num(env, "SUNLAG_WORKERS", cores, 0)),
    asyncSeconds: num(env, "SUNLAG_ASYNC_SECONDS", 2, 0),
    corsOrigins: (env.SUNLAG_CORS_ORIGINS ?? "").split(",").map((s) => s.trim()).filter(Boolean),
    log: env.SUNLAG_LOG !== "0",
    role: readRole(env.SUNLAG_ROLE),
    runConcurrency: Math.floor(num(env, "SUNLAG_RUN_CONCURRENCY", 1, 1)),
    runWallSeconds: Math.min(num(env, "SUNLAG_RUN_WALL_SECONDS", 3600, 1), 7 * 86400),
  };
}

function readRole(raw: string | undefined): Config["role"] {
  if (raw === undefined || raw === "") return "all";
  if (raw === "api" || raw === "worker" || raw === "all") return raw;
  throw new RangeError(
    `Cannot read configuration: SUNLAG_ROLE must be api, worker or all, got "${raw}"`,
  );
}

/** Defaults for tests: in-memory store, no demo, no workers, no log. */
export function testConfig(overrides: Partial<Config> = {}): Config {
  return {
    ...readConfig({}),
    store: "sqlite::memory:",
    demo: false,
    workers: 0,
    log: false,
    ...overrides,
  };
}
