/**
 * Workbench numbers: rate table and free-energy profile at a chosen temperature.
 * References: Eyring equation k = (k_B T/h)·exp(−ΔG‡/RT) (CODATA 2018 constants); a step given
 * as ΔG‡ at 298.15 K alone has ΔS‡ taken as 0 (so ΔG‡ is the same at every T) — the engine's
 * convention for the dG form without ΔH‡; detailed balance k_rev = k_fwd/K with
 * K = exp(−ΔG°rxn/RT) (c° = 1 mol/L, Δν = 0); half-life of a first-order step ln 2/k.
 */
import { describe, expect, it } from "vitest";
import { freeEnergyProfile, stepNumbers } from "../../app/components/workbench/step-rates";
import type { MechanismDocument } from "../../solver/exchange-format";

const KB = 1.380649e-23, H = 6.62607015e-34, R = KB * 6.02214076e23;

const doc = {
  format: "saddlebook.mechanism",
  version: 1,
  about: { name: "profile test" },
  species: [{ id: "A" }, { id: "I" }, { id: "P" }],
  steps: [
    {
      id: "s1",
      reactants: [{ species: "A", coef: 1 }],
      products: [{ species: "I", coef: 1 }],
      reversible: true,
      barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      reactionThermo: { form: "dG", dG: 10, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    },
    {
      id: "s2",
      reactants: [{ species: "I", coef: 1 }],
      products: [{ species: "P", coef: 1 }],
      reversible: false,
      barrier: { form: "dG", dG: 70, unit: "kJ/mol", T: 298.15, standardState: "1M" },
    },
  ],
} as MechanismDocument;

describe("rate table numbers", () => {
  it("k_fwd, k_rev, ΔG‡ and the half-life at 298.15 K", () => {
    const T = 298.15;
    const [a, b] = stepNumbers(doc, T);
    const k1 = ((KB * T) / H) * Math.exp(-80e3 / (R * T));
    expect(a.kf! / k1).toBeCloseTo(1, 10);
    expect(a.kfUnit).toBe("s⁻¹");
    expect(a.kr! / (k1 / Math.exp(-10e3 / (R * T)))).toBeCloseTo(1, 8);
    expect(a.dG! / 80e3).toBeCloseTo(1, 10);
    expect(a.halfLife! * k1).toBeCloseTo(Math.LN2, 10);
    expect(b.kr).toBeNull();
    expect(b.dGrxn).toBeNull();
  });
});

describe("free-energy profile", () => {
  it("places minima and transition states at their relative free energies", () => {
    const n = stepNumbers(doc, 298.15);
    const p = freeEnergyProfile(doc, n, ["s1", "s2"]);
    expect(p.map((x) => x.kind)).toEqual(["minimum", "ts", "minimum", "ts", "minimum"]);
    expect(p[0].G).toBe(0);
    expect(p[1].G! / 1e3).toBeCloseTo(80, 8);
    expect(p[2].G! / 1e3).toBeCloseTo(10, 8);
    expect(p[3].G! / 1e3).toBeCloseTo(80, 8); // 10 + 70
    expect(p[4].G).toBeNull(); // s2 has no ΔG°rxn: the product level is unknown
    expect(p[0].label).toBe("A");
  });
});
