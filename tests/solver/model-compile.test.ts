import { describe, expect, it } from "vitest";
import { compileMechanism, type MechanismInput } from "../../solver/model.ts";
import { model as compile, rx, sp } from "./mechanism-helpers.ts";

/** The analytic sparse Jacobian at c equals central finite differences of rhs (step 1e-6; common practice check). */
function expectJacobianMatchesDifferences(m: ReturnType<typeof compile>, kf: Float64Array, kr: Float64Array, c: Float64Array, digits: number) {
  const n = m.nSpecies;
  const { rowPtr, colIdx } = m.jacobianPattern;
  const vals = new Float64Array(rowPtr[n]);
  m.jacobian(c, kf, kr, vals);
  const dense = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) dense[i * n + colIdx[p]] = vals[p];
  const fp = new Float64Array(n), fm = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const h = 1e-6;
    const cp = Float64Array.from(c), cm = Float64Array.from(c);
    cp[j] += h;
    cm[j] -= h;
    m.rhs(cp, kf, kr, fp);
    m.rhs(cm, kf, kr, fm);
    for (let i = 0; i < n; i++) expect(dense[i * n + j]).toBeCloseTo((fp[i] - fm[i]) / (2 * h), digits);
  }
}


describe("mass-action model", () => {
  it("builds rhs with the IUPAC rate convention (2A → P: d[A]/dt = −2k[A]²; IUPAC Green Book)", () => {
    const m = compile({ species: sp("A", "P"), reactions: [rx("r1", [["A", 2]], [["P", 1]])] });
    const d = new Float64Array(2);
    m.rhs(Float64Array.of(0.5, 0), Float64Array.of(3), Float64Array.of(0), d);
    expect(d[0]).toBeCloseTo(-2 * 3 * 0.25, 14);
    expect(d[1]).toBeCloseTo(3 * 0.25, 14);
  });

  it("analytic sparse Jacobian equals central finite differences (common practice check)", () => {
    const m = compile({
      species: sp("A", "B", "C", "D"),
      reactions: [
        rx("r1", [["A", 1], ["B", 1]], [["C", 1]], true),
        rx("r2", [["C", 1]], [["D", 2]], true),
        rx("r3", [["A", 2], ["D", 1]], [["B", 1], ["A", 1]]),
        rx("r4", [["B", 1]], [["B", 2]]), // autocatalytic growth
      ],
    });
    const kf = Float64Array.of(2, 0.7, 1.3, 0.4);
    const kr = Float64Array.of(0.5, 3, 0, 0);
    const c = Float64Array.of(0.3, 0.8, 0.2, 0.5);
    expectJacobianMatchesDifferences(m, kf, kr, c, 7);
  });

  it("finds conservation laws from the left null space (A+B⇌C: A+C and B+C conserved — mass balance)", () => {
    const m = compile({ species: sp("A", "B", "C"), reactions: [rx("r1", [["A", 1], ["B", 1]], [["C", 1]], true)] });
    const laws = m.conservationLaws();
    expect(laws.length).toBe(2);
    // every law annihilates the stoichiometric column (−1, −1, +1)
    for (const w of laws) expect(-w[0] - w[1] + w[2]).toBeCloseTo(0, 12);
  });

  it("reports element imbalance from formulas", () => {
    const m = compile({
      species: [{ id: "H2", formula: "H2" }, { id: "O2", formula: "O2" }, { id: "W", formula: "H2O" }],
      reactions: [rx("ok", [["H2", 2], ["O2", 1]], [["W", 2]]), rx("bad", [["H2", 1], ["O2", 1]], [["W", 1]])],
    });
    expect(m.elementBalance[0].report?.balanced).toBe(true);
    expect(m.elementBalance[1].report?.balanced).toBe(false);
    expect(m.warnings.some((w) => w.includes('"bad"'))).toBe(true);
  });

  it("rejects bad mechanisms with typed errors", () => {
    const cases: [MechanismInput, string][] = [
      [{ species: [], reactions: [] }, "EMPTY_MECHANISM"],
      [{ species: sp("A"), reactions: [] }, "EMPTY_MECHANISM"],
      [{ species: sp("A", "A"), reactions: [rx("r", [["A", 1]], [["A", 1]])] }, "DUPLICATE_SPECIES"],
      [{ species: sp("A"), reactions: [rx("r", [["A", 1]], [["Z", 1]])] }, "UNKNOWN_SPECIES"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", 4]], [["B", 1]])] }, "MOLECULARITY"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", 2], ["B", 2]], [["B", 1]])] }, "MOLECULARITY"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", 0]], [["B", 1]])] }, "BAD_COEFFICIENT"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", -1]], [["B", 1]])] }, "BAD_COEFFICIENT"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", 1]], [["B", Number.POSITIVE_INFINITY]])] }, "BAD_COEFFICIENT"],
      [{ species: sp("A", "B"), reactions: [rx("r", [], [])] }, "EMPTY_SIDE"],
      [{ species: sp("A", "B"), reactions: [rx("r", [], [["B", 1]], true)] }, "OPEN_STEP_REVERSIBLE"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", 1]], [], true)] }, "OPEN_STEP_REVERSIBLE"],
    ];
    for (const [input, code] of cases) {
      const r = compileMechanism(input);
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.error.code).toBe(code);
        expect(r.error.message).toMatch(/\.$/);
      }
    }
  });
});

