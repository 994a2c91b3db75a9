// The workbench opens for a mechanism with no steps (an empty state, not a 422), and the demo
// mechanism's seeded condition preset is in the format the workbench's conditions form reads.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { who } from "../support/page-user-stand-in";
import { demoAuthorDatabase, dropDemoDatabase } from "../support/demo-author";
import type { TestDatabase } from "../support/db";
import type { SessionUser } from "../../app/auth/current-user.server";
import { defaultDraft, buildRequest } from "../../app/components/workbench/ConditionsForm";

vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));

let t: TestDatabase;
let author: SessionUser;
const args = (url: string, params: Record<string, string>) => ({ request: new Request(`http://app.test${url}`), params, context: {} }) as never;

beforeAll(async () => {
  ({ t, author } = await demoAuthorDatabase());
  who.user = author;
});
afterAll(async () => {
  await dropDemoDatabase(t);
});

describe("workbench opening", () => {
  it("opens a mechanism with no steps on an empty state with its species, editable by the owner", async () => {
    const { createMechanism } = await import("../../db/access/mechanisms.server");
    const water = await t.db("species").where({ label: "water" }).first("id");
    const m = await createMechanism(t.db, author, { name: "Empty start (test)", visibility: "private", species: [{ speciesId: water.id }], steps: [] });
    const page = await import("../../app/routes/mechanisms.$id.workbench");
    const d = (await page.loader(args(`/mechanisms/${m.id}/workbench`, { id: String(m.id) }))) as any;
    expect(d.doc.steps).toEqual([]);
    expect(d.doc.species.map((s: any) => s.label)).toEqual(["water"]);
    expect(d.editable).toBe(true);
    expect(d.name).toBe("Empty start (test)");
  });

  it("reads the seeded preset of the demo catalytic mechanism into the conditions form", async () => {
    const page = await import("../../app/routes/mechanisms.$id.workbench");
    const m = await t.db("mechanisms").where("name", "like", "Illustrative acetylation cycle%").first("id");
    const d = (await page.loader(args(`/mechanisms/${m.id}/workbench`, { id: String(m.id) }))) as any;
    expect(d.presets.map((p: any) => p.name)).toEqual(["bench, 25 °C"]);
    // As the page does: the preset's draft over the default draft, then the request it builds.
    const draft = { ...defaultDraft(d.doc.species.map((s: any) => s.id)), ...d.presets[0].draft };
    const built = buildRequest(draft);
    expect(built.ok).toBe(true);
    const labelOf = Object.fromEntries(d.doc.species.map((s: any) => [s.id, s.label]));
    const initial = Object.fromEntries(Object.entries((built as any).conditions.initial).map(([k, v]: [string, any]) => [labelOf[k], v.value]));
    expect(initial).toMatchObject({ "acetic anhydride": 1.2, "benzyl alcohol": 1, water: 0.01 });
    expect(Object.keys(d.presets[0].draft.initial).every((k) => k in labelOf)).toBe(true);
  });
});
