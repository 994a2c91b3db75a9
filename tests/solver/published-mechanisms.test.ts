/**
 * Published stiff test problems entered as mechanisms, exactly as their reactions are written,
 * and run through the path users take: an exchange-format document → validateMechanismDocument
 * → documentToEngine → buildMechanism (solver/model.ts) → simulate(). No dummy species stand in
 * for the zero-order source, the sinks or the fractional coefficients.
 *
 * Each rate constant is entered as an Arrhenius barrier with Ea = 0 (A = the published
 * constant), so k does not depend on the temperature; the problems are dimensionless as
 * published and are read here as mol/L and s.
 */
import { describe, expect, it } from "vitest";
import { documentToEngine, validateMechanismDocument, type MechanismDocument } from "../../solver/exchange-format.ts";
import { buildMechanism } from "../../solver/step-rates.ts";
import { simulate } from "../../solver/simulate.ts";
import { integrateStiff } from "../../solver/rosenbrock.ts";
import { HIRES_REF, HIRES_T_END, HIRES_Y0, hires, relErr } from "./reference-problems.ts";

type Term = [species: string, coef: number];

/** A document step with a temperature-independent k (Arrhenius, Ea = 0) in mol/L and s units. */
function step(id: string, k: number, reactants: Term[], products: Term[]) {
  return {
    id,
    reactants: reactants.map(([species, coef]) => ({ species, coef })),
    products: products.map(([species, coef]) => ({ species, coef })),
    reversible: false,
    barrier: { form: "arrhenius" as const, A: k, rateUnit: { concentration: "mol/L" as const, time: "s" as const }, Ea: 0, unit: "kJ/mol" as const },
  };
}

function document(name: string, species: string[], steps: ReturnType<typeof step>[]): unknown {
  return { format: "saddlebook.mechanism", version: 1, about: { name }, species: species.map((id) => ({ id })), steps };
}

/** Document → engine → compiled mechanism; fails the test with the first message otherwise. */
function compile(docValue: unknown) {
  const doc = validateMechanismDocument(docValue);
  if (!doc.ok) throw new Error(doc.error.message);
  const eng = documentToEngine(doc.value as MechanismDocument);
  if (!eng.ok) throw new Error(eng.error.message);
  const mech = buildMechanism(eng.value.species, eng.value.steps);
  if (!mech.ok) throw new Error(mech.error.message);
  return mech.value;
}

/**
 * HIRES (Schäfer 1975, "High Irradiance RESponse" of photomorphogenesis; Hairer & Wanner,
 * Solving ODEs II, §IV.10; Bari/CWI Test Set for IVP Solvers, Mazzia & Magherini, problem HIRES):
 * 8 species, the published right-hand side written as its reactions. The constant 0.0007 in
 * dy1/dt is a zero-order source; y7 (the Pfr·X complex) decays at 1.81 in total, releasing X (y8)
 * each time and its Pfr part to y5 (0.43), to y6 (0.69) or out of the system (0.69, a sink of
 * that part): 0.43 + 0.69 + 0.69 = 1.81.
 */
const HIRES_STEPS = [
  step("y1 to y2", 1.71, [["y1", 1]], [["y2", 1]]),
  step("source of y1", 0.0007, [], [["y1", 1]]),
  step("y2 to y1", 0.43, [["y2", 1]], [["y1", 1]]),
  step("y2 to y4", 8.32, [["y2", 1]], [["y4", 1]]),
  step("y3 to y1", 8.32, [["y3", 1]], [["y1", 1]]),
  step("y3 to y4", 1.71, [["y3", 1]], [["y4", 1]]),
  step("y4 to y3", 0.43, [["y4", 1]], [["y3", 1]]),
  step("y4 to y6", 0.69, [["y4", 1]], [["y6", 1]]),
  step("y5 to y3", 0.035, [["y5", 1]], [["y3", 1]]),
  step("y5 to y6", 1.71, [["y5", 1]], [["y6", 1]]),
  step("y6 to y5", 0.43, [["y6", 1]], [["y5", 1]]),
  step("y6 + y8 to y7", 280, [["y6", 1], ["y8", 1]], [["y7", 1]]),
  step("y7 to y5 + y8", 0.43, [["y7", 1]], [["y5", 1], ["y8", 1]]),
  step("y7 to y6 + y8", 0.69, [["y7", 1]], [["y6", 1], ["y8", 1]]),
  step("y7 to y8 (sink of the rest)", 0.69, [["y7", 1]], [["y8", 1]]),
];
const HIRES_SPECIES = ["y1", "y2", "y3", "y4", "y5", "y6", "y7", "y8"];

