/**
 * The workbench's catalytic cycle: found in the step graph, the profile labelled by species
 * names, and the energetic span model (Kozuch & Shaik, Acc. Chem. Res. 2011, 44, 101–110) on an
 * invented two-step cycle worked by hand: Cat + A ⇌ Cat·A (ΔG‡ 58.5, ΔG°rxn +12 kJ/mol, 1 mol/L),
 * Cat·A + B → P + Cat (ΔG‡ 66, ΔG°rxn −45). Levels 0, 58.5, 12, 78, −33 kJ/mol: the TDTS is the
 * second TS after the TDI "Cat + A", δE = 78 kJ/mol, TOF ≈ (k_B T/h)e^{−δE/RT} (CODATA 2018).
 * A bimolecular ΔG°rxn given in the 1 bar state is converted to 1 mol/L: ΔG°(1 M) = ΔG°(1 bar)
 * − Δν·RT ln(c°/1 mol/L), c° = p°/RT (ideal gas — common practice).
 */
import { describe, expect, it } from "vitest";
import { cycleSummary, defaultCycle } from "../../app/components/workbench/cycle-summary";
import { freeEnergyProfile, stepNumbers } from "../../app/components/workbench/step-rates";
import type { MechanismDocument } from "../../solver/exchange-format";

const KB = 1.380649e-23, H = 6.62607015e-34, R = KB * 6.02214076e23;
const T = 298.15;

const doc = {
  format: "saddlebook.mechanism",
  version: 1,
  about: { name: "cycle test" },
  species: [
    { id: "s1", label: "substrate", formula: "C2H4O" },
    { id: "s2", label: "Cat", formula: "C5H5N" },
    { id: "s3", label: "Cat·A", formula: "C7H9NO" },
    { id: "s4", label: "partner", formula: "H2O" },
    { id: "s5", label: "product", formula: "C2H6O2" },
  ],
  steps: [
    { id: "L1", label: "background", reactants: [{ species: "s1", coef: 1 }, { species: "s4", coef: 1 }], products: [{ species: "s5", coef: 1 }], reversible: false, barrier: { form: "dG", dG: 100, unit: "kJ/mol", T, standardState: "1M" } },
    {
      id: "L2",
      label: "binding",
      reactants: [{ species: "s2", coef: 1 }, { species: "s1", coef: 1 }],
      products: [{ species: "s3", coef: 1 }],
      reversible: true,
      barrier: { form: "dG", dG: 58.5, unit: "kJ/mol", T, standardState: "1M" },
      reactionThermo: { form: "dG", dG: 12, unit: "kJ/mol", T, standardState: "1M" },
    },
    {
      id: "L3",
      label: "turnover",
      reactants: [{ species: "s3", coef: 1 }, { species: "s4", coef: 1 }],
      products: [{ species: "s5", coef: 1 }, { species: "s2", coef: 1 }],
      reversible: false,
      barrier: { form: "dG", dG: 66, unit: "kJ/mol", T, standardState: "1M" },
      reactionThermo: { form: "dG", dG: -45, unit: "kJ/mol", T, standardState: "1M" },
    },
  ],
} as MechanismDocument;

describe("catalytic cycle in the workbench", () => {
  it("finds the cycle, starting at the catalyst (fewest atoms among the carriers)", () => {
    expect(defaultCycle(doc)).toEqual(["L2", "L3"]);
    const noCycle = { ...doc, steps: [doc.steps[0]] };
    expect(defaultCycle(noCycle)).toBeNull();
  });

  it("labels the profile's levels by species and step names", () => {
    const p = freeEnergyProfile(doc, stepNumbers(doc, T), ["L2", "L3"]);
    expect(p.map((x) => x.label)).toEqual(["Cat + substrate", "TS binding", "Cat·A + partner", "TS turnover", "product + Cat"]);
    expect(p.map((x) => Number((x.G! / 1000).toFixed(6)))).toEqual([0, 58.5, 12, 78, -33]);
    expect(p.every((x) => x.unknown === null)).toBe(true);
  });

  it("computes TOF, TDTS, TDI and δE by the energetic span model", () => {
    const s = cycleSummary(doc, stepNumbers(doc, T), ["L2", "L3"], T);
    if (s.kind !== "span") throw new Error(s.kind);
    expect(s.catalyst).toBe("Cat");
    expect(s.tdts).toBe("TS turnover");
    expect(s.tdi).toBe("Cat + substrate");
    expect(s.result.span / 1000).toBeCloseTo(78, 9);
    expect(s.reactionEnergy / 1000).toBeCloseTo(-33, 9);
    const approx = ((KB * T) / H) * Math.exp(-78e3 / (R * T));
    expect(s.result.tofApprox / approx).toBeCloseTo(1, 10);
    // the next terms (66 and 58.5 kJ/mol) add under 1 % to the denominator
    expect(s.result.tof / approx).toBeGreaterThan(0.99);
    expect(s.result.tof / approx).toBeLessThan(1);
  });

  it("says which step lacks ΔG°rxn instead of assuming zero; a non-cycle pathway has no TOF", () => {
    const { reactionThermo: _drop, ...turnover } = doc.steps[2];
    const partial = { ...doc, steps: [doc.steps[0], doc.steps[1], turnover] } as MechanismDocument;
    const n = stepNumbers(partial, T);
    const p = freeEnergyProfile(partial, n, ["L2", "L3"]);
    expect(p[4].G).toBeNull();
    expect(p[4].unknown).toBe("“turnover” has no ΔG°rxn");
    const s = cycleSummary(partial, n, ["L2", "L3"], T);
    expect(s.kind === "unknown" && s.reason).toBe("“turnover” has no ΔG°rxn");
    expect(cycleSummary(doc, stepNumbers(doc, T), ["L1"], T).kind).toBe("none");
  });

  it("puts a 1 bar ΔG°rxn of a bimolecular step on the 1 mol/L scale of the profile", () => {
    const bar = { ...doc, steps: [doc.steps[0], { ...doc.steps[1], reactionThermo: { form: "dG", dG: 12, unit: "kJ/mol", T, standardState: "1bar" } }, doc.steps[2]] } as MechanismDocument;
    const n = stepNumbers(bar, T);
    const c0 = 1e5 / (1000 * R * T); // mol/L at 1 bar
    // Δν = −1: ΔG°(1 M) = ΔG°(1 bar) + RT ln c°
    expect(n[1].dGrxn1M! / (12e3 + R * T * Math.log(c0))).toBeCloseTo(1, 10);
    expect(n[1].dGrxn! / 12e3).toBeCloseTo(1, 12);
  });
});
