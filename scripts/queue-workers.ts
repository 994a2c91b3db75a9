/**
 * The app server's own compute-queue workers: QUEUE_WORKERS jobs at once (default 1), each in a
 * compute thread, run by the production server's supervisor (scripts/serve.ts) and, under
 * `npm run dev`, by scripts/start.ts. `npm run worker` adds more on any machine; tests and the
 * queue benchmark start such processes with spawnWorkerProcess.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { resolve } from "node:path";
import knexFactory from "knex";
import { knexConfigFromUrl } from "../db/config";
import { connectionFromUrl } from "../app/queue/connection.server";
import { lockSetting, startQueueWorker } from "../app/queue/worker.server";
import { ConfigProblem } from "./env";

export interface QueueWorkers {
  stop(): Promise<void>;
}

/** QUEUE_LOCK_MS as a setting a person fixes: one sentence. */
export function checkedLockSetting(): { lockMs: number; stalledCheckMs: number } {
  try {
    return lockSetting();
  } catch (e) {
    throw new ConfigProblem((e as Error).message);
  }
}

/** QUEUE_WORKERS: a whole number from 0 (none: only `npm run worker` processes compute) to 64. */
export function queueWorkerCount(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.QUEUE_WORKERS;
  if (raw === undefined || raw === "") return 1;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 64) throw new ConfigProblem(`QUEUE_WORKERS must be a whole number from 0 to 64 (got "${raw}"): fix it in the environment or .env.`);
  return n;
}

export async function startQueueWorkers(opts: { databaseUrl: string; redisUrl: string; log: (line: string) => void }): Promise<QueueWorkers> {
  const count = queueWorkerCount();
  const lock = checkedLockSetting();
  if (count === 0) return { stop: async () => {} };
  const db = knexFactory(knexConfigFromUrl(opts.databaseUrl, { min: 0, max: count + 1 }));
  const handle = startQueueWorker({ db, concurrency: count, connection: connectionFromUrl(opts.redisUrl), log: opts.log, ...lock });
  return {
    async stop() {
      await handle.close(true);
      await db.destroy();
    },
  };
}

export interface WorkerChild {
  child: ChildProcess;
  /** Resolves when the worker prints that it is taking jobs. */
  ready: Promise<void>;
  output: () => string;
  exited: Promise<number | null>;
}

/** `npm run worker` (scripts/worker.ts) as a child process on the given Redis, queue prefix and database. */
export function spawnWorkerProcess(env: { REDIS_URL: string; DATABASE_URL: string; QUEUE_PREFIX: string; concurrency?: number; lockMs?: number }): WorkerChild {
  const root = resolve(import.meta.dirname, "..");
  const child = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts", "--concurrency", String(env.concurrency ?? 1)], {
    cwd: root,
    env: {
      ...process.env,
      REDIS_URL: env.REDIS_URL,
      DATABASE_URL: env.DATABASE_URL,
      QUEUE_PREFIX: env.QUEUE_PREFIX,
      ...(env.lockMs ? { QUEUE_LOCK_MS: String(env.lockMs) } : {}),
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let out = "";
  let readyDone: () => void = () => {};
  const ready = new Promise<void>((r) => (readyDone = r));
  const onData = (b: Buffer) => {
    out += b.toString();
    if (out.includes("Compute worker ready")) readyDone();
  };
  child.stdout!.on("data", onData);
  child.stderr!.on("data", onData);
  const exited = new Promise<number | null>((r) => child.once("exit", (code) => r(code)));
  return { child, ready, output: () => out, exited };
}
