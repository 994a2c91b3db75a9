/**
 * States along a pathway and catalytic-cycle detection (solver/reaction-path.ts). The energies
 * are sums of the steps' ΔG°rxn and ΔG‡ (Hess's law along the path — common practice); the
 * mechanisms are invented.
 */
import { describe, expect, it } from "vitest";
import { findCatalyticCycle, reactionPath, type PathStep } from "../../solver/reaction-path.ts";

const t = (species: string, coef = 1) => ({ species, coef });
const cycleSteps: PathStep[] = [
  { id: "bind", reactants: [t("Cat"), t("A")], products: [t("CatA")], dGts: 50e3, dGrxn: 10e3 },
  { id: "turn", reactants: [t("CatA"), t("B")], products: [t("P"), t("Cat")], dGts: 60e3, dGrxn: -40e3 },
];
const side = { id: "leak", reactants: [t("CatA"), t("W")], products: [t("Cat"), t("Q", 2)] };
const background = { id: "bg", reactants: [t("A"), t("B")], products: [t("P")] };

describe("reaction path", () => {
  it("states accumulate species, entering reactants join before their step, energies add up", () => {
    const p = reactionPath(cycleSteps);
    expect(p.states.map((s) => s.species.map((x) => x.species))).toEqual([["Cat", "A"], ["CatA", "B"], ["P", "Cat"]]);
    expect(p.states.map((s) => s.G)).toEqual([0, 10e3, -30e3]);
    expect(p.transitionStates.map((s) => s.G)).toEqual([50e3, 70e3]);
    expect(p.catalyst).toBe("Cat");
  });

  it("a step without ΔG°rxn leaves the later levels unknown and says which step; a missing ΔG‡ only its own TS", () => {
    const p = reactionPath([{ ...cycleSteps[0], dGrxn: null }, cycleSteps[1]]);
    expect(p.states.map((s) => s.G)).toEqual([0, null, null]);
    expect(p.states[2].unknownBecause).toBe("bind");
    expect(p.transitionStates[1]).toEqual({ stepId: "turn", G: null, unknownBecause: "bind" });
    const q = reactionPath([{ ...cycleSteps[0], dGts: null }, cycleSteps[1]]);
    expect(q.transitionStates[0]).toEqual({ stepId: "bind", G: null, unknownBecause: "bind" });
    expect(q.transitionStates[1].G).toBe(70e3);
  });

  it("a linear pathway is no cycle; an empty one has no states", () => {
    const p = reactionPath([
      { id: "1", reactants: [t("A")], products: [t("B")], dGts: 80e3, dGrxn: -5e3 },
      { id: "2", reactants: [t("B")], products: [t("C")], dGts: 70e3, dGrxn: -5e3 },
    ]);
    expect(p.catalyst).toBeNull();
    expect(reactionPath([]).states).toEqual([]);
  });

  it("finds the catalytic cycle in a branched mechanism and starts it at the preferred catalyst", () => {
    const steps = [background, cycleSteps[1], side, cycleSteps[0]];
    expect(findCatalyticCycle(steps, (s) => (s === "Cat" ? 0 : 1))).toEqual(["bind", "turn"]);
    expect(findCatalyticCycle(steps, (s) => (s === "CatA" ? 0 : 1))).toEqual(["turn", "bind"]);
    expect(findCatalyticCycle([background, side])).toBeNull();
  });

  it("prefers the longest cycle and stays bounded on a dense network", () => {
    const three = [
      { id: "a", reactants: [t("Cat"), t("X")], products: [t("I1")] },
      { id: "b", reactants: [t("I1")], products: [t("I2")] },
      { id: "c", reactants: [t("I2")], products: [t("Cat"), t("Y")] },
      { id: "short", reactants: [t("I1")], products: [t("Cat"), t("Z")] },
    ];
    expect(findCatalyticCycle(three, (s) => (s === "Cat" ? 0 : 1))).toEqual(["a", "b", "c"]);
    const dense = Array.from({ length: 60 }, (_, i) => ({ id: `s${i}`, reactants: [t(`S${i % 12}`)], products: [t(`S${(i * 7 + 1) % 12}`), t(`S${(i * 5 + 3) % 12}`)] }));
    const r = findCatalyticCycle(dense);
    expect(r === null || r.length <= 12).toBe(true);
  });
});
