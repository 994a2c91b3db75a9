/**
 * Datasets through the REST API on a real database: upload with a column mapping, bad rows
 * refused with their line numbers and nothing stored, read back in s and mol/L.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { freshDatabase, type TestDatabase } from "../support/db";
import { applyMapping, guessMapping, guessTimeUnit, parseCsv } from "../../app/components/workbench/dataset-csv";

vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
const auth = apiCaller;

let t: TestDatabase;
let list: typeof import("../../app/routes/api.v1.datasets");
let one: typeof import("../../app/routes/api.v1.datasets.$id");

beforeAll(async () => {
  t = await freshDatabase();
  process.env.DATABASE_URL = t.url;
  [auth.userId] = await t.db("users").insert({ email: "data@example.test", name: "Data tester", role: "author" });
  Object.assign(auth, { email: "data@example.test", name: "Data tester" });
  list = await import("../../app/routes/api.v1.datasets");
  one = await import("../../app/routes/api.v1.datasets.$id");
});
afterAll(async () => {
  const { getDb } = await import("../../db/client.server");
  await getDb().destroy();
  await t?.drop();
});

const args = (request: Request, params: Record<string, string> = {}) => ({ request, params, context: {} }) as never;
const CSV = "# HPLC export\nt / min;A (mM);B (mM)\n0;100;0\n1;60.7;39.3\n2;36.8;63.2\n\n3;22.3;\n";

async function post(body: unknown) {
  const res = (await list.action(args(new Request("http://localhost/api/v1/datasets", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) })))) as Response;
  return { status: res.status, json: (await res.json()) as any };
}

describe("CSV parsing and mapping", () => {
  it("reads the header after comments, the separator, the time unit and empty cells", () => {
    const p = parseCsv(CSV);
    expect(p.ok).toBe(true);
    if (!p.ok) return;
    expect(p.value.header).toEqual(["t / min", "A (mM)", "B (mM)"]);
    expect(p.value.rows.map((r) => r.line)).toEqual([3, 4, 5, 7]);
    const m = guessMapping(p.value.header);
    expect(m).toEqual({ time: "t / min", species: { "A (mM)": "A", "B (mM)": "B" } });
    expect(guessTimeUnit(m.time)).toBe("min");
    const d = applyMapping(p.value, m);
    expect(d.ok && d.value.series.B).toEqual([0, 39.3, 63.2, null]);
  });

  it("names every bad line: text in a number column, negative values, times out of order", () => {
    const p = parseCsv("time,A\n0,1\n1,abc\n2,-0.1\n3,0.3\n2.5,0.2");
    if (!p.ok) throw new Error(p.message);
    const d = applyMapping(p.value, { time: "time", species: { A: "A" } });
    expect(d.ok).toBe(false);
    if (!d.ok) expect(d.errors.map((e) => e.line)).toEqual([3, 4, 6]);
  });
});

describe("/api/v1/datasets", () => {
  it("stores a dataset and returns it in s and mol/L", async () => {
    const r = await post({ name: "HPLC run 7", temperature: { value: 40, unit: "degC" }, timeUnit: "min", concentrationUnit: "mmol/L", csv: CSV, mapping: { time: "t / min", species: { "A (mM)": "A", "B (mM)": "B" } } });
    expect(r.status).toBe(201);
    expect(r.json.dataset.temperature.value).toBeCloseTo(313.15, 10);
    const g = (await one.loader(args(new Request(`http://localhost/api/v1/datasets/${r.json.dataset.id}`), { id: String(r.json.dataset.id) }))) as Response;
    const d = ((await g.json()) as any).dataset;
    const A = d.si.series.find((s: any) => s.species === "A");
    expect(A.times).toEqual([0, 60, 120, 180]);
    expect(A.values[1]).toBeCloseTo(0.0607, 12);
    const B = d.si.series.find((s: any) => s.species === "B");
    expect(B.times).toEqual([0, 60, 120]); // the empty cell is left out
  });

  it("refuses a file with a bad row, names the line and stores nothing", async () => {
    const before = Number((await t.db("datasets").count({ n: "*" }).first())!.n);
    const r = await post({ name: "bad", temperature: { value: 300, unit: "K" }, timeUnit: "s", concentrationUnit: "mol/L", csv: "t,A\n0,1\n10,0.5\n20,x\n", mapping: { time: "t", species: { A: "A" } } });
    expect(r.status).toBe(422);
    expect(r.json.error.fields["line 4"]).toMatch(/"x" in column "A" is not a number/);
    expect(Number((await t.db("datasets").count({ n: "*" }).first())!.n)).toBe(before);
  });

  it("links a dataset only to a mechanism the caller may read: someone else's private one and a missing one are 404", async () => {
    const { createMechanism } = await import("../../db/access/mechanisms.server");
    const [otherId] = await t.db("users").insert({ email: "other-data@example.test", name: "Other author", role: "author" });
    const other = { id: Number(otherId), role: "author" as const, groupIds: [], adminGroupIds: [] };
    const hidden = await createMechanism(t.db, other, { name: "Private to the other author", visibility: "private", steps: [] });
    const shared = await createMechanism(t.db, other, { name: "Public mechanism", visibility: "public", steps: [] });
    const body = { name: "linked", temperature: { value: 300, unit: "K" }, timeUnit: "s", concentrationUnit: "mol/L", csv: "t,A\n0,1\n10,0.5\n", mapping: { time: "t", species: { A: "A" } } };
    const before = Number((await t.db("datasets").count({ n: "*" }).first())!.n);
    for (const mechanismId of [hidden.id, 999_999]) {
      const r = await post({ ...body, mechanismId });
      expect(r.status).toBe(404);
      expect(r.json.error.code).toBe("not_found");
      expect(r.json.error.fields.mechanismId).toMatch(/no mechanism/);
    }
    expect(Number((await t.db("datasets").count({ n: "*" }).first())!.n)).toBe(before);
    const ok = await post({ ...body, mechanismId: shared.id });
    expect(ok.status).toBe(201);
    expect(ok.json.dataset.mechanismId).toBe(shared.id);
  });
});
