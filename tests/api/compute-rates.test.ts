/**
 * POST /api/v1/rates, called through the route module's action with a plain Request
 * (no server). Rate constants are checked against the Eyring equation evaluated here from
 * the CODATA 2018 exact constants.
 */
import { afterEach, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { postJson } from "../support/api-call";
import { action, loader } from "../../app/routes/api.v1.rates";

// The API's authentication is replaced by the tests' stand-in: signed in as an author by
// default, signed out where a test says so.
vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
afterEach(() => {
  apiCaller.userId = 1;
});

// CODATA 2018 exact values (SI 2019 redefinition; NIST CODATA 2018 recommended values).
const K_B = 1.380649e-23; // J/K
const H = 6.62607015e-34; // J s
const N_A = 6.02214076e23; // 1/mol
const R = K_B * N_A; // J/(mol K)

const URL_ = "http://localhost/api/v1/rates";
const post = (body: unknown, raw = false) => postJson(action, URL_, body, raw);

const uni = (barrier: Record<string, unknown>, extra: Record<string, unknown> = {}) => ({
  id: "s1",
  reactants: [{ species: "A", coef: 1 }],
  products: [{ species: "B", coef: 1 }],
  reversible: false,
  barrier,
  ...extra,
});

function expectErrorShape(json: any) {
  expect(Object.keys(json)).toEqual(["error"]);
  expect(typeof json.error.code).toBe("string");
  expect(typeof json.error.message).toBe("string");
}

describe("POST /api/v1/rates", () => {
  it("k at 298.15 K for ΔG‡ = 80 kJ/mol, unimolecular, equals (k_B T/h)·exp(−ΔG‡/RT) (Eyring; CODATA 2018)", async () => {
    const T = 298.15;
    const expected = ((K_B * T) / H) * Math.exp(-80000 / (R * T));
    const { status, json } = await post({ step: uni({ form: "dG", dG: 80, unit: "kJ/mol", T, standardState: "1M" }), temperatures: { values: [T], unit: "K" } });
    expect(status).toBe(200);
    const at = json.results[0].at[0];
    expect(at.kForward.unit).toBe("s⁻¹");
    expect(at.kForward.value / expected).toBeCloseTo(1, 12);
    // k_B·T/h at 298.15 K = 6.2124e12 s⁻¹ (common practice figure)
    expect((K_B * T) / H / 6.2124e12).toBeCloseTo(1, 4);
    expect(json.results[0]).toMatchObject({ id: "s1", molecularity: 1, form: "dG" });
    // derived forms: ΔG‡ returns unchanged; without ΔH‡, ΔH‡ = ΔG‡ and Ea = ΔH‡ + RT (solution, textbook relation)
    expect(at.derived.dG.value).toBeCloseTo(80, 9);
    expect(at.derived.dG.unit).toBe("kJ/mol");
    expect(at.derived.Ea.value).toBeCloseTo(80 + (R * T) / 1000, 9);
    expect(at.derived.A.value * Math.exp(-at.derived.Ea.value * 1000 / (R * T)) / at.kForward.value).toBeCloseTo(1, 10);
    expect(at.relations.some((r: string) => r.includes("Ea = ΔH‡ + RT"))).toBe(true);
  });

  it("°C and kcal/mol inputs give the same k as K and kJ/mol (1 kcal = 4.184 kJ, definition)", async () => {
    const a = await post({ step: uni({ form: "dG", dG: 80 / 4.184, unit: "kcal/mol", T: 298.15, standardState: "1M" }), temperatures: { values: [25, 50], unit: "°C" } });
    const b = await post({ step: uni({ form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" }), temperatures: { values: [298.15, 323.15], unit: "K" } });
    expect(a.status).toBe(200);
    for (let j = 0; j < 2; j++) expect(a.json.results[0].at[j].kForward.value / b.json.results[0].at[j].kForward.value).toBeCloseTo(1, 10);
    expect(a.json.results[0].at[0].T).toEqual({ value: 298.15, unit: "K" });
  });

  it("units follow molecularity, and a reversible step with thermo gets k_reverse = k_forward/K", async () => {
    const step = {
      id: "assoc",
      reactants: [{ species: "A", coef: 1 }, { species: "B", coef: 1 }],
      products: [{ species: "C", coef: 1 }, { species: "D", coef: 1 }],
      reversible: true,
      barrier: { form: "dHdS", dH: 50, dS: -40, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M" },
      reactionThermo: { form: "dG", dG: -10, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    };
    const { status, json } = await post({ steps: [step], temperatures: { values: [298.15], unit: "K" }, units: { energy: "kcal/mol" } });
    expect(status).toBe(200);
    const at = json.results[0].at[0];
    expect(at.kForward.unit).toBe("L mol⁻¹ s⁻¹");
    expect(at.kReverse.unit).toBe("L mol⁻¹ s⁻¹");
    // Δν = 0, so K = exp(−ΔG°rxn/RT) (detailed balance)
    const K = Math.exp(10000 / (R * 298.15));
    expect(at.kReverse.value / (at.kForward.value / K)).toBeCloseTo(1, 10);
    expect(at.derived.dH.unit).toBe("kcal/mol");
    expect(at.derived.dH.value).toBeCloseTo(50 / 4.184, 9);
    expect(at.derived.dS.value).toBeCloseTo(-40, 9);
  });

  it("an irreversible step has no k_reverse", async () => {
    const { json } = await post({ step: uni({ form: "arrhenius", A: 1e13, rateUnit: { concentration: "mol/L", time: "s" }, Ea: 100, unit: "kJ/mol" }), temperatures: { values: [300], unit: "K" } });
    expect(json.results[0].at[0].kReverse).toBeUndefined();
    expect(json.results[0].at[0].kForward.value / (1e13 * Math.exp(-100000 / (R * 300)))).toBeCloseTo(1, 12);
  });
});

describe("POST /api/v1/rates: bad requests get the one error shape", () => {
  it("a caller who is not signed in gets 401 in the error shape", async () => {
    apiCaller.userId = 0;
    const { status, json } = await post({});
    expect(status).toBe(401);
    expectErrorShape(json);
    expect(json.error.code).toBe("unauthorized");
  });

  it("GET is 405 with Allow: POST", async () => {
    const res = (await loader({ request: new Request(URL_), params: {}, context: {} } as unknown as Parameters<typeof loader>[0])) as Response;
    expect(res.status).toBe(405);
    expect(res.headers.get("Allow")).toBe("POST");
    expectErrorShape(await res.json());
  });

  it("PUT to the action is 405 too", async () => {
    const res = (await action({ request: new Request(URL_, { method: "PUT", body: "{}" }), params: {}, context: {} } as unknown as Parameters<typeof action>[0])) as Response;
    expect(res.status).toBe(405);
  });

  it("malformed JSON is 400 with the line and column", async () => {
    const { status, json } = await post('{\n  "temperatures": {\n    "values": [298.15,]\n  }\n}', true);
    expect(status).toBe(400);
    expectErrorShape(json);
    expect(json.error.code).toBe("malformed_json");
    expect(json.error.message).toContain("line 3");
  });

  it("an unknown field is 400 with its path", async () => {
    const { status, json } = await post({ step: uni({ form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M", extra: 1 }), temperatures: { values: [300], unit: "K" } });
    expect(status).toBe(400);
    expectErrorShape(json);
    expect(json.error.code).toBe("invalid_body");
    expect(Object.keys(json.error.fields)).toContain("step.barrier.extra");
  });

  it("both step and steps, a missing unit or a wrong type are 400 with field paths", async () => {
    const s = uni({ form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" });
    const both = await post({ step: s, steps: [s], temperatures: { values: [300], unit: "K" } });
    expect(both.status).toBe(400);
    expect(both.json.error.fields.steps).toBeDefined();
    const noUnit = await post({ step: s, temperatures: { values: [300] } });
    expect(noUnit.json.error.fields["temperatures.unit"]).toBeDefined();
    const wrong = await post({ step: { ...s, barrier: { ...s.barrier, dG: "eighty" } }, temperatures: { values: [300], unit: "K" } });
    expect(wrong.json.error.fields["step.barrier.dG"]).toMatch(/number/);
  });

  it("engine errors are 422 with their message and path: an absurd barrier, a temperature below 0 K", async () => {
    const absurd = await post({ steps: [uni({ form: "dG", dG: 5000, unit: "kJ/mol", T: 298.15, standardState: "1M" })], temperatures: { values: [300], unit: "K" } });
    expect(absurd.status).toBe(422);
    expectErrorShape(absurd.json);
    expect(absurd.json.error.code).toBe("barrier_range");
    expect(Object.keys(absurd.json.error.fields)).toEqual(["steps[0].barrier.dG"]);
    const cold = await post({ step: uni({ form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" }), temperatures: { values: [25, -300], unit: "degC" } });
    expect(cold.status).toBe(422);
    expect(Object.keys(cold.json.error.fields)).toEqual(["temperatures.values[1]"]);
  });

  it("a body over 1 MB is 413 and the limit is stated", async () => {
    const big = JSON.stringify({ step: uni({ form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" }), temperatures: { values: [300], unit: "K" }, pad: "x".repeat(1_100_000) });
    const { status, json } = await post(big, true);
    expect(status).toBe(413);
    expectErrorShape(json);
    expect(json.error.message).toContain("1 MB");
  });

  it("an empty body is 400", async () => {
    const { status, json } = await post("", true);
    expect(status).toBe(400);
    expectErrorShape(json);
  });

  it("k that underflows is reported as 0, never NaN", async () => {
    const { status, text } = await post({ step: uni({ form: "dG", dG: 900, unit: "kJ/mol", T: 298.15, standardState: "1M" }), temperatures: { values: [100], unit: "K" } });
    expect(status).toBe(200);
    expect(text).not.toMatch(/NaN|Infinity/);
  });
});
