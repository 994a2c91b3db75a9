/**
 * The app server's own compute-queue workers: QUEUE_WORKERS jobs at once (default 1), each in a
 * compute thread, run by the production server's supervisor (scripts/serve.ts) and, under
 * `npm run dev`, by scripts/start.ts. `npm run worker` adds more on any machine.
 */
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
