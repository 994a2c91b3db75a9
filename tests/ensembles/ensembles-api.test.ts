/**
 * Ensembles through the REST API on a real database: start (202), poll to done, summary and
 * labels by name, CSV exports keyed by names with units; cancel; every error in the JSON shape
 * (400 invalid body, 403 viewer, 404 unseen, 409 nothing to cancel / no summary, 422 unknown
 * species). The numbers themselves are checked against analytic results in ensemble-task.test.ts.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import { firstOrderStep } from "./fixtures";
import { testRedisUrl } from "../support/queue";
import { startQueueWorker, type QueueWorker } from "../../app/queue/worker.server";
import { closeQueues, computeQueue } from "../../app/queue/queue.server";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
const auth = apiCaller;

let t: TestDatabase;
let mid = 0;
let worker: QueueWorker | undefined;
let list: typeof import("../../app/routes/api.v1.ensembles");
let one: typeof import("../../app/routes/api.v1.ensembles.$id");
let cancel: typeof import("../../app/routes/api.v1.ensembles.$id.cancel");
let members: typeof import("../../app/routes/api.v1.ensembles.$id.members-csv");
let summary: typeof import("../../app/routes/api.v1.ensembles.$id.summary-csv");

const mechanism = {
  format: "saddlebook.mechanism",
  version: 1,
  about: { name: "Two routes (illustrative)", illustrative: true },
  species: [{ id: "A", label: "Ketone" }, { id: "B", label: "Alcohol" }, { id: "C", label: "Ether" }],
  steps: [
    firstOrderStep("s1", "A", "B", 80, { label: "Reduction", uncertainty: { value: 3, unit: "kJ/mol" }, provenance: { source: "computed", method: "DFT-A/basis-1" } }),
    firstOrderStep("s2", "A", "C", 81, { label: "Etherification", provenance: { source: "computed", method: "DFT-A/basis-1" } }),
  ],
};

beforeAll(async () => {
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  // The ensembles' compute queue: the test Redis under a prefix of this file's own, one worker.
  process.env.REDIS_URL = testRedisUrl();
  process.env.QUEUE_PREFIX = `sbt_api_${Date.now().toString(36)}`;
  worker = startQueueWorker({ db: t.db, concurrency: 1 });
  const [uid] = await t.db("users").insert({ email: "ens-api@example.test", name: "Ensemble API tester", role: "author" });
  Object.assign(auth, { userId: uid, email: "ens-api@example.test", name: "Ensemble API tester" });
  const { importMechanism } = await import("../../db/access/mechanisms.server");
  mid = (await importMechanism(t.db, { id: uid, role: "author", groupIds: [], adminGroupIds: [] }, mechanism, { visibility: "private" })).id;
  list = await import("../../app/routes/api.v1.ensembles");
  one = await import("../../app/routes/api.v1.ensembles.$id");
  cancel = await import("../../app/routes/api.v1.ensembles.$id.cancel");
  members = await import("../../app/routes/api.v1.ensembles.$id.members-csv");
  summary = await import("../../app/routes/api.v1.ensembles.$id.summary-csv");
});

afterAll(async () => {
  await worker?.close(true);
  await computeQueue().obliterate({ force: true }).catch(() => {});
  await closeQueues();
  const { getDb } = await import("../../db/client.server");
  await new Promise((r) => setTimeout(r, 300));
  await getDb().destroy();
  await t?.drop();
});

const args = (request: Request, params: Record<string, string> = {}) => ({ request, params, context: {} }) as never;
const call = async (p: Promise<unknown> | unknown) => {
  const res = (await p) as Response;
  return { status: res.status, type: res.headers.get("Content-Type") ?? "", text: await res.text() };
};
const post = (url: string, body?: unknown) => new Request(`http://localhost${url}`, { method: "POST", headers: { "Content-Type": "application/json" }, body: body === undefined ? undefined : JSON.stringify(body) });

function spec(extra: Record<string, unknown> = {}) {
  return {
    mechanismId: mid,
    conditions: { temperature: { value: 298.15, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 60, unit: "s" } },
    mode: "uncertainty",
    uncertainty: { samples: 40, sampler: "latin-hypercube", seed: 7, defaultSigma: { value: 1, unit: "kJ/mol" }, correlation: { "DFT-A/basis-1": 0.5 } },
    observables: { reactant: "A", products: ["B", "C"], selectivity: ["B", "C"], times: [{ value: 10, unit: "s" }, { value: 1, unit: "min" }] },
    ...extra,
  };
}

async function start(body: unknown) {
  const r = await call(list.action(args(post("/api/v1/ensembles", body))));
  return { ...r, json: JSON.parse(r.text) };
}
async function get(id: number) {
  const r = await call(one.loader(args(new Request(`http://localhost/api/v1/ensembles/${id}`), { id: String(id) })));
  return JSON.parse(r.text).ensemble;
}
async function waitEnded(id: number) {
  const until = Date.now() + 25_000;
  for (;;) {
    const e = await get(id);
    if (!["queued", "running"].includes(e.status)) return e;
    if (Date.now() > until) throw new Error(`ensemble ${id} stuck at ${e.status}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe("POST /api/v1/ensembles → poll → summary and CSV", () => {
  it("runs an uncertainty ensemble to the end with labels by name", async () => {
    const r = await start(spec());
    expect(r.status).toBe(202);
    const id = r.json.ensemble.id;
    const e = await waitEnded(id);
    expect(e.status).toBe("done");
    expect(e.progress).toMatchObject({ done: 40, total: 40, fraction: 1 });
    expect(e.labels.observables["conversion:A"]).toBe("Conversion of Ketone");
    expect(e.labels.observables["selectivity:B:C"]).toBe("Selectivity Alcohol/(Alcohol + Ether)");
    expect(e.labels.parameters.s1).toBe("Barrier of Reduction");
    expect(e.summary.members).toEqual({ total: 40, ok: 40, failed: 0 });
    const sens = e.summary.sensitivity.find((x: any) => x.observable === "selectivity:B:C");
    // the barrier with the larger uncertainty (3 kJ/mol against the default 1) drives the selectivity: it falls as B's barrier rises
    expect(sens.ranking[0].parameter).toBe("s1");
    expect(sens.ranking[0].rankCorrelation).toBeLessThan(-0.5);

    const m = await call(members.loader(args(new Request(`http://localhost/api/v1/ensembles/${id}/members.csv`), { id: String(id) })));
    expect(m.status).toBe(200);
    expect(m.type).toMatch(/text\/csv/);
    const lines = m.text.trim().split("\n");
    expect(lines[0]).toBe(`# Saddlebook ensemble #${id}: ${e.name}`);
    const header = lines.find((l) => !l.startsWith("#"))!;
    expect(header).toContain("Reduction barrier shift (kJ/mol)");
    expect(header).toContain("Etherification barrier shift (kJ/mol)");
    expect(header).toContain("Conversion of Ketone at 10 s (fraction)");
    expect(header).toContain("Yield of Alcohol at 1 min (fraction)");
    expect(header).not.toMatch(/\bs1\b/);
    expect(lines.filter((l) => /^\d+,ok,/.test(l))).toHaveLength(40);
    expect(m.text).toContain("# Reduction barrier shift = added to the barrier of step Reduction (id s1;");

    const s = await call(summary.loader(args(new Request(`http://localhost/api/v1/ensembles/${id}/summary.csv`), { id: String(id) })));
    expect(s.status).toBe(200);
    expect(s.text).toContain("observable,time (s),chosen time,members,mean (fraction)");
    expect(s.text).toMatch(/\nConversion of Ketone,10,yes,40,/);

    const listed = await call(list.loader(args(new Request(`http://localhost/api/v1/ensembles?mechanismId=${mid}`))));
    expect(JSON.parse(listed.text).ensembles.map((x: any) => x.id)).toContain(id);
  });

  it("cancels a running ensemble; a finished one has nothing to cancel (409)", async () => {
    const r = await start(spec({ uncertainty: { samples: 3000, sampler: "monte-carlo", seed: 1, defaultSigma: { value: 1, unit: "kJ/mol" } } }));
    const id = r.json.ensemble.id;
    const c = await call(cancel.action(args(post(`/api/v1/ensembles/${id}/cancel`), { id: String(id) })));
    expect(c.status).toBe(202);
    expect(JSON.parse(c.text).ensemble.status).toBe("cancelled");
    const again = await call(cancel.action(args(post(`/api/v1/ensembles/${id}/cancel`), { id: String(id) })));
    expect(again.status).toBe(409);
    expect(JSON.parse(again.text).error.code).toBe("not_running");
    const noSummary = await call(summary.loader(args(new Request(`http://localhost/api/v1/ensembles/${id}/summary.csv`), { id: String(id) })));
    expect(noSummary.status).toBe(409);
    expect(JSON.parse(noSummary.text).error.code).toBe("not_done");
  });
});

describe("errors in the JSON shape", () => {
  it("400 for an invalid body, naming the field", async () => {
    const r = await start({ ...spec(), uncertainty: { samples: 99999, sampler: "monte-carlo", seed: 1, defaultSigma: { value: 1, unit: "kJ/mol" } } });
    expect(r.status).toBe(400);
    expect(Object.keys(r.json.error.fields)).toContain("uncertainty.samples");
  });

  it("422 for a species the mechanism does not have", async () => {
    const r = await start(spec({ observables: { reactant: "Z", times: [{ value: 1, unit: "s" }] } }));
    expect(r.status).toBe(422);
    expect(r.json.error.fields).toHaveProperty("observables.reactant");
  });

  it("404 for a mechanism or ensemble the caller cannot see; 403 for a viewer", async () => {
    expect((await start(spec({ mechanismId: 99999 }))).status).toBe(404);
    const g = await call(one.loader(args(new Request("http://localhost/api/v1/ensembles/99999"), { id: "99999" })));
    expect(g.status).toBe(404);
    expect(JSON.parse(g.text).error.code).toBe("not_found");
    const saved = auth.role;
    Object.assign(auth, { role: "viewer" });
    try {
      const r = await start(spec());
      expect(r.status).toBe(403);
    } finally {
      Object.assign(auth, { role: saved });
    }
  });

  it("405 for a write to the read-only route", async () => {
    const r = await call(one.action(args(post("/api/v1/ensembles/1"), { id: "1" })));
    expect(r.status).toBe(405);
  });
});
