/**
 * POST /api/v1/simulate, called through the route module's action with a plain Request
 * (no server). A → B first order is checked against its analytic solution
 * [A] = [A]₀·exp(−kt), [B] = [A]₀ − [A] (any physical chemistry text, e.g. Atkins,
 * "integrated rate laws"), with k from the Eyring equation and CODATA 2018 constants.
 */
import { afterAll, afterEach, describe, expect, it, vi } from "vitest";
import { apiCaller } from "../support/api-auth-stand-in";
import { action, loader } from "../../app/routes/api.v1.simulate";
import { closeApiPool } from "../../app/compute/api-pool.server";

// The API's authentication is replaced by the tests' stand-in: signed in as an author by
// default, signed out where a test says so.
vi.mock("~/auth/api-auth.server", () => import("../support/api-auth-stand-in"));
afterEach(() => {
  apiCaller.userId = 1;
});
// The action simulates in a compute thread; stop the threads when the file is done.
afterAll(() => closeApiPool());

// CODATA 2018 exact values.
const K_B = 1.380649e-23; // J/K
const H = 6.62607015e-34; // J s
const R = K_B * 6.02214076e23; // J/(mol K)

type Args = Parameters<typeof action>[0];
const URL_ = "http://localhost/api/v1/simulate";

async function post(body: unknown, raw = false): Promise<{ status: number; json: any; text: string }> {
  const request = new Request(URL_, { method: "POST", headers: { "Content-Type": "application/json" }, body: raw ? (body as string) : JSON.stringify(body) });
  const res = (await action({ request, params: {}, context: {} } as unknown as Args).catch((thrown: unknown) => thrown)) as Response;
  const text = await res.text();
  return { status: res.status, json: JSON.parse(text), text };
}

function firstOrderMechanism(extraStep: Record<string, unknown> = {}) {
  return {
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: "A to B, first order (test)" },
    species: [{ id: "A" }, { id: "B" }],
    steps: [
      {
        id: "ab",
        reactants: [{ species: "A", coef: 1 }],
        products: [{ species: "B", coef: 1 }],
        reversible: false,
        barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
        ...extraStep,
      },
    ],
  };
}

const baseConditions = {
  temperature: { value: 25, unit: "°C" },
  initial: { A: { value: 100, unit: "mmol/L" } },
  endTime: { value: 1, unit: "min" },
  output: { grid: "linear", points: 61 },
};

function expectErrorShape(json: any) {
  expect(Object.keys(json)).toEqual(["error"]);
  expect(typeof json.error.code).toBe("string");
  expect(typeof json.error.message).toBe("string");
}

describe("POST /api/v1/simulate with open steps", () => {
  it("accepts a zero-order source and a sink as written: A(t) = k0/k1 + (A0 − k0/k1)·e^(−k1·t) (linear ODE, textbook solution)", async () => {
    const rateUnit = { concentration: "mol/L", time: "s" };
    const mechanism = {
      format: "saddlebook.mechanism",
      version: 1,
      about: { name: "source and sink (test)" },
      species: [{ id: "A" }],
      steps: [
        { id: "in", reactants: [], products: [{ species: "A", coef: 1 }], reversible: false, barrier: { form: "arrhenius", A: 0.003, rateUnit, Ea: 0, unit: "kJ/mol" } },
        { id: "out", reactants: [{ species: "A", coef: 1 }], products: [], reversible: false, barrier: { form: "arrhenius", A: 0.05, rateUnit, Ea: 0, unit: "kJ/mol" } },
      ],
    };
    const conditions = { temperature: { value: 25, unit: "°C" }, initial: { A: { value: 10, unit: "mmol/L" } }, endTime: { value: 60, unit: "s" }, output: { grid: "linear", points: 7 } };
    const { status, json } = await post({ mechanism, conditions, solver: { rtol: 1e-9, atol: 1e-14 } });
    expect(status).toBe(200);
    expect(json.rateConstants[0].kForward.unit).toBe("mol L⁻¹ s⁻¹");
    const t: number[] = json.times.values;
    t.forEach((ti, i) => expect(json.concentrations.species.A[i]).toBeCloseTo(0.06 + (0.01 - 0.06) * Math.exp(-0.05 * ti), 9));
    expect(json.warnings.join(" ")).toMatch(/zero-order source/);
  });
});

