// The illustrative demo seed: lands whole, balances, and shows the journeys' starting points.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { freshDatabase, type TestDatabase } from "../support/db";
import { seedDemo } from "../../db/seeds/index";
import { getMechanism, listMechanisms } from "../../db/access/mechanisms.server";
import { getSpeciesMany } from "../../db/access/species.server";
import { speciesIdOfKey } from "../../app/components/library/step-schema";
import { balanceOf } from "../../app/components/library/balance";
import type { DocumentStep } from "../../solver/exchange-format";

let t: TestDatabase;
beforeAll(async () => {
  t = await freshDatabase();
  await seedDemo(t.db);
});
afterAll(async () => {
  await t?.drop();
});

describe("demo library seed (illustrative)", () => {
  it("holds about 40 library steps, all marked illustrative, with barriers of 50–110 kJ/mol", async () => {
    const steps = await t.db("steps").count({ n: "*" }).first();
    expect(Number(steps!.n)).toBeGreaterThanOrEqual(38);
    const heads = await t.db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").select("v.illustrative", "v.dg298", "v.content", "s.status");
    for (const h of heads) {
      expect(!!h.illustrative).toBe(true);
      expect(h.dg298 / 1000).toBeGreaterThan(45);
      expect(h.dg298 / 1000).toBeLessThan(115);
    }
    const statuses = new Set(heads.map((h: { status: string }) => h.status));
    expect([...statuses].sort()).toEqual(["approved", "deprecated", "draft", "proposed"]);
  });

  it("balances elements and charge in every library step", async () => {
    const rows = await t.db("steps as s").join("step_versions as v", "v.id", "s.current_version_id").select("v.content", "v.label");
    for (const r of rows) {
      const c: DocumentStep = typeof r.content === "string" ? JSON.parse(r.content) : r.content;
      const ids = [...c.reactants, ...c.products].map((x) => speciesIdOfKey(x.species)!);
      const sp = await getSpeciesMany(t.db, ids);
      const side = (ts: DocumentStep["reactants"]) => ts.map((x) => ({ species: sp.get(speciesIdOfKey(x.species)!)!, coef: x.coef }));
      expect(balanceOf(side(c.reactants), side(c.products)).state, r.label).toBe("balanced");
    }
  });

  it("has 3 mechanisms and 2 forks by different demo users, one with a pinned-update offer", async () => {
    const admin = await t.db("users").where({ email: "admin@saddlebook.test" }).first("id");
    const all = await listMechanisms(t.db, { id: admin.id, role: "admin", groupIds: [] }, { limit: 50 });
    expect(all.items).toHaveLength(5);
    const forks = all.items.filter((m) => m.forked_from_mechanism_id);
    expect(forks).toHaveLength(2);
    expect(new Set(forks.map((f) => f.owner_id)).size).toBe(2);
    const cycle = all.items.find((m) => m.name.startsWith("Illustrative acetylation cycle"))!;
    const d = await getMechanism(t.db, { id: admin.id, role: "admin", groupIds: [] }, cycle.id);
    expect(Object.keys(d.updates)).toHaveLength(1);
    expect(d.forks).toHaveLength(1);
  });
});
