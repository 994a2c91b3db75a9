/**
 * Compute-queue benchmark (`npm run bench -- queue`): a 1,000-member uncertainty ensemble of a
 * seeded 50-species, 96-step stiff network (bench/ensemble-network.ts) computed by 1, 2 and 4
 * `npm run worker` processes (one job at a time each) sharing the test Redis and a bench
 * database: wall time from submission to the summarized ensemble, and members per second.
 * First the same 1,000 members are computed directly in this process (no queue), as the
 * throughput yardstick and as the accuracy check: every member of every queued run must be
 * recorded, and its values must equal the direct computation of the same member.
 * BENCH_QUEUE_MEMBERS changes the ensemble's size; BENCH_QUEUE_WORKERS the worker counts (e.g. "1,2").
 * The figures depend on the cores free at the time: with fewer cores than processes, more
 * processes cannot go faster.
 */
import knexFactory from "knex";
import { randomBytes } from "node:crypto";
import { availableParallelism } from "node:os";
import { performance } from "node:perf_hooks";
import type { BenchCase, BenchSuite } from "./types.ts";
import { networkDocument, networkEnsembleSpec } from "./ensemble-network.ts";
import { ensureDatabase } from "../scripts/mariadb";
import { ensureRedis } from "../scripts/redis";
import { spawnWorkerProcess, type WorkerChild } from "../scripts/queue-workers";
import { knexConfigFromUrl, withDatabase } from "../db/config";
import { migrateLatest } from "../db/migrate";
import { createEnsemble, ensembleProgress, listEnsembleMembers } from "../db/access/ensembles.server";
import { planEnsemble } from "../app/ensembles/ensemble-plan";
import { runEnsembleChunk, type MemberOutcome } from "../app/ensembles/ensemble-task";
import { submitEnsemble } from "../app/ensembles/submit.server";
import { connectionFromUrl } from "../app/queue/connection.server";
import { closeQueues, computeQueue } from "../app/queue/queue.server";

const MEMBERS = Number(process.env.BENCH_QUEUE_MEMBERS ?? 1000);
const WORKER_COUNTS = (process.env.BENCH_QUEUE_WORKERS ?? "1,2,4").split(",").map(Number);

/** Largest relative difference between two members' values (0 when identical); Infinity when keys differ. */
function maxRelDiff(a: Record<string, number> | null | undefined, b: Record<string, number> | undefined): number {
  if (!a || !b) return Infinity;
  const keys = Object.keys(b);
  if (Object.keys(a).length !== keys.length) return Infinity;
  let worst = 0;
  for (const k of keys) {
    if (!(k in a)) return Infinity;
    const d = Math.abs(a[k] - b[k]) / Math.max(Math.abs(b[k]), 1e-300);
    if (d > worst) worst = d;
  }
  return worst;
}

function printTable(rows: string[][]): void {
  const w = rows[0].map((_, i) => Math.max(...rows.map((r) => r[i].length)));
  const line = (r: string[]) => r.map((x, i) => (i === 0 ? x.padEnd(w[i]) : x.padStart(w[i]))).join("  ");
  console.log([line(rows[0]), w.map((n) => "-".repeat(n)).join("  "), ...rows.slice(1).map(line)].join("\n"));
}

