/**
 * Ensembles on the compute queue: submitted → chunk jobs → workers (in this process, and
 * `npm run worker` processes) → every member recorded once → summarized; a worker process
 * killed mid-chunk → that chunk redone by another worker, no member lost or counted twice;
 * cancelled → waiting chunks removed, running ones stop, the members done so far kept.
 * Members' values are compared with the same members computed directly (runEnsembleChunk).
 */
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { freshQueue, startWorkerChild, stopWorkers, until, type TestQueue, type WorkerChild } from "../support/queue";
import { createEnsemble, ensembleProgress, getEnsemble, listEnsembleMembers } from "../../db/access/ensembles.server";
import { planEnsemble } from "../../app/ensembles/ensemble-plan";
import { runEnsembleChunk } from "../../app/ensembles/ensemble-task";
import { cancelEnsembleWork, submitEnsemble } from "../../app/ensembles/submit.server";
import { connectionFromUrl } from "../../app/queue/connection.server";
import { startQueueWorker, type QueueWorker } from "../../app/queue/worker.server";
import { CHUNK_SIZE } from "../../app/queue/jobs";
import { networkDocument, networkEnsembleSpec } from "../../bench/ensemble-network";
import type { EnsembleSpec } from "../../app/ensembles/ensemble-spec";

let t: TestDatabase;
let q: TestQueue;
let uid = 0;
const workers: QueueWorker[] = [];
const children: WorkerChild[] = [];
const net = networkDocument(50, 1284);

beforeAll(async () => {
  t = await freshDatabase();
  [uid] = await t.db("users").insert({ email: "queue@example.test", name: "Queue tester", role: "author" });
});
afterAll(async () => {
  await t?.drop();
});
beforeEach(async () => {
  q = await freshQueue();
});
afterEach(async () => {
  await stopWorkers(children, workers);
  await q.drop();
});

async function make(spec: EnsembleSpec): Promise<number> {
  const members = planEnsemble(spec, net.document);
  if (!members.ok) throw new Error(members.error.message);
  return createEnsemble(t.db, { ownerId: uid, name: "queue check", mechanismId: null, mechanismVersion: null, snapshot: net.document, spec, members: members.value });
}

function inProcessWorker(concurrency = 1): QueueWorker {
  const w = startQueueWorker({ db: t.db, concurrency, connection: connectionFromUrl(q.url), prefix: q.prefix });
  workers.push(w);
  return w;
}

/** Every member has exactly one row, recorded; its values equal the same member computed here. */
async function expectAllRecordedOnce(id: number, spec: EnsembleSpec, check: number[]) {
  const rows = await listEnsembleMembers(t.db, id);
  expect(rows.map((r) => r.index)).toEqual(Array.from({ length: spec.uncertainty!.samples }, (_, i) => i));
  expect(rows.every((r) => r.ok === true)).toBe(true);
  const planned = planEnsemble(spec, net.document);
  if (!planned.ok) throw new Error(planned.error.message);
  const direct = runEnsembleChunk({ snapshot: net.document, spec, members: check.map((i) => planned.value[i]) });
  for (const o of direct) expect(rows[o.index].values).toEqual(o.values);
}

// Generous time limits: correctness, not speed, is checked (a busy machine may be slow).
describe("ensembles on the compute queue", () => {
  it("runs every chunk once across workers and summarizes the ensemble", async () => {
    const spec = networkEnsembleSpec(net.initial, 3 * CHUNK_SIZE);
    const id = await make(spec);
    await submitEnsemble(t.db, id, q.queue);
    await submitEnsemble(t.db, id, q.queue); // a second submission adds no jobs
    expect((await q.queue.getJobCounts("waiting")).waiting).toBe(3);
    inProcessWorker();
    inProcessWorker();
    const p = await until(() => ensembleProgress(t.db, id), (v) => v!.status !== "queued" && v!.status !== "running", 180_000);
    expect(p).toEqual({ done: 3 * CHUNK_SIZE, total: 3 * CHUNK_SIZE, status: "done" });
    expect((await getEnsemble(t.db, id))!.summary).not.toBeNull();
    await expectAllRecordedOnce(id, spec, [0, 1, 25, 59]);
  }, 240_000);

  it("redoes the chunk of a worker process killed in the middle of it, on another worker", async () => {
    const spec = networkEnsembleSpec(net.initial, 8 * CHUNK_SIZE, { rtol: 1e-9 });
    const id = await make(spec);
    const env = { REDIS_URL: q.url, DATABASE_URL: t.url, QUEUE_PREFIX: q.prefix, lockMs: 2000 };
    const first = startWorkerChild(env);
    children.push(first);
    await first.ready;
    await submitEnsemble(t.db, id, q.queue);
    // Kill it once it holds a chunk with members computed but not yet recorded.
    const killedJob = await until(
      async () => (await q.queue.getActive()).find((j) => Number(j.progress) >= 1),
      (j) => j !== undefined,
      120_000,
      20,
    );
    first.child.kill("SIGKILL");
    await first.exited;
    const second = startWorkerChild(env);
    children.push(second);
    await second.ready;
    const p = await until(() => ensembleProgress(t.db, id), (v) => v!.status !== "queued" && v!.status !== "running", 240_000, 250);
    expect(p).toEqual({ done: 8 * CHUNK_SIZE, total: 8 * CHUNK_SIZE, status: "done" });
    const again = await q.queue.getJob(killedJob!.id!);
    expect(again?.attemptsStarted ?? 0).toBeGreaterThanOrEqual(2); // taken up again after the kill
    await expectAllRecordedOnce(id, spec, [0, 159]);
    second.child.kill("SIGTERM");
    expect(await second.exited).toBe(0);
  }, 420_000);

  it("cancels: waiting chunks leave the queue, the running one stops at its next member, members done are kept", async () => {
    const spec = networkEnsembleSpec(net.initial, 20 * CHUNK_SIZE, { rtol: 1e-9 });
    const id = await make(spec);
    await submitEnsemble(t.db, id, q.queue);
    inProcessWorker();
    await until(() => ensembleProgress(t.db, id), (v) => v!.done >= CHUNK_SIZE, 180_000);
    expect(await cancelEnsembleWork(t.db, id, q.queue)).toBe("cancelled");
    const waiting = (await q.queue.getJobs(["waiting", "delayed"])).filter((j) => j.data.ensembleId === id);
    expect(waiting).toHaveLength(0);
    await until(() => q.queue.getActiveCount(), (n) => n === 0, 60_000);
    const p1 = (await ensembleProgress(t.db, id))!;
    await new Promise((r) => setTimeout(r, 500));
    const p2 = (await ensembleProgress(t.db, id))!;
    expect(p2).toEqual(p1);
    expect(p2.status).toBe("cancelled");
    expect(p2.done).toBeGreaterThanOrEqual(CHUNK_SIZE);
    expect(p2.done).toBeLessThan(20 * CHUNK_SIZE);
    expect((await getEnsemble(t.db, id))!.summary).toBeNull();
  }, 300_000);
});
