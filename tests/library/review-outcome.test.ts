// A curator's verdict on a proposed step: the proposal's author is e-mailed (approved, or sent
// back with the curator's note) with an absolute link to the step, after the review is stored;
// a mail that cannot be sent is logged and audited and the review stands. The review queue
// answers a refused review with the row's step id and keeps the note; its link and count show
// in the navigation for curators only. Without SMTP_URL the mail module keeps messages in memory.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { who } from "../support/page-user-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { memoryOutbox } from "../../app/mail/transport.server";
import type { SessionUser } from "../../app/auth/current-user.server";

vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));
vi.mock("~/auth/csrf.server", () => ({ assertCsrf: async () => {}, ensureCsrfToken: async () => ({ token: "t", setCookie: null }) }));

let t: TestDatabase;
const U: Record<string, SessionUser> = {};
const post = (url: string, fields: Record<string, string>) => {
  const body = new FormData();
  for (const [k, v] of Object.entries(fields)) body.set(k, v);
  return { request: new Request(`http://app.test${url}`, { method: "POST", body }), params: {}, context: {} } as never;
};
const apiPost = (p: string, body: unknown) => new Request(`http://app.test/api/v1${p}`, { method: "POST", body: JSON.stringify(body), headers: { "Content-Type": "application/json" } });
const unwrap = (r: unknown) => ((r as { data?: unknown }).data ?? r) as any;

async function proposedStep(label: string): Promise<number> {
  // A new step of the author's (ketene → ketene dimer half, illustrative), proposed for the library.
  const { createStep, proposeStep } = await import("../../db/access/steps.server");
  const sp = async (label: string) => (await t.db("species").where({ label }).first("id")).id as number;
  const r = await createStep(t.db, U.author, {
    label,
    reactants: [{ speciesId: await sp("ketene"), coef: 2 }],
    products: [{ speciesId: await sp("diketene"), coef: 1 }],
    reversible: false,
    barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    provenance: { source: "estimated", notes: "Test value, invented." },
  });
  await proposeStep(t.db, U.author, r.stepId, "ready");
  return r.stepId;
}

beforeAll(async () => {
  delete process.env.SMTP_URL;
  process.env.APP_URL = "https://kinetics.example.test/";
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  await seedDemo(t.db);
  for (const e of ["author", "curator", "viewer"]) {
    const u = await t.db("users").where({ email: `${e}@saddlebook.test` }).first();
    U[e] = { id: u.id, email: u.email, name: u.name, role: u.role, groupIds: await t.db("memberships").where({ user_id: u.id }).pluck("group_id"), adminGroupIds: [] };
  }
});
afterAll(async () => {
  delete process.env.APP_URL;
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

describe("review outcome mail", () => {
  it("approving through the API mails the author a link to the step at the configured address", async () => {
    const api = await import("../../app/api/library-api.server");
    const id = await proposedStep("Approval mail case (test)");
    memoryOutbox.length = 0;
    const r = await api.stepReview(t.db, U.curator, apiPost(`/steps/${id}/review`, { action: "approve" }), String(id));
    expect(r.status).toBe(200);
    expect(memoryOutbox).toHaveLength(1);
    const m = memoryOutbox[0];
    expect(m.to).toBe("author@saddlebook.test");
    expect(m.subject).toBe("Approved for the library: Approval mail case (test)");
    expect(m.text).toContain(`https://kinetics.example.test/steps/${id}\n`);
    expect(m.text).toContain(U.curator.name);
  });

  it("sending back from the review queue mails the curator's note; the step is a draft again", async () => {
    const page = await import("../../app/routes/library.review");
    const id = await proposedStep("Send-back mail case (test)");
    memoryOutbox.length = 0;
    who.user = U.curator;
    const r = unwrap(await page.action(post("/library/review", { stepId: String(id), intent: "request_changes", comment: "Give the solvent <and> the method." })));
    expect(r.ok).toBe(true);
    expect(r.message).toBe("Sent back to the author as a draft. The author has been e-mailed.");
    expect(r.stepId).toBe(id);
    expect((await t.db("steps").where({ id }).first("status")).status).toBe("draft");
    expect(memoryOutbox.map((m) => m.subject)).toEqual(["Changes requested: Send-back mail case (test)"]);
    expect(memoryOutbox[0].text).toContain("Give the solvent <and> the method.");
    expect(memoryOutbox[0].html).toContain("Give the solvent &lt;and&gt; the method.");
    expect(memoryOutbox[0].text).toContain(`https://kinetics.example.test/steps/${id}`);
  });

  it("a mail that cannot be sent leaves the review stored, is logged and written to the audit log", async () => {
    const api = await import("../../app/api/library-api.server");
    const id = await proposedStep("Mail failure case (test)");
    const env = process.env.NODE_ENV;
    process.env.NODE_ENV = "production"; // no SMTP_URL in production: sendMail refuses
    const logged = vi.spyOn(console, "error").mockImplementation(() => {});
    try {
      const r = await api.stepReview(t.db, U.curator, apiPost(`/steps/${id}/review`, { action: "approve" }), String(id));
      expect(r.status).toBe(200);
    } finally {
      process.env.NODE_ENV = env;
    }
    expect((await t.db("steps").where({ id }).first("status")).status).toBe("approved");
    expect(logged.mock.calls.some((c) => String(c[0]).includes(`review mail for step ${id}`))).toBe(true);
    logged.mockRestore();
    const a = await t.db("audit_log").where({ action: "mail.failed", object_id: String(id) }).first();
    expect(a).toBeTruthy();
  });
});

describe("review queue page", () => {
  it("a refused review answers with the row's step id and the note typed, nothing mailed", async () => {
    const page = await import("../../app/routes/library.review");
    const id = await proposedStep("Refused review case (test)");
    memoryOutbox.length = 0;
    who.user = U.curator;
    const res = await page.action(post("/library/review", { stepId: String(id), intent: "request_changes", comment: "   " }));
    const r = unwrap(res);
    expect((res as { init?: { status?: number } }).init?.status).toBe(400);
    expect(r).toMatchObject({ ok: false, stepId: id, intent: "request_changes", note: "   " });
    expect(r.fields.comment).toBe("Say what should change.");
    expect(memoryOutbox).toHaveLength(0);
    // An author may not review: refused with the row's id too.
    who.user = U.author;
    const forbidden = unwrap(await page.action(post("/library/review", { stepId: String(id), intent: "approve", comment: "mine" })));
    expect(forbidden).toMatchObject({ ok: false, stepId: id, note: "mine" });
  });

  it("the navigation carries the review queue and its count for curators, not for authors or viewers", async () => {
    const root = await import("../../app/root");
    const shellOf = async (u: SessionUser) => {
      who.user = u;
      return unwrap(await root.loader({ request: new Request("http://app.test/"), params: {}, context: {} } as never)).user;
    };
    const waiting = Number((await t.db("steps").where({ status: "proposed" }).count({ n: "*" }).first())!.n);
    expect(waiting).toBeGreaterThan(0);
    expect((await shellOf(U.curator)).reviewQueue).toBe(waiting);
    expect((await shellOf(U.author)).reviewQueue).toBeUndefined();
    expect((await shellOf(U.viewer)).reviewQueue).toBeUndefined();
  });
});
