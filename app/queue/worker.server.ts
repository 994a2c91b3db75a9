/**
 * A compute-queue worker: takes jobs from the queue on Redis and runs each through its kind's
 * processor (processors.server.ts). Used in two places: the app server runs QUEUE_WORKERS of
 * them (default 1) beside the pages, and `npm run worker` runs one per core on any machine that
 * shares the Redis and the database.
 *
 * The CPU-bound part of a job runs in a compute thread (piscina, app/compute/simulate-worker.mjs),
 * never on this process's main thread, so the worker keeps renewing its job locks (and the app
 * keeps answering pages) while members are computed.
 *
 * When a worker process dies its jobs' locks expire after LOCK_MS; another worker's stalled-job
 * check (every STALLED_CHECK_MS) puts them back in the queue, up to MAX_STALLED times, and they
 * are done again from the start (recording outcomes is idempotent, so nothing counts twice).
 */
import { Piscina } from "piscina";
import { pathToFileURL } from "node:url";
import { Worker, UnrecoverableError, type ConnectionOptions, type Job } from "bullmq";
import { Redis } from "ioredis";
import type { Knex } from "knex";
import { defaultWorkerFile } from "../compute/pool.server";
import { connectionFromUrl, queuePrefix, QUEUE_NAME } from "./connection.server";
import { computeJob, type ComputeJob } from "./jobs";
import { processorFor, type ThreadRun } from "./processors.server";

export const LOCK_MS = 10_000;
export const STALLED_CHECK_MS = 5_000;
export const MAX_STALLED = 3;
/** QUEUE_LOCK_MS (default LOCK_MS), at least 1000 ms; the stalled check runs at half of it. */
export function lockSetting(env: NodeJS.ProcessEnv = process.env): { lockMs: number; stalledCheckMs: number } {
  const raw = env.QUEUE_LOCK_MS;
  if (raw === undefined || raw === "") return { lockMs: LOCK_MS, stalledCheckMs: STALLED_CHECK_MS };
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1000) throw new Error(`QUEUE_LOCK_MS must be a whole number of milliseconds, at least 1000 (got "${raw}").`);
  return { lockMs: n, stalledCheckMs: Math.round(n / 2) };
}

/** How often a running job's stop condition (cancellation) is checked and its progress reported, ms. */
const TICK_MS = 250;

export interface QueueWorkerOptions {
  db: Knex;
  /** Jobs this worker runs at once (and compute threads it may use). */
  concurrency: number;
  connection?: ConnectionOptions;
  prefix?: string;
  /** Lock and stalled-check periods, ms (default: lockSetting()). */
  lockMs?: number;
  stalledCheckMs?: number;
  log?: (line: string) => void;
}

export interface QueueWorker {
  worker: Worker;
  /** Starts the compute threads and loads the engine in them (a worker process does this before it says it is ready). */
  warmUp(): Promise<void>;
  /** Finishes the jobs it holds (or, with force, abandons them to be retried elsewhere) and stops. */
  close(force?: boolean): Promise<void>;
}

export function startQueueWorker(opts: QueueWorkerOptions): QueueWorker {
  const connection = opts.connection ?? connectionFromUrl();
  const prefix = opts.prefix ?? queuePrefix();
  const log = opts.log ?? (() => {});
  const pool = new Piscina({
    filename: pathToFileURL(defaultWorkerFile()).href,
    minThreads: 0,
    maxThreads: opts.concurrency,
    idleTimeout: 60_000,
    resourceLimits: { maxOldGenerationSizeMb: 2048 },
  });
  let redis: Redis | undefined;
  const redisClient = () => {
    if (!redis) {
      const c = connection as { host?: string; port?: number; username?: string; password?: string; db?: number; tls?: object };
      redis = new Redis({ host: c.host, port: c.port, username: c.username, password: c.password, db: c.db, tls: c.tls, maxRetriesPerRequest: 3 });
      redis.on("error", () => {});
    }
    return redis;
  };

  const runInThread = (job: Job): ThreadRun => async (kind, input, hooks = {}) => {
    const progress = new SharedArrayBuffer(16);
    const control = new SharedArrayBuffer(4);
    const prog = new Float64Array(progress);
    const flag = new Int32Array(control);
    let reported = 0;
    let ticking = false;
    const tick = async () => {
      if (ticking) return;
      ticking = true;
      try {
        if (Atomics.load(flag, 0) === 0 && hooks.shouldStop && (await hooks.shouldStop())) Atomics.store(flag, 0, 1);
        if (prog[0] > reported) {
          reported = prog[0];
          await job.updateProgress(reported);
        }
      } catch {
        /* a missed check is retried at the next tick */
      } finally {
        ticking = false;
      }
    };
    const timer = setInterval(() => void tick(), TICK_MS);
    try {
      return await pool.run({ kind, input, progress, control });
    } finally {
      clearInterval(timer);
    }
  };

  const worker = new Worker(
    QUEUE_NAME,
    async (job: Job) => {
      const parsed = computeJob.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError(`Not a compute job: ${parsed.error.issues[0]?.message ?? "bad data"}`);
      const data: ComputeJob = parsed.data;
      return processorFor(data).run(data, { db: opts.db, job, runInThread: runInThread(job), redis: redisClient });
    },
    {
      connection,
      prefix,
      concurrency: opts.concurrency,
      lockDuration: opts.lockMs ?? lockSetting().lockMs,
      stalledInterval: opts.stalledCheckMs ?? lockSetting().stalledCheckMs,
      maxStalledCount: MAX_STALLED,
    },
  );
  // While Redis is away the connection reports every reconnection attempt: say it once a minute.
  let lastError = { text: "", at: 0 };
  worker.on("error", (e) => {
    const now = Date.now();
    if (e.message === lastError.text && now - lastError.at < 60_000) return;
    lastError = { text: e.message, at: now };
    log(`Compute queue: ${e.message}`);
  });
  worker.on("failed", (job, err) => {
    if (!job) return;
    void (async () => {
      // Failed for good (attempts used up, stalled too often, or unrecoverable), or waiting for a retry?
      const final = (await job.getState()) === "failed";
      log(`Compute job ${job.id} (${job.name}) failed${final ? "" : ", to be retried"}: ${err.message}`);
      if (!final) return;
      const parsed = computeJob.safeParse(job.data);
      if (parsed.success) await processorFor(parsed.data).giveUp?.(parsed.data, opts.db, err.message);
    })().catch((e: Error) => log(`Compute job ${job.id}: could not record the failure (${e.message}).`));
  });

  return {
    worker,
    async warmUp() {
      const nothing = new SharedArrayBuffer(16);
      await Promise.all(Array.from({ length: opts.concurrency }, () => pool.run({ kind: "warm-up", input: null, progress: nothing, control: new SharedArrayBuffer(4) })));
    },
    async close(force = false) {
      await worker.close(force);
      await pool.destroy();
      redis?.disconnect();
    },
  };
}