/**
 * Oregonator (Field & Noyes 1974, the scaled form of Hairer & Wanner, Solving ODEs II, §IV.1,
 * problem OREGO; Bari/CWI test set, Mazzia & Magherini, "OREGO"):
 *   y1' = s(y2 − y1·y2 + y1 − q·y1²),  y2' = (−y2 − y1·y2 + y3)/s,  y3' = w(y1 − y3),
 *   s = 77.27, q = 8.375e-6, w = 0.161, y(0) = (1, 2, 3), t_end = 360.
 * Written as the five Field–Noyes steps with X = y1, Y = y2, Z = y3; the scaling of the three
 * variables makes the published stoichiometry fractional (pool species A, B and the product P
 * are folded into the constants, as published):
 *   Y → s X + (1 − 1/s) Y              k = 1        (A + Y → X + P; Y on both sides)
 *   X + Y → (1 − 1/s²) Y               k = s        (X + Y → 2P)
 *   X → 2 X + (w/s) Z                  k = s        (A + X → 2X + 2Z; autocatalytic)
 *   2 X → ∅                            k = s·q/2    (2X → A + P; a sink)
 *   Z → (1/(s·w)) Y                    k = w        (B + Z → f Y with the fractional f)
 * Each rate is k·Π[reactant]^coef (orders = reactant coefficients); the net stoichiometry times
 * these rates gives the published right-hand side term by term.
 */
const S = 77.27;
const Q = 8.375e-6;
const W = 0.161;
const OREGO_STEPS = [
  step("A + Y → X + P", 1, [["Y", 1]], [["X", S], ["Y", 1 - 1 / S]]),
  step("X + Y → 2P", S, [["X", 1], ["Y", 1]], [["Y", 1 - 1 / (S * S)]]),
  step("A + X → 2X + 2Z", S, [["X", 1]], [["X", 2], ["Z", W / S]]),
  step("2X → A + P", (S * Q) / 2, [["X", 2]], []),
  step("B + Z → f Y", W, [["Z", 1]], [["Y", 1 / (S * W)]]),
];

/**
 * OREGO reference at t = 360: Bari/CWI test set (Mazzia & Magherini), problem OREGO, recalled
 * from memory: y = (0.1000814870318523e1, 0.1228178521549917e4, 0.1320554942846706e3). The
 * recalled values are checked below against an integration of the published right-hand side
 * itself (written as an ODE, not as steps) with RODAS4 at rtol 1e-12.
 */
const OREGO_REF = [0.1000814870318523e1, 0.1228178521549917e4, 0.1320554942846706e3];

function finalState(r: { conc: Float64Array[] }): number[] {
  return r.conc.map((c) => c[c.length - 1]);
}

describe("HIRES entered as its published reactions", () => {
  const mech = compile(document("HIRES", HIRES_SPECIES, HIRES_STEPS));

  it("reproduces the published right-hand side term by term (Hairer & Wanner II §IV.10)", () => {
    const { model, rateConstants } = mech;
    const kf = Float64Array.from(rateConstants.map((f) => f.kf(298.15)));
    const kr = new Float64Array(kf.length);
    const y = Float64Array.of(0.3, 0.2, 0.1, 0.4, 0.5, 0.6, 0.7, 0.8);
    const ours = new Float64Array(8);
    model.rhs(y, kf, kr, ours);
    const published = new Float64Array(8);
    hires().rhs(0, y, published);
    for (let i = 0; i < 8; i++) expect(ours[i]).toBeCloseTo(published[i], 12);
  });

  it("compiles the source and the sink with warnings, not errors (mass balance is open)", () => {
    const w = mech.model.warnings.join("\n");
    expect(w).toMatch(/"source of y1" has no reactants: it is a zero-order source/);
  });

  for (const method of ["rosenbrock", "bdf"] as const) {
    it(`matches the Bari test-set reference at t = 321.8122 (${method})`, () => {
      const r = simulate(mech.model, {
        rateConstants: mech.rateConstants,
        temperature: { kind: "isothermal", T: 298.15 },
        initial: Object.fromEntries(HIRES_SPECIES.map((id, i) => [id, HIRES_Y0[i]])),
        tEnd: HIRES_T_END,
        grid: { kind: "linear", points: 2 },
        rtol: 1e-10,
        atol: 1e-14,
        stiffMethod: method,
        maxSteps: 200000,
      });
      if (!r.ok) throw new Error(r.error.message);
      expect(r.value.method).toBe(method);
      const y = finalState(r.value);
      // HIRES_REF: Bari IVP test set, problem HIRES (from memory; see reference-problems.ts).
      const tol = method === "rosenbrock" ? 1e-7 : 1e-5;
      for (let i = 0; i < 8; i++) expect(relErr(y[i], HIRES_REF[i]), HIRES_SPECIES[i]).toBeLessThan(tol);
    });
  }
});