describe("POST /api/v1/simulate", () => {
  it("A → B matches [A]₀·exp(−kt) with k = (k_B T/h)·exp(−ΔG‡/RT)", async () => {
    const T = 298.15;
    const k = ((K_B * T) / H) * Math.exp(-80000 / (R * T));
    const { status, json, text } = await post({ mechanism: firstOrderMechanism(), conditions: baseConditions, solver: { rtol: 1e-9, atol: 1e-14 } });
    expect(status).toBe(200);
    expect(text).not.toMatch(/NaN|Infinity/);
    const t: number[] = json.times.values;
    expect(json.times.unit).toBe("s");
    expect(t.length).toBe(61);
    expect(t[60]).toBeCloseTo(60, 12);
    const A: number[] = json.concentrations.species.A;
    const B: number[] = json.concentrations.species.B;
    expect(json.concentrations.unit).toBe("mol/L");
    for (let i = 0; i < t.length; i++) {
      const exact = 0.1 * Math.exp(-k * t[i]);
      expect(Math.abs(A[i] - exact) / exact).toBeLessThan(1e-6);
      expect(Math.abs(B[i] - (0.1 - exact))).toBeLessThan(1e-9);
    }
    expect(json.temperatures.values[0]).toBeCloseTo(298.15, 12);
    expect(json.rateConstants[0].kForward.value / k).toBeCloseTo(1, 12);
    expect(json.rateConstants[0].kForward.unit).toBe("s⁻¹");
    // half-life ln 2/k and t(90 %) = ln 10/k (first-order integrated rate law), located on the dense output
    const [t50, t90] = json.analysis.species.A.timesToConversion;
    expect(t50).toMatchObject({ conversion: 0.5, located: "dense-output" });
    expect(Math.abs(t50.time / (Math.LN2 / k) - 1)).toBeLessThan(1e-6);
    expect(Math.abs(t90.time / (Math.LN10 / k) - 1)).toBeLessThan(1e-6);
    expect(json.analysis.species.A.conversion).toBeCloseTo(1 - Math.exp(-k * 60), 6);
    expect(json.analysis.massBalance.conservationMaxDrift).toBeLessThan(1e-9);
    expect(json.statistics.steps).toBeGreaterThan(0);
    expect(json.solver.method).toBe("stiff");
  });

  it("the non-stiff method agrees, and a requested wall time above the cap is capped", async () => {
    const { status, json } = await post({ mechanism: firstOrderMechanism(), conditions: baseConditions, solver: { method: "nonstiff", rtol: 1e-9, atol: 1e-14, wallTimeMs: 1e9 } });
    expect(status).toBe(200);
    const k = ((K_B * 298.15) / H) * Math.exp(-80000 / (R * 298.15));
    const A: number[] = json.concentrations.species.A;
    expect(Math.abs(A[60] / (0.1 * Math.exp(-k * 60)) - 1)).toBeLessThan(1e-6);
    expect(json.solver.wallTimeMs).toBe(json.solver.wallTimeCapMs);
  });

  it("yields and selectivity of two parallel first-order channels follow k₁/(k₁+k₂)", async () => {
    const mech = firstOrderMechanism();
    mech.species.push({ id: "C" });
    mech.steps.push({ ...mech.steps[0], id: "ac", products: [{ species: "C", coef: 1 }], barrier: { form: "dG", dG: 82, unit: "kJ/mol", T: 298.15, standardState: "1M" } });
    const { status, json } = await post({
      mechanism: mech,
      conditions: { ...baseConditions, endTime: { value: 10, unit: "min" } },
      analysis: { conversions: [0.25], yields: { reactant: "A", products: ["B", "C"] } },
      solver: { rtol: 1e-9, atol: 1e-14 },
    });
    expect(status).toBe(200);
    // parallel first-order reactions: [B]/[C] = k₁/k₂ = exp(2000/RT) at all times (analytic)
    const ratio = Math.exp(2000 / (R * 298.15));
    expect(json.analysis.yields.selectivity.B / (ratio / (1 + ratio))).toBeCloseTo(1, 6);
    expect(json.analysis.species.A.timesToConversion).toHaveLength(1);
  });

  it("a reversible A ⇌ B relaxes to K = exp(−ΔG°/RT) (detailed balance)", async () => {
    const mech = firstOrderMechanism({ reversible: true, reactionThermo: { form: "dG", dG: -2, unit: "kJ/mol", T: 298.15, standardState: "1M" } });
    const { status, json } = await post({ mechanism: mech, conditions: { ...baseConditions, endTime: { value: 10, unit: "min" } } });
    expect(status).toBe(200);
    const A: number[] = json.concentrations.species.A;
    const B: number[] = json.concentrations.species.B;
    const K = Math.exp(2000 / (R * 298.15));
    expect(B[B.length - 1] / A[A.length - 1] / K).toBeCloseTo(1, 4);
  });

  it("a temperature program (holds) is accepted", async () => {
    const { status, json } = await post({
      mechanism: firstOrderMechanism(),
      conditions: {
        program: { kind: "holds", holds: [{ from: { value: 0, unit: "s" }, temperature: { value: 298.15, unit: "K" } }, { from: { value: 30, unit: "s" }, temperature: { value: 35, unit: "degC" } }] },
        initial: { A: { value: 0.1, unit: "mol/L" } },
        endTime: { value: 60, unit: "s" },
        output: { grid: "linear", points: 7 },
      },
    });
    expect(status).toBe(200);
    expect(json.temperatures.values.at(-1)).toBeCloseTo(308.15, 10);
  });
});