describe("steps as written: sources, sinks, fractional coefficients, a species on both sides", () => {
  it("fractional orders: the analytic Jacobian equals central finite differences (common practice check)", () => {
    const m = compile({
      species: sp("A", "B", "C"),
      reactions: [
        rx("half", [["A", 0.5], ["B", 1]], [["C", 1.5]]),
        rx("rev", [["C", 1.5]], [["A", 0.25], ["B", 2]], true),
        rx("auto", [["A", 1], ["B", 1]], [["A", 2]]),
        rx("src", [], [["C", 1]]),
        rx("sink", [["B", 1]], []),
      ],
    });
    const kf = Float64Array.of(2, 0.7, 1.3, 0.4, 0.9);
    const kr = Float64Array.of(0, 3, 0, 0, 0);
    const c = Float64Array.of(0.3, 0.8, 0.2);
    expectJacobianMatchesDifferences(m, kf, kr, c, 6);
  });

  it("rate law uses the reactant orders, dc/dt the net coefficients (A + B → 2A: d[A]/dt = +k[A][B])", () => {
    const m = compile({ species: sp("A", "B"), reactions: [rx("auto", [["A", 1], ["B", 1]], [["A", 2]])] });
    const d = new Float64Array(2);
    m.rhs(Float64Array.of(0.2, 0.5), Float64Array.of(3), Float64Array.of(0), d);
    expect(d[0]).toBeCloseTo(3 * 0.2 * 0.5, 15);
    expect(d[1]).toBeCloseTo(-3 * 0.2 * 0.5, 15);
    expect(m.warnings).toEqual([]);
  });

  it("a fractional order below zero concentration gives 0, not NaN", () => {
    const m = compile({ species: sp("A", "P"), reactions: [rx("r", [["A", 0.5]], [["P", 1]])] });
    const d = new Float64Array(2);
    m.rhs(Float64Array.of(-1e-15, 0), Float64Array.of(1), Float64Array.of(0), d);
    expect(d[0] === 0).toBe(true);
    const vals = new Float64Array(m.jacobianPattern.rowPtr[2]);
    m.jacobian(Float64Array.of(0, 0), Float64Array.of(1), Float64Array.of(0), vals);
    for (const v of vals) expect(Number.isFinite(v)).toBe(true);
  });

  it("sources and sinks compile with a warning and have no conservation law across them", () => {
    const m = compile({ species: sp("A", "B"), reactions: [rx("in", [], [["A", 1]]), rx("ab", [["A", 1]], [["B", 1]]), rx("out", [["B", 1]], [])] });
    expect(m.warnings.some((w) => w.includes('"in" has no reactants'))).toBe(true);
    expect(m.warnings.some((w) => w.includes('"out" has no products'))).toBe(true);
    expect(m.conservationLaws()).toEqual([]);
  });

  it("a step whose products are unbalanced against formulas is reported, not refused", () => {
    const m = compile({ species: [{ id: "O3", formula: "O3" }, { id: "O2", formula: "O2" }], reactions: [rx("r", [["O3", 1]], [["O2", 1.5]]), rx("s", [["O3", 1]], [])] });
    expect(m.elementBalance[0].report?.balanced).toBe(true); // O3 → 1.5 O2 is balanced
    expect(m.elementBalance[1].report?.balanced).toBe(false);
  });
});
