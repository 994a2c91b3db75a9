/**
 * The compute queue in tests: the test Redis (REDIS_TEST_URL, started by the global setup or
 * `npm test`) under a prefix of each test's own, so test files never see each other's jobs;
 * and `npm run worker` children pointed at it.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { resolve } from "node:path";
import type { Queue } from "bullmq";
import { Redis } from "ioredis";
import { connectionFromUrl } from "../../app/queue/connection.server";
import { computeQueue } from "../../app/queue/queue.server";

export function testRedisUrl(): string {
  const url = process.env.REDIS_TEST_URL;
  if (!url) throw new Error("REDIS_TEST_URL is not set: run tests through `npm test` or vitest (global setup starts the test Redis).");
  return url;
}

export interface TestQueue {
  url: string;
  prefix: string;
  queue: Queue;
  redis: Redis;
  /** Removes every key under the prefix and closes the connections. */
  drop(): Promise<void>;
}

export async function freshQueue(): Promise<TestQueue> {
  const url = testRedisUrl();
  const prefix = `sbt_${randomBytes(4).toString("hex")}`;
  const queue = computeQueue({ connection: connectionFromUrl(url), prefix });
  const redis = new Redis(url);
  return {
    url,
    prefix,
    queue,
    redis,
    async drop() {
      await queue.obliterate({ force: true }).catch(() => {});
      await queue.close();
      const keys = await redis.keys("probe:*");
      if (keys.length) await redis.del(...keys);
      redis.disconnect();
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

/** `npm run worker` (tsx scripts/worker.ts) as a child on the test queue and database. */
export function startWorkerChild(env: { REDIS_URL: string; DATABASE_URL: string; QUEUE_PREFIX: string; concurrency?: number; lockMs?: number }): WorkerChild {
  const root = resolve(import.meta.dirname, "../..");
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
