import { describe, expect, it } from "vitest";
import { compileMechanism, type MechanismInput } from "../../solver/model.ts";
import { model as compile, rx, sp } from "./mechanism-helpers.ts";


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
    const { rowPtr, colIdx } = m.jacobianPattern;
    const vals = new Float64Array(rowPtr[4]);
    m.jacobian(c, kf, kr, vals);
    const dense = new Float64Array(16);
    for (let i = 0; i < 4; i++) for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) dense[i * 4 + colIdx[p]] = vals[p];
    const fp = new Float64Array(4), fm = new Float64Array(4);
    for (let j = 0; j < 4; j++) {
      const h = 1e-6;
      const cp = Float64Array.from(c), cm = Float64Array.from(c);
      cp[j] += h;
      cm[j] -= h;
      m.rhs(cp, kf, kr, fp);
      m.rhs(cm, kf, kr, fm);
      for (let i = 0; i < 4; i++) expect(dense[i * 4 + j]).toBeCloseTo((fp[i] - fm[i]) / (2 * h), 7);
    }
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
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", 1.5]], [["B", 1]])] }, "BAD_COEFFICIENT"],
      [{ species: sp("A", "B"), reactions: [rx("r", [["A", -1]], [["B", 1]])] }, "BAD_COEFFICIENT"],
      [{ species: sp("A", "B"), reactions: [rx("r", [], [["B", 1]])] }, "EMPTY_SIDE"],
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
