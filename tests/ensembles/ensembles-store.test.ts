/**
 * Ensembles in the database: created with every member planned, in one transaction; work handed
 * out by index range; outcomes recorded idempotently (a retried chunk overwrites, never
 * duplicates); progress; finishing summarizes once, and a second call changes nothing; cancel;
 * fail.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import {
  createEnsemble,
  ensembleProgress,
  failEnsemble,
  finishEnsembleIfComplete,
  getEnsemble,
  getEnsembleWork,
  isEnsembleCancelRequested,
  listEnsembleMembers,
  recordMemberOutcomes,
  requestEnsembleCancel,
} from "../../db/access/ensembles.server";
import { planEnsemble } from "../../app/ensembles/ensemble-plan";
import { runEnsembleChunk } from "../../app/ensembles/ensemble-task";
import { documentOf, firstOrderStep, specOf } from "./fixtures";

let t: TestDatabase;
let uid = 0;
const doc = documentOf([firstOrderStep("s1", "A", "B", 80, { uncertainty: { value: 2, unit: "kJ/mol" } }), firstOrderStep("s2", "A", "C", 82)]);
const spec = specOf({ uncertainty: { samples: 12, sampler: "monte-carlo", seed: 5, defaultSigma: { value: 3, unit: "kJ/mol" } } });

beforeAll(async () => {
  t = await freshDatabase();
  [uid] = await t.db("users").insert({ email: "ens@example.test", name: "Ensemble tester", role: "author" });
});
afterAll(async () => {
  await t?.drop();
});

async function make(s = spec) {
  const members = planEnsemble(s, doc);
  if (!members.ok) throw new Error(members.error.message);
  return createEnsemble(t.db, { ownerId: uid, name: "check", mechanismId: null, mechanismVersion: null, snapshot: doc, spec: s, members: members.value });
}

describe("ensembles store", () => {
  it("creates a queued ensemble with its planned members and hands out work by index range", async () => {
    const id = await make();
    expect(await ensembleProgress(t.db, id)).toEqual({ done: 0, total: 12, status: "queued" });
    const w = await getEnsembleWork(t.db, id, 4, 8);
    expect(w.members.map((m) => m.index)).toEqual([4, 5, 6, 7]);
    expect(w.spec).toEqual(spec);
    expect(w.snapshot).toEqual(doc);
    const planned = planEnsemble(spec, doc);
    expect(planned.ok && planned.value.slice(4, 8)).toEqual(w.members);
  });

  it("records outcomes idempotently and finishes once, with the summary", async () => {
    const id = await make();
    const first = await getEnsembleWork(t.db, id, 0, 6);
    const a = runEnsembleChunk(first, {});
    await recordMemberOutcomes(t.db, id, a);
    await recordMemberOutcomes(t.db, id, a); // a retried chunk
    expect(await ensembleProgress(t.db, id)).toEqual({ done: 6, total: 12, status: "running" });
    expect(await finishEnsembleIfComplete(t.db, id)).toBe(false);
    const b = runEnsembleChunk(await getEnsembleWork(t.db, id, 6, 12), {});
    await recordMemberOutcomes(t.db, id, b);
    const [finishedOnce, finishedTwice] = await Promise.all([finishEnsembleIfComplete(t.db, id), finishEnsembleIfComplete(t.db, id)]);
    expect([finishedOnce, finishedTwice].sort()).toEqual([false, true]);
    expect(await finishEnsembleIfComplete(t.db, id)).toBe(false);
    const e = (await getEnsemble(t.db, id))!;
    expect(e.status).toBe("done");
    expect(e.summary!.members).toEqual({ total: 12, ok: 12, failed: 0 });
    expect(e.summary!.sensitivity.length).toBeGreaterThan(0);
    const rows = await listEnsembleMembers(t.db, id);
    expect(rows).toHaveLength(12);
    expect(rows.every((r) => r.ok)).toBe(true);
    expect(await t.db("ensemble_members").where({ ensemble_id: id }).count({ n: "*" })).toEqual([{ n: 12 }]);
  });

  it("cancels a queued or running ensemble at once and leaves an ended one alone", async () => {
    const id = await make();
    expect(await isEnsembleCancelRequested(t.db, id)).toBe(false);
    expect(await requestEnsembleCancel(t.db, id)).toBe("cancelled");
    expect(await isEnsembleCancelRequested(t.db, id)).toBe(true);
    expect(await requestEnsembleCancel(t.db, id)).toBe("cancelled");
    // members recorded after the cancel do not revive it
    await recordMemberOutcomes(t.db, id, runEnsembleChunk(await getEnsembleWork(t.db, id, 0, 12), {}));
    expect(await finishEnsembleIfComplete(t.db, id)).toBe(false);
    expect((await getEnsemble(t.db, id))!.status).toBe("cancelled");
    expect(await failEnsemble(t.db, id, "late")).toBe(false);
  });

  it("fails with the reason", async () => {
    const id = await make();
    expect(await failEnsemble(t.db, id, "The worker stopped.")).toBe(true);
    const e = (await getEnsemble(t.db, id))!;
    expect([e.status, e.statusReason]).toEqual(["failed", "The worker stopped."]);
  });

  // Computing on the compute queue (workers, retries, cancellation): tests/queue/ensemble-queue.test.ts.
});
