/**
 * The compute queue, producer side: adding jobs, removing the waiting jobs of something
 * cancelled, and a cheap reachability check for the health endpoint. One Queue per process
 * per (connection, prefix), created on first use.
 */
import { Queue, type ConnectionOptions, type JobsOptions } from "bullmq";
import { Redis } from "ioredis";
import { connectionFromUrl, queuePrefix, QUEUE_NAME } from "./connection.server";
import type { ComputeJob } from "./jobs";

/**
 * Retries: a job whose worker died (stalled) or that threw is tried again, up to ATTEMPTS
 * times in all, after 1 s, 2 s, 4 s … (a processor that cannot succeed throws BullMQ's
 * UnrecoverableError and is not retried).
 */
export const ATTEMPTS = 5;

export const DEFAULT_JOB_OPTIONS: JobsOptions = {
  attempts: ATTEMPTS,
  backoff: { type: "exponential", delay: 1000 },
  removeOnComplete: { age: 24 * 3600, count: 5000 },
  removeOnFail: { age: 7 * 24 * 3600 },
};

export interface QueueSettings {
  connection?: ConnectionOptions;
  prefix?: string;
}

const KEY = Symbol.for("saddlebook.computeQueue");
type Registry = Map<string, Queue>;

function registry(): Registry {
  const g = globalThis as unknown as Record<symbol, Registry | undefined>;
  return (g[KEY] ??= new Map());
}

/** The compute queue on REDIS_URL (or the given connection). */
export function computeQueue(settings: QueueSettings = {}): Queue {
  const connection = settings.connection ?? connectionFromUrl();
  const prefix = settings.prefix ?? queuePrefix();
  const key = `${JSON.stringify(connection)}|${prefix}`;
  const reg = registry();
  let q = reg.get(key);
  if (!q) {
    q = new Queue(QUEUE_NAME, { connection, prefix, defaultJobOptions: DEFAULT_JOB_OPTIONS });
    q.on("error", () => {}); // connection trouble surfaces on the calls that need Redis
    reg.set(key, q);
  }
  return q;
}

/** Adds jobs in one round trip; a job with an id already in the queue is not added twice. */
export async function enqueue(jobs: Array<{ data: ComputeJob; jobId?: string }>, queue: Queue = computeQueue()): Promise<void> {
  if (jobs.length === 0) return;
  await queue.addBulk(jobs.map((j) => ({ name: j.data.kind, data: j.data, opts: j.jobId ? { jobId: j.jobId } : undefined })));
}

/**
 * Removes the jobs not yet started for which `matches(data)` holds; a job a worker holds is
 * left to stop by itself (its processor checks for cancellation). Returns how many went.
 */
export async function removeWaiting(matches: (data: ComputeJob) => boolean, queue: Queue = computeQueue()): Promise<number> {
  const jobs = await queue.getJobs(["waiting", "delayed", "prioritized", "waiting-children"]);
  let removed = 0;
  for (const job of jobs) {
    if (!job || !matches(job.data as ComputeJob)) continue;
    try {
      await job.remove();
      removed++;
    } catch {
      /* taken by a worker meanwhile: it stops at its next member */
    }
  }
  return removed;
}

let pingClient: Redis | undefined;

/** Null when the queue's Redis answers PING within `timeoutMs`, else the reason (one connection, kept). */
export async function queueProblem(timeoutMs = 1000): Promise<string | null> {
  const url = process.env.REDIS_URL;
  if (!url) return "REDIS_URL is not set";
  if (!pingClient) {
    pingClient = new Redis(url, { connectTimeout: timeoutMs, maxRetriesPerRequest: 0 });
    pingClient.on("error", () => {});
  }
  const client = pingClient;
  let timer: NodeJS.Timeout | undefined;
  try {
    const pong = await Promise.race([
      client.ping(),
      new Promise<never>((_, reject) => (timer = setTimeout(() => reject(new Error("Redis did not answer in time")), timeoutMs))),
    ]);
    return pong === "PONG" ? null : `Redis answered ${String(pong)}`;
  } catch (e) {
    return e instanceof Error ? e.message : String(e);
  } finally {
    clearTimeout(timer);
  }
}

/** Closes every queue this process opened (tests, shutdown). */
export async function closeQueues(): Promise<void> {
  const reg = registry();
  const all = [...reg.values()];
  reg.clear();
  await Promise.all(all.map((q) => q.close().catch(() => {})));
  pingClient?.disconnect();
  pingClient = undefined;
}
