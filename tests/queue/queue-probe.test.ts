/**
 * The compute queue end to end with its probe job: jobs added → workers in this process and in
 * `npm run worker` children → every job done once; a worker killed mid-job → its job retried
 * by another worker, nothing lost.
 */
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { connectionFromUrl } from "../../app/queue/connection.server";
import { enqueue, removeWaiting } from "../../app/queue/queue.server";
import { startQueueWorker, type QueueWorker } from "../../app/queue/worker.server";
import { probeKeys } from "../../app/queue/processors.server";
import { freshQueue, startWorkerChild, stopWorkers, until, type TestQueue, type WorkerChild } from "../support/queue";

let q: TestQueue;
const workers: QueueWorker[] = [];
const children: WorkerChild[] = [];

beforeEach(async () => {
  q = await freshQueue();
});

afterEach(async () => {
  await stopWorkers(children, workers);
  await q.drop();
});

const noDb = {} as Knex; // the probe job does not use the database

describe("compute queue (probe jobs)", () => {
  // Generous time limits: correctness, not speed, is checked (a busy machine may be slow).
  it("runs every job once across two workers", async () => {
    const key = q.prefix;
    for (let i = 0; i < 2; i++) workers.push(startQueueWorker({ db: noDb, concurrency: 2, connection: connectionFromUrl(q.url), prefix: q.prefix }));
    await enqueue(
      Array.from({ length: 12 }, (_, index) => ({ data: { kind: "probe" as const, key, index, spinMs: 20 }, jobId: `probe-${index}` })),
      q.queue,
    );
    // The same job id again is not a second job.
    await enqueue([{ data: { kind: "probe", key, index: 0, spinMs: 20 }, jobId: "probe-0" }], q.queue);
    const keys = probeKeys(key);
    await until(async () => (await q.redis.hlen(keys.done)) === 12, Boolean, 90_000);
    const runs = await q.redis.hgetall(keys.runs);
    expect(Object.keys(runs)).toHaveLength(12);
    expect(Object.values(runs).every((n) => n === "1")).toBe(true);
    const done = await q.redis.hgetall(keys.done);
    expect(done["7"]).toBe("49");
    await until(async () => (await q.queue.getJobCounts("completed")).completed === 12, Boolean, 60_000);
  }, 240_000);

  it("removes waiting jobs and stops running ones when asked", async () => {
    const key = q.prefix;
    const keys = probeKeys(key);
    workers.push(startQueueWorker({ db: noDb, concurrency: 1, connection: connectionFromUrl(q.url), prefix: q.prefix }));
    await enqueue(
      Array.from({ length: 5 }, (_, index) => ({ data: { kind: "probe" as const, key, index, spinMs: 20_000 } })),
      q.queue,
    );
    await until(async () => (await q.redis.hlen(keys.runs)) === 1, Boolean, 60_000);
    const removed = await removeWaiting((d) => d.kind === "probe" && d.key === key, q.queue);
    expect(removed).toBe(4);
    await q.redis.set(keys.stop, "1");
    await until(async () => (await q.queue.getJobCounts("completed")).completed === 1, Boolean, 60_000);
    expect(await q.redis.hlen(keys.done)).toBe(0);
    expect(await q.redis.hlen(keys.runs)).toBe(1);
  }, 180_000);

  it("retries the job of a worker process that was killed, on another worker", async () => {
    const key = q.prefix;
    const keys = probeKeys(key);
    const env = { REDIS_URL: q.url, DATABASE_URL: process.env.TEST_DATABASE_URL!, QUEUE_PREFIX: q.prefix, lockMs: 2000 };
    const first = startWorkerChild(env);
    children.push(first);
    await first.ready;
    await enqueue([{ data: { kind: "probe", key, index: 3, spinMs: 4000 } }], q.queue);
    await until(async () => (await q.redis.hlen(keys.runs)) === 1, Boolean, 90_000);
    first.child.kill("SIGKILL");
    await first.exited;
    const second = startWorkerChild(env);
    children.push(second);
    await second.ready;
    await until(async () => (await q.redis.hget(keys.done, "3")) === "9", Boolean, 120_000);
    expect(await q.redis.hget(keys.runs, "3")).toBe("2");
    second.child.kill("SIGTERM");
    expect(await second.exited).toBe(0);
  }, 300_000);
});
