/**
 * Guards of the step forms: negative barriers and rate constants above the transition-state
 * ceiling warn; element and charge balance of local steps from formulas; local-step terms with
 * any number of rows; a library step replaced by a local edit keeps its standard state, and a
 * barrier the panel cannot edit in its own form is converted only with a sentence saying so.
 *
 * Reference: k_BT/h = 1.380649e-23 × 298.15 / 6.62607015e-34 = 6.2124e12 s⁻¹ at 298.15 K
 * (CODATA 2018 exact constants; Eyring–Polanyi with ΔG‡ = 0, common practice).
 */
import { describe, expect, it } from "vitest";
import { barrierWarning, eyringCeiling, termsBalance } from "../../app/components/step-guards";
import { termsOf } from "../../app/components/StepTermsEditor";
import { barrierOf, draftOf } from "../../app/components/workbench/GraphEditing";
import { stepNumbers } from "../../app/components/workbench/step-rates";

describe("barrier guards", () => {
  it("knows the transition-state ceiling k_BT/h", () => {
    expect(eyringCeiling(298.15) / 6.2124e12).toBeCloseTo(1, 4);
  });

  it("warns on a negative ΔG‡ and on k above k_BT/h, and stays quiet otherwise", () => {
    expect(barrierWarning({ dG: 80e3, kf: 0.05, kfUnit: "s⁻¹" }, 298.15)).toBeNull();
    expect(barrierWarning({ dG: -5e3, kf: 4.7e13, kfUnit: "s⁻¹" }, 298.15)).toMatch(/^ΔG‡ is negative \(-5 kJ\/mol at 298.15 K, 1 mol\/L\); k_fwd = 4.7×10¹³ s⁻¹ is above k_BT\/h = 6.21×10¹² s⁻¹/);
    // κ > 1 (tunnelling) can lift k over the ceiling with a positive barrier
    expect(barrierWarning({ dG: 1e3, kf: 1e13 }, 298.15)).toMatch(/^k_fwd = 1×10¹³ is above k_BT\/h/);
  });

  it("puts the warning in the numbers every form and table shows", () => {
    const doc = {
      format: "saddlebook.mechanism" as const,
      version: 1 as const,
      about: { name: "t" },
      species: [{ id: "A" }, { id: "B" }],
      steps: [{ id: "ab", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dG" as const, dG: -3, unit: "kJ/mol" as const, T: 298.15, standardState: "1M" as const } }],
    };
    expect(stepNumbers(doc, 298.15)[0].caution).toMatch(/ΔG‡ is negative/);
  });
});

describe("balance of a local step", () => {
  const species: Record<string, { label: string; formula: string | null }> = {
    s1: { label: "ketene", formula: "C2H2O" },
    s2: { label: "diketene", formula: "C4H4O2" },
    s3: { label: "ammonium", formula: "NH4+" },
    s4: { label: "ammonia", formula: "NH3" },
    s5: { label: "mystery", formula: null },
  };
  const of = (k: string) => species[k];

  it("adds up repeated rows and keeps any number of them", () => {
    expect(termsOf([{ species: "s1", coef: "1" }, { species: "s1", coef: "" }, { species: "", coef: "1" }, { species: "s3", coef: "0.5" }])).toEqual([
      { species: "s1", coef: 2 },
      { species: "s3", coef: 0.5 },
    ]);
  });

  it("finds 2 ketene → diketene balanced, and says what is missing otherwise", () => {
    expect(termsBalance([{ species: "s1", coef: 2 }], [{ species: "s2", coef: 1 }], of)?.state).toBe("balanced");
    const r = termsBalance([{ species: "s1", coef: 1 }], [{ species: "s2", coef: 1 }], of)!;
    expect(r.state).toBe("unbalanced");
    expect(r.message).toMatch(/C \+2/);
  });

  it("checks charge: NH4+ → NH3 is short of a proton and a charge", () => {
    const r = termsBalance([{ species: "s3", coef: 1 }], [{ species: "s4", coef: 1 }], of)!;
    expect(r.state).toBe("unbalanced");
    expect(r.message).toMatch(/H −1/);
    expect(r.message).toMatch(/charge −1/);
  });

  it("does not judge a step with a species without formula, and waits for both sides", () => {
    expect(termsBalance([{ species: "s5", coef: 1 }], [{ species: "s4", coef: 1 }], of)?.state).toBe("unknown");
    expect(termsBalance([{ species: "s1", coef: 1 }], [], of)).toBeNull();
  });
});

describe("local edit of a library step", () => {
  it("keeps the standard state of the barrier it replaces", () => {
    const d = draftOf({ form: "dG", dG: 95, unit: "kJ/mol", T: 298.15, standardState: "1bar" }, 87e3, 298.15);
    expect(d.standardState).toBe("1bar");
    expect(d.rebased).toBeUndefined();
    expect(barrierOf(d)).toEqual({ form: "dG", dG: 95, unit: "kJ/mol", T: 298.15, standardState: "1bar" });
    const h = draftOf({ form: "dHdS", dH: 70, dS: -40, unit: "kcal/mol", entropyUnit: "J/(mol K)", standardState: "1atm" }, 80e3, 300);
    expect(barrierOf(h)).toMatchObject({ form: "dHdS", dH: 70, unit: "kcal/mol", standardState: "1atm" });
  });

  it("converts a form it cannot edit only with a sentence saying so", () => {
    const d = draftOf({ form: "thermal", Ea: 90, dS: -10, dn: 0, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M", T: 350 }, 84.123456e3, 310);
    expect(d).toMatchObject({ form: "dG", v1: "84.123", T: "310", standardState: "1M" });
    expect(d.rebased).toMatch(/^Entered as Ea 90 kJ\/mol, .*converted to ΔG‡ at 310 K in the 1 mol\/L standard state \(84.123 kJ\/mol\); saving stores this converted form/);
  });
});
