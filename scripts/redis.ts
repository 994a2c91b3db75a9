/**
 * The Redis the compute queue runs on (app/queue/), started by `npm start` and `npm test`.
 *
 * With REDIS_URL set (REDIS_TEST_URL for tests) nothing is started: the server is asked to
 * answer PING and used as it is (extra `npm run worker` machines share it). Otherwise a
 * private Debian `redis-server` runs from a folder inside the project (`.data/redis`, tests
 * `.data/redis-test`), bound to 127.0.0.1 with protected mode on. The app's server keeps an
 * append-only file, so jobs still queued survive a restart; the test server keeps nothing.
 * redis-server is installed with apt-get when missing and the user is root; otherwise the
 * exact command is printed.
 */
import { spawn, spawnSync } from "node:child_process";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { Redis } from "ioredis";
import { ConfigProblem, projectRoot } from "./env";
import { alive, findBinary, isRoot, portToListenOn, readPidFile, stopProcess, usableDir, waitFor } from "./local-server";

export interface RedisHandle {
  /** redis://127.0.0.1:port (embedded) or the REDIS_URL given. */
  url: string;
  startedHere: boolean;
  /** Stops the server if this process started it; otherwise does nothing. */
  stop(): Promise<void>;
  /** The embedded server's process is alive (an external server: always true, not watched). */
  running(): boolean;
  /** The embedded server's folder (external: null). */
  dataDir: string | null;
}

export interface EmbeddedRedisOptions {
  dataDir: string; // absolute path
  port: number;
  /** Keep an append-only file so queued jobs survive a restart (the app); tests keep nothing. */
  persistent: boolean;
  /** Tests only: when the port is taken by another program, use a free one instead. */
  portFallback?: boolean;
  log?: (line: string) => void;
}

export const REDIS_INSTALL_COMMAND = "sudo apt-get install -y redis-server";
const ROOT_INSTALL = "apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y redis-server";

/** Makes sure redis-server exists, installing Debian's package as root. */
export function ensureRedisInstalled(
  log: (l: string) => void = console.log,
  find: (name: string) => string | null = findBinary,
  asRoot: boolean = isRoot(),
): string {
  const found = find("redis-server");
  if (found) return found;
  if (!asRoot) {
    throw new ConfigProblem(`Redis is not installed. Install it with: ${REDIS_INSTALL_COMMAND} — or set REDIS_URL to a Redis server you already have.`);
  }
  log("Redis is not installed: installing Debian's redis-server with apt-get…");
  const r = spawnSync("sh", ["-c", ROOT_INSTALL], { stdio: "inherit" });
  if (r.status !== 0) {
    throw new ConfigProblem(`Installing redis-server failed (apt-get exit ${r.status}): run '${ROOT_INSTALL}' by hand and read its message.`);
  }
  const after = find("redis-server");
  if (!after) throw new ConfigProblem("redis-server was installed but was not found on the PATH.");
  return after;
}

/** PING answered with PONG within `timeoutMs`. */
export async function redisAnswers(url: string, timeoutMs = 3000): Promise<{ ok: true } | { ok: false; why: string }> {
  const client = new Redis(url, { lazyConnect: true, connectTimeout: timeoutMs, maxRetriesPerRequest: 0, retryStrategy: () => null, enableOfflineQueue: false });
  client.on("error", () => {});
  try {
    await client.connect();
    const pong = await client.ping();
    return pong === "PONG" ? { ok: true } : { ok: false, why: `answered ${pong}` };
  } catch (e) {
    const err = e as { code?: string; message?: string };
    return { ok: false, why: `${err.code ?? ""} ${err.message ?? String(e)}`.trim() };
  } finally {
    client.disconnect();
  }
}

/** Checks a REDIS_URL server answers; the error is one sentence. */
export async function checkExternalRedis(url: string, variable = "REDIS_URL"): Promise<RedisHandle> {
  let parsed: URL;
  try {
    parsed = new URL(url);
  } catch {
    throw new ConfigProblem(`${variable} is not a valid URL: write it as redis://host:6379 (or redis://:password@host:6379/0).`);
  }
  if (parsed.protocol !== "redis:" && parsed.protocol !== "rediss:") {
    throw new ConfigProblem(`${variable} must start with redis:// or rediss:// (it starts with ${parsed.protocol}//).`);
  }
  const answer = await redisAnswers(url, 5000);
  if (!answer.ok) {
    throw new ConfigProblem(
      `Cannot use the Redis named by ${variable} (${parsed.hostname}:${parsed.port || 6379}): ${answer.why} — check the URL, or unset ${variable} to use a private Redis started here.`,
    );
  }
  return { url, startedHere: false, stop: async () => {}, running: () => true, dataDir: null };
}

