/**
 * The compute queue in tests: the test Redis (REDIS_TEST_URL, started by the global setup or
 * `npm test`) under a prefix of each test's own, so test files never see each other's jobs;
 * `npm run worker` children pointed at it; waiting for a condition; stopping what a test started.
 */
import { randomBytes } from "node:crypto";
import type { Queue } from "bullmq";
import { Redis } from "ioredis";
import { connectionFromUrl } from "../../app/queue/connection.server";
import { computeQueue } from "../../app/queue/queue.server";
import type { QueueWorker } from "../../app/queue/worker.server";
import type { WorkerChild } from "../../scripts/queue-workers";

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

export { spawnWorkerProcess as startWorkerChild, type WorkerChild } from "../../scripts/queue-workers";

/** Polls `read` until `ok` holds of its value (which it returns), or throws after `timeoutMs`. */
export async function until<T>(read: () => Promise<T>, ok: (v: T) => boolean, timeoutMs: number, stepMs = 100): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await read();
    if (ok(v)) return v;
    if (Date.now() > end) throw new Error(`not reached in time (last: ${JSON.stringify(v)})`);
    await new Promise((r) => setTimeout(r, stepMs));
  }
}

/** Kills the worker children and force-closes the in-process workers a test started. */
export async function stopWorkers(children: WorkerChild[], workers: QueueWorker[]): Promise<void> {
  for (const c of children.splice(0)) if (c.child.exitCode === null) c.child.kill("SIGKILL");
  await Promise.all(workers.splice(0).map((w) => w.close(true)));
}
