/**
 * The production server for the built app (build/): `tsx scripts/serve.ts`, started by
 * `npm start` and by the test and benchmark harnesses through scripts/app-server.ts.
 *
 * One supervising process (this file) and WEB_CONCURRENCY worker processes (node:cluster;
 * default: the machine's cores, at most 4) sharing one port on HOST:PORT; a worker is
 * scripts/serve-worker.mjs.
 *
 * The supervisor:
 *  - marks runs left queued or running by an earlier server failed (they can never finish),
 *    before starting the workers, retried while the database is not answering;
 *  - names each worker (SADDLEBOOK_SERVER_PROCESS); a worker's runs carry its name, and when a
 *    worker dies its queued and running runs are marked failed with the reason and a fresh
 *    worker takes its place (it gives up, and stops the server with exit code 1, after 5 deaths
 *    within a minute); on a normal stop the workers' unfinished runs are failed the same way;
 *  - keeps the compute API's per-user request windows for all workers (IPC), so the limit is
 *    the server's, not each worker's;
 *  - runs the app's compute-queue workers (scripts/queue-workers.ts: QUEUE_WORKERS jobs at once,
 *    each in a compute thread) when REDIS_URL is set; a job it holds when the server stops is
 *    taken up again by the next worker;
 *  - on SIGTERM or SIGINT stops accepting connections, lets the workers finish the requests
 *    they hold (at most 10 s) and exits.
 */
import cluster, { type Worker } from "node:cluster";
import { randomBytes } from "node:crypto";
import { availableParallelism } from "node:os";
import { join, resolve } from "node:path";
import knexFactory from "knex";
import { knexConfigFromUrl } from "../db/config";
import { databaseUnreachable } from "../db/unreachable";
import { failRunsOfOtherServers, failRunsOfServerProcess } from "../db/access/runs.server";
import { SHUTDOWN_GRACE_MS } from "./shutdown-grace.mjs";
import { checkedLockSetting, queueWorkerCount, startQueueWorkers, type QueueWorkers } from "./queue-workers";
import { SlidingWindows, WINDOW_ANSWER, WINDOW_REQUEST, type WindowAnswer, type WindowRequest } from "../app/security/sliding-window";

const root = resolve(import.meta.dirname, "..");

/** A positive whole number from the environment, or the default; anything else stops start-up. */
function countSetting(name: string, fallback: number, max: number): number {
  const raw = process.env[name];
  if (raw === undefined || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > max) {
    console.error(`${name} must be a whole number from 1 to ${max} (got "${raw}"): fix it in the environment or .env.`);
    process.exit(1);
  }
  return n;
}

async function supervise() {
  const workers = countSetting("WEB_CONCURRENCY", Math.max(1, Math.min(4, availableParallelism())), 64);
  const threads = countSetting("COMPUTE_THREADS", Math.max(1, Math.floor((availableParallelism() - 1) / workers)), 64);
  try {
    queueWorkerCount();
    checkedLockSetting();
  } catch (e) {
    console.error((e as Error).message);
    process.exit(1);
  }
  const bootId = randomBytes(4).toString("hex");
  const dbUrl = process.env.DATABASE_URL;
  if (!dbUrl) throw new Error("DATABASE_URL is not set.");
  const db = knexFactory(knexConfigFromUrl(dbUrl, { min: 0, max: 1 }));

  // Runs left queued or running by an earlier server can never finish: fail them. Every run of
  // this server carries a name starting with bootId, so this is safe while workers run; while
  // the database is not answering it is retried.
  const sweep = async (): Promise<void> => {
    try {
      await failRunsOfOtherServers(db, `${bootId}.`);
    } catch (e) {
      const err = e as { code?: string; message: string };
      const unreachable = databaseUnreachable(e);
      console.error(`Could not check for interrupted runs (${err.code ?? err.message})${unreachable ? "; trying again in 5 s" : ""}.`);
      if (unreachable) setTimeout(() => void sweep(), 5000).unref();
    }
  };
  await sweep();

  // Compute-queue workers: off the request path (their work runs in compute threads).
  let queueWorkers: QueueWorkers | undefined;
  if (process.env.REDIS_URL) {
    queueWorkers = await startQueueWorkers({ databaseUrl: dbUrl, redisUrl: process.env.REDIS_URL, log: (line) => console.error(line) });
  }

  const windows = new SlidingWindows();
  const names = new Map<Worker, string>();
  const deaths: number[] = [];
  let serial = 0;
  let stopping = false;
  let exitCode = 0;

  const start = () => {
    const name = `${bootId}.${++serial}`;
    const w = cluster.fork({ SADDLEBOOK_SERVER_PROCESS: name, COMPUTE_THREADS: String(threads) });
    names.set(w, name);
    w.on("message", (msg: unknown) => {
      const m = msg as Partial<WindowRequest> | null;
      if (!m || m.type !== WINDOW_REQUEST || typeof m.id !== "number" || typeof m.key !== "string") return;
      // One clock for all workers' requests: the supervisor's.
      const answer: WindowAnswer = { type: WINDOW_ANSWER, id: m.id, verdict: windows.hit(m.key, Number(m.limit), Date.now()) };
      if (w.isConnected()) w.send(answer);
    });
  };

  /** A worker is gone: its queued and running runs can never finish. */
  const failRunsOf = (name: string | undefined) =>
    name
      ? failRunsOfServerProcess(db, name).catch((e: { code?: string; message: string }) => console.error(`Could not mark the stopped worker's runs failed (${e.code ?? e.message}).`))
      : Promise.resolve();

  const stop = (code: number) => {
    exitCode = Math.max(exitCode, code);
    if (stopping) return;
    stopping = true;
    void queueWorkers?.stop().catch(() => {});
    if (names.size === 0) void db.destroy().finally(() => process.exit(exitCode));
    for (const w of names.keys()) w.process.kill("SIGTERM");
    setTimeout(() => {
      for (const w of names.keys()) w.process.kill("SIGKILL");
      process.exit(exitCode);
    }, SHUTDOWN_GRACE_MS + 2000).unref();
  };

  cluster.on("exit", (w, code, signal) => {
    const name = names.get(w);
    names.delete(w);
    if (stopping) {
      void failRunsOf(name).then(() => {
        if (names.size === 0) void db.destroy().finally(() => process.exit(exitCode));
      });
      return;
    }
    console.error(`A server worker stopped (${signal ?? `exit code ${code}`}); starting another.`);
    void failRunsOf(name);
    const now = Date.now();
    deaths.push(now);
    while (deaths.length && deaths[0]! < now - 60_000) deaths.shift();
    if (deaths.length >= 5) {
      console.error("Server workers keep stopping (5 within a minute): stopping the server.");
      stop(1);
      return;
    }
    start();
  });

  process.once("SIGTERM", () => stop(0));
  process.once("SIGINT", () => stop(0));

  // Workers run plain JavaScript on plain Node (no TypeScript loader between them and the build).
  cluster.setupPrimary({ exec: join(root, "scripts/serve-worker.mjs"), execArgv: [] });
  for (let i = 0; i < workers; i++) start();
}

supervise().catch((e) => {
  console.error(e instanceof Error ? e.message : e);
  process.exit(1);
});