/** Starts (or reuses) a private redis-server from `dataDir`. */
export async function ensureEmbeddedRedis(opts: EmbeddedRedisOptions): Promise<RedisHandle> {
  const log = opts.log ?? console.log;
  const { dataDir } = opts;
  let port = opts.port;
  const pidFile = resolve(dataDir, "redis.pid");
  const logFile = resolve(dataDir, "redis.log");
  const recorded = resolve(dataDir, "saddlebook-port");

  usableDir(dataDir, "Redis folder", "REDIS_DATA_DIR");

  let startedHere = false;
  let childPid: number | null = null;
  const existing = readPidFile(pidFile);
  const recordedPort = existsSync(recorded) ? Number(readFileSync(recorded, "utf8").trim()) : NaN;
  if (existing && alive(existing) && Number.isInteger(recordedPort) && (await redisAnswers(`redis://127.0.0.1:${recordedPort}`, 1000)).ok) {
    // It listens where it was started (possibly a fallback port), as recorded then.
    port = recordedPort;
    log(`Redis already running from ${dataDir}: reusing it.`);
  } else {
    if (existing && alive(existing)) {
      throw new ConfigProblem(`A Redis process (pid ${existing}) holds ${dataDir} but does not answer: stop it (kill ${existing}) and start again.`);
    }
    port = await portToListenOn(port, !!opts.portFallback, "test Redis", "REDIS_PORT", log);
    const binary = ensureRedisInstalled(log);
    const args = [
      "--port", String(port),
      "--bind", "127.0.0.1",
      "--protected-mode", "yes",
      "--dir", dataDir,
      "--pidfile", pidFile,
      "--logfile", logFile,
      "--daemonize", "no",
      // Jobs must never be evicted to make room (BullMQ's own requirement).
      "--maxmemory-policy", "noeviction",
      "--save", "",
      "--appendonly", opts.persistent ? "yes" : "no",
    ];
    const child = spawn(binary, args, { detached: true, stdio: "ignore" });
    child.unref();
    childPid = child.pid ?? null;
    startedHere = true;
    const up = await waitFor(async () => (await redisAnswers(`redis://127.0.0.1:${port}`, 500)).ok, 30_000, 100);
    if (!up) {
      const tail = existsSync(logFile) ? readFileSync(logFile, "utf8").trim().split("\n").slice(-3).join(" | ") : "no log";
      if (childPid && alive(childPid)) process.kill(childPid, "SIGTERM");
      throw new ConfigProblem(`Redis did not start from ${dataDir} on port ${port}: ${tail}`);
    }
    writeFileSync(recorded, String(port));
    log(`Redis started on 127.0.0.1:${port} (data in ${dataDir}).`);
  }

  const pid = () => readPidFile(pidFile) ?? childPid;
  return {
    url: `redis://127.0.0.1:${port}`,
    startedHere,
    dataDir,
    running: () => {
      const p = pid();
      return !!p && alive(p);
    },
    stop: async () => {
      if (startedHere) await stopProcess(pid(), 30_000);
    },
  };
}

/** The test Redis port: REDIS_TEST_PORT, else DB_TEST_PORT + 3000, so clones testing side by side do not collide. */
export function testRedisPort(env: NodeJS.ProcessEnv = process.env): number {
  if (env.REDIS_TEST_PORT) return portSetting("REDIS_TEST_PORT", env.REDIS_TEST_PORT);
  const dbPort = Number(env.DB_TEST_PORT ?? "3317");
  return Number.isInteger(dbPort) && dbPort + 3000 <= 65535 ? dbPort + 3000 : 6317;
}

function portSetting(name: string, text: string): number {
  const port = Number(text);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    throw new ConfigProblem(`${name} must be a port number from 1 to 65535 (got "${text}").`);
  }
  return port;
}

/** REDIS_URL (tests: REDIS_TEST_URL) when set, else the private server configured by REDIS_* variables. */
export async function ensureRedis(kind: "app" | "test", log?: (line: string) => void): Promise<RedisHandle> {
  const variable = kind === "app" ? "REDIS_URL" : "REDIS_TEST_URL";
  const external = process.env[variable];
  if (external) return checkExternalRedis(external, variable);
  return ensureEmbeddedRedis({
    dataDir:
      kind === "app"
        ? resolve(projectRoot, process.env.REDIS_DATA_DIR ?? ".data/redis")
        : resolve(projectRoot, process.env.REDIS_TEST_DATA_DIR ?? ".data/redis-test"),
    port: kind === "app" ? portSetting("REDIS_PORT", process.env.REDIS_PORT ?? "6380") : testRedisPort(),
    persistent: kind === "app",
    portFallback: kind === "test",
    log,
  });
}