async function runQueueBench(): Promise<BenchCase[]> {
  const { document, initial } = networkDocument(50, 1284);
  const spec = networkEnsembleSpec(initial, MEMBERS);
  const planned = planEnsemble(spec, document);
  if (!planned.ok) throw new Error(planned.error.message);

  // Direct, in this process: the yardstick and the reference values.
  const t0 = performance.now();
  const direct: MemberOutcome[] = runEnsembleChunk({ snapshot: document, spec, members: planned.value });
  const directMs = performance.now() - t0;
  const cases: BenchCase[] = [
    {
      name: `ensemble ${MEMBERS} members, 50 species: direct in one thread (no queue)`,
      wallMsMedian: directMs,
      runs: 1,
      extra: { membersPerSecond: Number(((MEMBERS * 1000) / directMs).toFixed(1)), membersOk: direct.filter((o) => o.ok).length },
    },
  ];
  const table = [["run", "workers", "wall s", "members/s", "speed-up", "recorded", "ok", "max rel diff vs direct"]];
  table.push(["direct (no queue)", "–", (directMs / 1000).toFixed(1), ((MEMBERS * 1000) / directMs).toFixed(1), "–", String(direct.length), String(direct.filter((o) => o.ok).length), "–"]);

  const database = await ensureDatabase("test");
  const redis = await ensureRedis("test", () => {});
  const name = `saddlebook_t_bench_queue_${randomBytes(4).toString("hex")}`;
  const admin = knexFactory(knexConfigFromUrl(database.url, { min: 0, max: 1 }));
  await admin.raw("CREATE DATABASE ?? CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci", [name]);
  const url = withDatabase(database.url, name);
  const db = knexFactory(knexConfigFromUrl(url, { min: 0, max: 4 }));
  const prefix = `sbbench_${randomBytes(4).toString("hex")}`;
  const queue = computeQueue({ connection: connectionFromUrl(redis.url), prefix });
  let children: WorkerChild[] = [];
  let oneWorkerMs = NaN;
  try {
    await migrateLatest(db);
    const [uid] = await db("users").insert({ email: "bench@example.test", name: "Queue bench", role: "author" });
    for (const n of WORKER_COUNTS) {
      const id = await createEnsemble(db, { ownerId: uid, name: `bench ${n}`, mechanismId: null, mechanismVersion: null, snapshot: document, spec, members: planned.value });
      children = Array.from({ length: n }, () => spawnWorkerProcess({ REDIS_URL: redis.url, DATABASE_URL: url, QUEUE_PREFIX: prefix, concurrency: 1 }));
      await Promise.all(children.map((c) => c.ready));
      const start = performance.now();
      await submitEnsemble(db, id, queue);
      let p = await ensembleProgress(db, id);
      while (p && (p.status === "queued" || p.status === "running")) {
        await new Promise((r) => setTimeout(r, 100));
        p = await ensembleProgress(db, id);
      }
      const wallMs = performance.now() - start;
      await Promise.all(children.map((c) => (c.child.kill("SIGTERM"), c.exited)));
      children = [];
      const rows = await listEnsembleMembers(db, id);
      const recorded = rows.filter((r) => r.ok !== null).length;
      const ok = rows.filter((r) => r.ok).length;
      let worst = 0;
      for (const r of rows) worst = Math.max(worst, maxRelDiff(r.values, direct[r.index]?.values));
      if (n === 1) oneWorkerMs = wallMs;
      const perSecond = (MEMBERS * 1000) / wallMs;
      cases.push({
        name: `ensemble ${MEMBERS} members, 50 species: ${n} worker process${n > 1 ? "es" : ""}`,
        wallMsMedian: wallMs,
        runs: 1,
        extra: { workers: n, membersPerSecond: Number(perSecond.toFixed(1)), speedUpVsOneWorker: Number((oneWorkerMs / wallMs).toFixed(2)), recorded, ok, status: p?.status ?? "missing", maxRelDiffVsDirect: worst, cores: availableParallelism() },
      });
      table.push([`queue (${p?.status})`, String(n), (wallMs / 1000).toFixed(1), perSecond.toFixed(1), Number.isFinite(oneWorkerMs) ? (oneWorkerMs / wallMs).toFixed(2) : "–", String(recorded), String(ok), worst === 0 ? "0 (identical)" : worst.toExponential(2)]);
    }
  } finally {
    for (const c of children) c.child.kill("SIGKILL");
    await queue.obliterate({ force: true }).catch(() => {});
    await closeQueues();
    await db.destroy();
    await admin.raw("DROP DATABASE IF EXISTS ??", [name]).catch(() => {});
    await admin.destroy();
  }
  console.log(`\nCompute queue: ${MEMBERS}-member ensemble of a 50-species network on ${availableParallelism()} cores`);
  printTable(table);
  console.log("");
  return cases;
}

export const suite: BenchSuite = { name: "queue", run: runQueueBench };