describe("POST /api/v1/simulate: bad requests get the one error shape", () => {
  it("a caller who is not signed in gets 401 in the error shape", async () => {
    apiCaller.userId = 0;
    const { status, json } = await post({});
    expect(status).toBe(401);
    expectErrorShape(json);
    expect(json.error.code).toBe("unauthorized");
  });

  it("GET is 405", async () => {
    const res = (await loader({ request: new Request(URL_), params: {}, context: {} } as unknown as Parameters<typeof loader>[0])) as Response;
    expect(res.status).toBe(405);
    expectErrorShape(await res.json());
  });

  it("an unknown field inside the mechanism is 400 with its path", async () => {
    const mech = firstOrderMechanism({ colour: "red" });
    const { status, json } = await post({ mechanism: mech, conditions: baseConditions });
    expect(status).toBe(400);
    expectErrorShape(json);
    expect(Object.keys(json.error.fields)).toContain("mechanism.steps[0].colour");
    expect(json.error.fields["mechanism.steps[0].colour"]).toMatch(/line \d+/);
  });

  it("both temperature and program, or neither, is 400", async () => {
    const { temperature: _t, ...noT } = baseConditions;
    const { status, json } = await post({ mechanism: firstOrderMechanism(), conditions: noT });
    expect(status).toBe(400);
    expect(json.error.fields["conditions.temperature"]).toBeDefined();
  });

  it("an unknown species in the initial concentrations is 422 with its path", async () => {
    const { status, json } = await post({ mechanism: firstOrderMechanism(), conditions: { ...baseConditions, initial: { Z: { value: 1, unit: "mol/L" } } } });
    expect(status).toBe(422);
    expectErrorShape(json);
    expect(Object.keys(json.error.fields)).toEqual(["conditions.initial.Z"]);
  });

  it("a step naming an unlisted species, or a reversible step without thermo, is 422", async () => {
    const mech = firstOrderMechanism({ products: [{ species: "Q", coef: 1 }] });
    const a = await post({ mechanism: mech, conditions: baseConditions });
    expect(a.status).toBe(422);
    expect(a.json.error.code).toBe("invalid_mechanism");
    expect(Object.keys(a.json.error.fields)).toEqual(["mechanism.steps[0].products[0].species"]);
    const b = await post({ mechanism: firstOrderMechanism({ reversible: true }), conditions: baseConditions });
    expect(b.status).toBe(422);
    expect(Object.keys(b.json.error.fields)).toEqual(["mechanism.steps[0].reactionThermo"]);
  });

  it("an absurd barrier is 422 with the engine's message and the request path", async () => {
    const mech = firstOrderMechanism({ barrier: { form: "dG", dG: 4000, unit: "kJ/mol", T: 298.15, standardState: "1M" } });
    const { status, json } = await post({ mechanism: mech, conditions: baseConditions });
    expect(status).toBe(422);
    expect(json.error.code).toBe("barrier_range");
    expect(Object.keys(json.error.fields)).toEqual(["mechanism.steps[0].barrier.dG"]);
  });

  it("a step budget that runs out is 422, not a hang", async () => {
    const { status, json } = await post({ mechanism: firstOrderMechanism(), conditions: { ...baseConditions, endTime: { value: 100, unit: "d" } }, solver: { maxSteps: 2 } });
    expect(status).toBe(422);
    expectErrorShape(json);
    expect(json.error.code).toBe("budget_steps");
  });

  it("malformed JSON is 400 with line and column; a zero end time is 400", async () => {
    const bad = await post('{"mechanism": {', true);
    expect(bad.status).toBe(400);
    expect(bad.json.error.code).toBe("malformed_json");
    const zero = await post({ mechanism: firstOrderMechanism(), conditions: { ...baseConditions, endTime: { value: 0, unit: "s" } } });
    expect(zero.status).toBe(400);
    expect(zero.json.error.fields["conditions.endTime.value"]).toBeDefined();
  });
});
