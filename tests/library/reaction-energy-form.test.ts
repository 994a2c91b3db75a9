/**
 * The reaction free energy on every step form: the library step editor's form state (ΔG°rxn,
 * optional ΔH°rxn, its temperature in K or °C and its own standard state, on irreversible steps
 * too) and the workbench / mechanism-editor draft. T/K = t/°C + 273.15 (definition of the
 * Celsius scale — common practice).
 */
import { describe, expect, it } from "vitest";
import { buildStepInput, emptyForm, formFromContent } from "../../app/components/library/step-form";
import { freshReactionEnergy, reactionEnergyDraftOf, thermoOfDraft } from "../../app/components/ReactionEnergyFields";
import type { DocumentStep } from "../../solver/exchange-format";

const filled = () => ({
  ...emptyForm(),
  reactants: [{ speciesId: "1", coef: "1" }],
  products: [{ speciesId: "2", coef: "1" }],
  dG: "80",
});

describe("library step form: reaction free energy", () => {
  it("is optional on an irreversible step and stored with its temperature and standard state", () => {
    const none = buildStepInput(filled());
    expect(none.input?.reactionThermo).toBeUndefined();
    const f = { ...filled(), rxnDG: "-12.5", rxnDH: "-30", rxnT: "25", tu: "C" as const, rxnSS: "1bar" as const };
    const b = buildStepInput(f);
    expect(b.errors).toEqual({});
    expect(b.input!.reactionThermo).toEqual({ form: "dG", dG: -12.5, dH: -30, unit: "kJ/mol", T: 298.15, standardState: "1bar" });
    // the barrier keeps its own standard state
    expect(b.input!.barrier).toMatchObject({ standardState: "1M" });
  });

  it("is required on a reversible step, and a bad temperature points at its field", () => {
    expect(buildStepInput({ ...filled(), reversible: true }).errors["reactionThermo.dG"]).toBe("Required.");
    expect(buildStepInput({ ...filled(), rxnDG: "-5", rxnT: "-1" }).errors["reactionThermo.T"]).toBe("Must be above absolute zero.");
    expect(buildStepInput({ ...filled(), rxnDG: "abc" }).errors["reactionThermo.dG"]).toMatch(/not a number/);
  });

  it("round-trips a stored value, and keeps a ΔH°/ΔS° form it does not edit", () => {
    const content: DocumentStep = {
      id: "x",
      reactants: [{ species: "s1", coef: 1 }],
      products: [{ species: "s2", coef: 1 }],
      reversible: false,
      barrier: { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      reactionThermo: { form: "dG", dG: -20, unit: "kJ/mol", T: 350, standardState: "1atm" },
    };
    const f = formFromContent(content, {});
    expect([f.rxnDG, f.rxnT, f.rxnSS]).toEqual(["-20", "350", "1atm"]);
    expect(buildStepInput(f).input!.reactionThermo).toEqual(content.reactionThermo);
    const hs = { form: "dHdS" as const, dH: -40, dS: -20, unit: "kJ/mol" as const, entropyUnit: "J/(mol K)" as const, standardState: "1M" as const };
    const g = formFromContent({ ...content, reversible: true, reactionThermo: hs }, {});
    expect(g.rxnDG).toBe("");
    expect(buildStepInput(g).input!.reactionThermo).toEqual(hs);
  });
});

describe("workbench and mechanism-editor draft", () => {
  it("empty means not given; typed values carry unit, T and standard state", () => {
    expect(thermoOfDraft(freshReactionEnergy())).toEqual({ thermo: undefined, error: null });
    expect(thermoOfDraft({ dG: "-3,5", unit: "kcal/mol", T: "310", standardState: "1bar" }).thermo).toEqual({ form: "dG", dG: -3.5, unit: "kcal/mol", T: 310, standardState: "1bar" });
    expect(thermoOfDraft({ ...freshReactionEnergy(), dG: "x" }).error).toMatch(/not a number/);
    expect(thermoOfDraft({ ...freshReactionEnergy(), dG: "1", T: "0" }).error).toMatch(/above 0 K/);
  });

  it("reads a stored value back and keeps what the draft cannot edit", () => {
    const stored = { form: "dG" as const, dG: -9, dH: -20, unit: "kJ/mol" as const, T: 320, standardState: "1atm" as const };
    const d = reactionEnergyDraftOf(stored);
    expect(d).toEqual({ dG: "-9", unit: "kJ/mol", T: "320", standardState: "1atm" });
    expect(thermoOfDraft(d, stored).thermo).toEqual(stored);
    const hs = { form: "dHdS" as const, dH: -40, dS: -20, unit: "kJ/mol" as const, entropyUnit: "J/(mol K)" as const, standardState: "1M" as const };
    expect(thermoOfDraft(reactionEnergyDraftOf(hs), hs).thermo).toEqual(hs);
  });
});