describe("Oregonator entered as the Field–Noyes steps with fractional coefficients", () => {
  const mech = compile(document("Oregonator", ["X", "Y", "Z"], OREGO_STEPS));

  /** The published right-hand side of OREGO (Hairer & Wanner II). */
  const orego = (y: ArrayLike<number>) => [
    S * (y[1] - y[0] * y[1] + y[0] - Q * y[0] * y[0]),
    (-y[1] - y[0] * y[1] + y[2]) / S,
    W * (y[0] - y[2]),
  ];

  it("reproduces the published right-hand side and its Jacobian", () => {
    const { model, rateConstants } = mech;
    const kf = Float64Array.from(rateConstants.map((f) => f.kf(298.15)));
    const kr = new Float64Array(kf.length);
    const y = Float64Array.of(1.3, 2.5, 30);
    const ours = new Float64Array(3);
    model.rhs(y, kf, kr, ours);
    const pub = orego(y);
    for (let i = 0; i < 3; i++) expect(relErr(ours[i], pub[i])).toBeLessThan(1e-13);
    const { rowPtr, colIdx } = model.jacobianPattern;
    const vals = new Float64Array(rowPtr[3]);
    model.jacobian(y, kf, kr, vals);
    // analytic Jacobian of the published right-hand side
    const J = [
      [S * (1 - y[1] - 2 * Q * y[0]), S * (1 - y[0]), 0],
      [-y[1] / S, (-1 - y[0]) / S, 1 / S],
      [W, 0, -W],
    ];
    for (let i = 0; i < 3; i++) {
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) expect(vals[p]).toBeCloseTo(J[i][colIdx[p]], 10);
    }
  });

  it("the recalled reference agrees with the published right-hand side integrated as an ODE", () => {
    const r = integrateStiff(
      { n: 3, autonomous: true, rhs: (_t, y, f) => f.set(orego(y)) },
      0,
      [1, 2, 3],
      360,
      { rtol: 1e-12, atol: 1e-12, maxSteps: 500000 },
    );
    if (!r.ok) throw new Error(r.error.message);
    for (let i = 0; i < 3; i++) expect(relErr(r.value.yFinal[i], OREGO_REF[i])).toBeLessThan(1e-8);
  });

  it("warns that 2X → A + P is a sink", () => {
    expect(mech.model.warnings.join("\n")).toMatch(/"2X → A \+ P" has no products: it is a sink/);
  });

  it("matches the Bari test-set reference at t = 360 (RODAS4 and BDF)", () => {
    for (const method of ["rosenbrock", "bdf"] as const) {
      const r = simulate(mech.model, {
        rateConstants: mech.rateConstants,
        temperature: { kind: "isothermal", T: 298.15 },
        initial: { X: 1, Y: 2, Z: 3 },
        tEnd: 360,
        grid: { kind: "linear", points: 2 },
        rtol: 1e-10,
        atol: 1e-10,
        stiffMethod: method,
        maxSteps: 500000,
      });
      if (!r.ok) throw new Error(`${method}: ${r.error.message}`);
      const y = finalState(r.value);
      const tol = method === "rosenbrock" ? 1e-6 : 1e-4;
      for (let i = 0; i < 3; i++) expect(relErr(y[i], OREGO_REF[i]), `${method} y${i + 1}`).toBeLessThan(tol);
    }
  });
});
