// Sane limits on what is stored (real MariaDB for the API and workbench parts): formula size,
// counts and charge; temperatures of datasets, runs and exchange-format documents; workbench
// layouts and condition presets. Each beyond its limit is a 4xx with a sentence, stores nothing,
// and never reaches the database as an absurd number (which used to end in a server error).
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { who } from "../support/page-user-stand-in";
import type { TestDatabase } from "../support/db";
import { demoAuthorDatabase, dropDemoDatabase } from "../support/demo-author";
import type { Actor } from "../../app/auth/policy.server";
import * as api from "../../app/api/library-api.server";
import { handleCreateDataset } from "../../app/compute/dataset-api.server";
import { ConditionsSchema } from "../../app/compute/run-request";
import { parseFormula, FORMULA_MAX_LENGTH } from "../../solver/formula";
import { validateMechanismDocument } from "../../solver/exchange-format";

vi.mock("~/auth/current-user.server", () => import("../support/page-user-stand-in"));
vi.mock("~/auth/csrf.server", () => ({ assertCsrf: async () => {}, csrfToken: async () => "" }));

let t: TestDatabase;
let author: Actor;
let mechId = 0;

beforeAll(async () => {
  const d = await demoAuthorDatabase();
  [t, author, mechId] = [d.t, d.author, d.mechId];
  who.user = d.author;
});
afterAll(() => dropDemoDatabase(t));

const json = (body: unknown) => new Request("http://app.test/api/v1/x", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
const count = async (table: string) => Number((await t.db(table).count({ n: "*" }).first())!.n);

describe("formulas", () => {
  it("keep counts, atoms per element and charge within bounds, with a sentence for each", () => {
    expect(parseFormula("C99999H2").ok).toBe(true);
    expect(parseFormula("[Fe(CN)6]^20-").ok).toBe(true);
    const refusals: Array<[string, RegExp]> = [
      ["C100001", /count must be at most 100000/],
      ["C99999999999999999999999", /count must be at most/],
      ["100001H2O", /multiplier must be at most/],
      ["((C1000)1000)1000", /at most 1000000 of one element/],
      ["((((C99999)99999)99999)99999)99999", /far more than C atoms/],
      ["H+21", /beyond ±20/],
      ["SO4^99999999999999999999-", /beyond ±20/],
      ["C" + "H".repeat(FORMULA_MAX_LENGTH), /longer than 200 characters/],
    ];
    for (const [f, message] of refusals) {
      const r = parseFormula(f);
      expect(r.ok, f).toBe(false);
      if (!r.ok) expect(r.error.message, f).toMatch(message);
    }
  });

  it("a species whose formula implies an absurd charge is refused with 400 and stores nothing", async () => {
    const before = await count("species");
    for (const formula of ["H+99999999999", "Cl^999-", "C123456789"]) {
      const r = await api.speciesCreate(t.db, author, json({ label: `odd ${formula}`, formula }));
      expect(r.status, formula).toBe(400);
      expect(((await r.json()) as any).error.fields.formula).toBeTruthy();
    }
    expect(await count("species")).toBe(before);
  });

  it("an imported document's species meet the same checks (formula length and syntax), nothing stored", async () => {
    const doc = (formula: string) => ({
      format: "saddlebook.mechanism",
      version: 1,
      about: { name: "limits (illustrative)" },
      species: [{ id: "A", formula }, { id: "B" }],
      steps: [{ id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" } }],
    });
    const before = [await count("species"), await count("mechanisms")];
    for (const formula of ["C".repeat(300), "C2H4+999", "Xx2"]) {
      const r = await api.mechanismImport(t.db, author, json(doc(formula)));
      expect(r.status, formula.slice(0, 20)).toBe(400);
    }
    expect([await count("species"), await count("mechanisms")]).toEqual(before);
  });
});

describe("temperatures", () => {
  it("an exchange-format document with a temperature beyond 10 000 K is invalid", () => {
    const r = validateMechanismDocument({
      format: "saddlebook.mechanism",
      version: 1,
      about: { name: "hot (illustrative)" },
      species: [{ id: "A" }, { id: "B" }],
      steps: [{ id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 1e300, standardState: "1M" } }],
    });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.issues.map((i) => `${i.path}: ${i.message}`)).toContainEqual(expect.stringMatching(/barrier\.T: at most 10000 K/));
  });

  it("a dataset at an absurd temperature is refused with 422 and not stored", async () => {
    const before = await count("datasets");
    for (const temperature of [{ value: 1e300, unit: "K" }, { value: 20_000, unit: "degC" }]) {
      const r = await handleCreateDataset(t.db, author, json({ name: "hot", temperature, timeUnit: "s", concentrationUnit: "mol/L", csv: "t,A\n0,1\n1,0.5\n", mapping: { time: "t", species: { A: "A" } } }));
      expect(r.status).toBe(422);
      expect(((await r.json()) as any).error.message).toMatch(/at most 10000 K/);
    }
    expect(await count("datasets")).toBe(before);
  });

  it("run conditions beyond 10 000 K are refused by the request schema", () => {
    const base = { initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 1, unit: "s" } };
    expect(ConditionsSchema.safeParse({ ...base, temperature: { value: 9000, unit: "K" } }).success).toBe(true);
    const hot = ConditionsSchema.safeParse({ ...base, temperature: { value: 1e12, unit: "K" } });
    expect(hot.success).toBe(false);
    if (!hot.success) expect(hot.error.issues[0]!.message).toMatch(/at most 10000 K/);
  });
});

