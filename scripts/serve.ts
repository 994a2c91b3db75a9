/**
 * The production server for the built app (build/): `tsx scripts/serve.ts`, started by
 * `npm start` and by the test and benchmark harnesses through scripts/app-server.ts.
 *
 * One supervising process (this file) and WEB_CONCURRENCY worker processes (node:cluster;
 * default: the machine's cores, at most 4) sharing one port on HOST:PORT; a worker is
 * scripts/serve-worker.mjs.
 *
 * The supervisor:
 *  - before starting any worker, marks runs left queued or running by an earlier server failed
 *    (they can never finish), so each worker starts with an empty queue;
 *  - names each worker (SADDLEBOOK_SERVER_PROCESS); a worker's runs carry its name, and when a
 *    worker dies its queued and running runs are marked failed with the reason and a fresh
 *    worker takes its place (it gives up, and stops the server, after 5 deaths within a minute);
 *  - keeps the compute API's per-user request windows for all workers (IPC), so the limit is
 *    the server's, not each worker's;
 *  - on SIGTERM or SIGINT stops accepting connections, lets the workers finish the requests
 *    they hold (at most 10 s) and exits.
 */
import cluster, { type Worker } from "node:cluster";
import { randomBytes } from "node:crypto";
import { availableParallelism } from "node:os";
import { join, resolve } from "node:path";
import knexFactory from "knex";
import { knexConfigFromUrl } from "../db/config";
import { failInterruptedRuns, failRunsOfServerProcess } from "../db/access/runs.server";
import { SlidingWindows, WINDOW_ANSWER, WINDOW_REQUEST, type WindowAnswer, type WindowRequest } from "../app/security/sliding-window";

const root = resolve(import.meta.dirname, "..");
const SHUTDOWN_GRACE_MS = 10_000;

function workerCount(): number {
  const n = Number(process.env.WEB_CONCURRENCY);
  if (process.env.WEB_CONCURRENCY && Number.isInteger(n) && n >= 1 && n <= 64) return n;
  return Math.max(1, Math.min(4, availableParallelism()));
}

async function supervise() {
  const workers = workerCount();
  const bootId = randomBytes(4).toString("hex");
  const dbUrl = process.env.DATABASE_URL;
  if (!dbUrl) throw new Error("DATABASE_URL is not set.");
  const db = knexFactory(knexConfigFromUrl(dbUrl, { min: 0, max: 1 }));
  try {
    const [rows] = (await db.raw("SELECT NOW(3) AS t")) as unknown as [{ t: Date }[]];
    await failInterruptedRuns(db, rows[0]!.t);
  } catch (e) {
    // The workers report the database's state on every request (503 with the reason).
    console.error(`Could not check for interrupted runs: ${(e as Error).message}`);
  }

  const windows = new SlidingWindows();
  const names = new Map<Worker, string>();
  const deaths: number[] = [];
  let serial = 0;
  let stopping = false;
  const threads = process.env.COMPUTE_THREADS ?? String(Math.max(1, Math.floor((availableParallelism() - 1) / workers)));

  const start = () => {
    const name = `${bootId}.${++serial}`;
    const w = cluster.fork({ SADDLEBOOK_SERVER_PROCESS: name, COMPUTE_THREADS: threads });
    names.set(w, name);
    w.on("message", (msg: unknown) => {
      const m = msg as Partial<WindowRequest> | null;
      if (!m || m.type !== WINDOW_REQUEST || typeof m.id !== "number" || typeof m.key !== "string") return;
      const answer: WindowAnswer = { type: WINDOW_ANSWER, id: m.id, verdict: windows.hit(m.key, Number(m.limit), Number(m.now)) };
      if (w.isConnected()) w.send(answer);
    });
  };

  cluster.on("exit", (w, code, signal) => {
    const name = names.get(w);
    names.delete(w);
    if (stopping) {
      if (names.size === 0) void db.destroy().finally(() => process.exit(0));
      return;
    }
    console.error(`A server worker stopped (${signal ?? `exit code ${code}`}); starting another.`);
    if (name) void failRunsOfServerProcess(db, name).catch((e) => console.error(`Could not mark its runs failed: ${(e as Error).message}`));
    const now = Date.now();
    deaths.push(now);
    while (deaths.length && deaths[0]! < now - 60_000) deaths.shift();
    if (deaths.length >= 5) {
      console.error("Server workers keep stopping (5 within a minute): stopping the server.");
      stopping = true;
      for (const other of names.keys()) other.process.kill("SIGTERM");
      if (names.size === 0) void db.destroy().finally(() => process.exit(1));
      return;
    }
    start();
  });

  const stop = () => {
    if (stopping) return;
    stopping = true;
    if (names.size === 0) void db.destroy().finally(() => process.exit(0));
    for (const w of names.keys()) w.process.kill("SIGTERM");
    setTimeout(() => {
      for (const w of names.keys()) w.process.kill("SIGKILL");
      process.exit(0);
    }, SHUTDOWN_GRACE_MS + 2000).unref();
  };
  process.once("SIGTERM", stop);
  process.once("SIGINT", stop);

  // Workers run plain JavaScript on plain Node (no TypeScript loader between them and the build).
  cluster.setupPrimary({ exec: join(root, "scripts/serve-worker.mjs"), execArgv: [] });
  for (let i = 0; i < workers; i++) start();
}

supervise().catch((e) => {
  console.error(e instanceof Error ? e.message : e);
  process.exit(1);
});
