// E-mails of the library: curators hear of a proposed step, an owner hears of a fork.
// Without SMTP_URL the mail module keeps messages in memory (app/mail/transport.server.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { memoryOutbox } from "../../app/mail/transport.server";
import * as api from "../../app/api/library-api.server";
import type { Actor } from "../../app/auth/policy.server";

let t: TestDatabase;
const A: Record<string, Actor> = {};
const post = (p: string, body: unknown) => new Request(`http://app.test/api/v1${p}`, { method: "POST", body: JSON.stringify(body), headers: { "Content-Type": "application/json" } });

beforeAll(async () => {
  delete process.env.SMTP_URL;
  t = await freshDatabase();
  await seedDemo(t.db);
  for (const e of ["author", "author2", "curator"]) {
    const u = await t.db("users").where({ email: `${e}@saddlebook.test` }).first("id", "role");
    A[e] = { id: u.id, role: u.role, groupIds: await t.db("memberships").where({ user_id: u.id }).pluck("group_id") };
  }
});
afterAll(async () => {
  await t?.drop();
});

describe("library mail", () => {
  it("e-mails the curators when a step is proposed, with the label escaped in HTML", async () => {
    const draft = await t.db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").where("v.label", "like", "Acyl transfer to allyl%").first("s.id");
    memoryOutbox.length = 0;
    const r = await api.stepPropose(t.db, A.author, post(`/steps/${draft.id}/propose`, { comment: "ready" }), String(draft.id));
    expect(r.status).toBe(200);
    const mails = memoryOutbox.filter((m) => m.subject.startsWith("Step proposed"));
    expect(mails.map((m) => m.to)).toEqual(["curator@saddlebook.test"]);
    expect(mails[0].text).toContain("/library/review");
  });

  it("e-mails the owner when someone forks their mechanism", async () => {
    const m = await t.db("mechanisms").where("name", "like", "%alcohol series%").first("id");
    memoryOutbox.length = 0;
    const r = await api.mechanismFork(t.db, A.author2, post(`/mechanisms/${m.id}/fork`, { name: "a <b>fork</b>" }), String(m.id));
    expect(r.status).toBe(201);
    expect(memoryOutbox).toHaveLength(1);
    expect(memoryOutbox[0].to).toBe("author@saddlebook.test");
    expect(memoryOutbox[0].html).toContain("a &lt;b&gt;fork&lt;/b&gt;");
  });
});