describe("workbench layouts and presets", () => {
  async function workbench(fields: Record<string, string>) {
    const wb = await import("../../app/routes/mechanisms.$id.workbench");
    const request = new Request(`http://app.test/mechanisms/${mechId}/workbench`, { method: "POST", headers: { "Content-Type": "application/x-www-form-urlencoded" }, body: new URLSearchParams(fields).toString() });
    const r = (await wb.action({ request, params: { id: String(mechId) }, context: {} } as never)) as any;
    return r && r.type === "DataWithResponseInit" ? { status: r.init.status, body: r.data } : { status: 200, body: r };
  }

  it("the workbench refuses positions out of range, too many nodes and oversized presets, and keeps what was stored", async () => {
    const stored = await t.db("mechanisms").where({ id: mechId }).first("layout", "condition_presets");
    const many = Object.fromEntries(Array.from({ length: 25_001 }, (_, i) => [`s:${i}`, { x: i, y: 0 }]));
    for (const positions of [{ "s:A": { x: 1e300, y: 0 } }, { "s:A": { x: 0, y: -2e7 } }, many]) {
      const r = await workbench({ intent: "layout", positions: JSON.stringify(positions) });
      expect(r.status).toBe(400);
      expect(r.body.error).toMatch(/layout could not be read/);
    }
    const big = await workbench({ intent: "preset", name: "huge", draft: JSON.stringify({ notes: "x".repeat(30_000) }) });
    expect(big.status).toBe(400);
    expect(big.body.error).toMatch(/20000 characters/);
    expect(await t.db("mechanisms").where({ id: mechId }).first("layout", "condition_presets")).toEqual(stored);
    expect((await workbench({ intent: "layout", positions: JSON.stringify({ "s:A": { x: 10, y: 20 } }) })).status).toBe(200);
  });

  it("the mechanism API refuses an oversized layout or preset list with 400", async () => {
    const base = { name: "layout limits (illustrative)", visibility: "private", steps: [] };
    const before = await count("mechanisms");
    for (const extra of [
      { layout: { workbench: { positions: { "s:A": { x: Number.MAX_VALUE, y: 0 } } } } },
      { layout: { elsewhere: { blob: "x".repeat(30_000) } } },
      { layout: Object.fromEntries(Array.from({ length: 21 }, (_, i) => [`k${i}`, {}])) },
      { conditionPresets: [{ name: "p", draft: { blob: "x".repeat(30_000) } }] },
    ]) {
      const r = await api.mechanismCreate(t.db, author, json({ ...base, ...extra }));
      expect(r.status, JSON.stringify(extra).slice(0, 80)).toBe(400);
    }
    expect(await count("mechanisms")).toBe(before);
    const ok = await api.mechanismCreate(t.db, author, json({ ...base, layout: { workbench: { positions: { "s:A": { x: 1, y: 2 } } } }, conditionPresets: [{ name: "bench", T: 298.15 }] }));
    expect(ok.status).toBe(201);
  });
});
