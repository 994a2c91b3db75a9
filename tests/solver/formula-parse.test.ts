import { describe, expect, it } from "vitest";
import { checkElementBalance, parseFormula } from "../../solver/formula.ts";

const el = (f: string) => {
  const r = parseFormula(f);
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
};

describe("formula parser (Saddlebook notation, see solver/formula.ts)", () => {
  it("reads elements and counts (compositions: common chemical knowledge)", () => {
    expect(el("H2O")).toEqual({ elements: { H: 2, O: 1 }, charge: 0 });
    expect(el("C6H5Br").elements).toEqual({ C: 6, H: 5, Br: 1 });
  });
  it("expands nested brackets", () => {
    expect(el("Ca(OH)2").elements).toEqual({ Ca: 1, O: 2, H: 2 });
    expect(el("[Cu(NH3)4]^2+")).toEqual({ elements: { Cu: 1, N: 4, H: 12 }, charge: 2 });
    expect(el("K4[Fe(CN)6]").elements).toEqual({ K: 4, Fe: 1, C: 6, N: 6 });
  });
  it("reads hydrates with a leading multiplier", () => {
    expect(el("CuSO4·5H2O").elements).toEqual({ Cu: 1, S: 1, O: 9, H: 10 });
    expect(el("CaCl2.2H2O").elements).toEqual({ Ca: 1, Cl: 2, H: 4, O: 2 });
  });
  it("reads all three charge spellings", () => {
    expect(el("NH4+").charge).toBe(1);
    expect(el("SO4^2-").charge).toBe(-2);
    expect(el("SO4--").charge).toBe(-2);
    expect(el("Cu(NH3)4+2")).toEqual({ elements: { Cu: 1, N: 4, H: 12 }, charge: 2 });
    expect(el("OH^-").charge).toBe(-1);
  });
  it("returns typed errors with positions", () => {
    const cases: [string, number][] = [
      ["Xx2", 0],
      ["Ca(OH", 2],
      ["H2O)", 3],
      ["H0", 1],
      ["(]", 1],
      ["h2o", 0],
    ];
    for (const [f, pos] of cases) {
      const r = parseFormula(f);
      expect(r.ok).toBe(false);
      if (!r.ok) {
        expect(r.error.code).toBe("FORMULA_SYNTAX");
        expect(r.error.path).toBe(`formula@${pos}`);
        expect(r.error.message.length).toBeGreaterThan(5);
      }
    }
    expect(parseFormula("").ok).toBe(false);
  });
  it("checks element and charge balance of a step", () => {
    // 2 H2 + O2 → 2 H2O is balanced (common chemical knowledge)
    const ok = checkElementBalance([{ formula: "H2", coef: 2 }, { formula: "O2", coef: 1 }], [{ formula: "H2O", coef: 2 }]);
    expect(ok.ok && ok.value.balanced).toBe(true);
    // H2 + O2 → H2O is short of one O on the product side
    const no = checkElementBalance([{ formula: "H2", coef: 1 }, { formula: "O2", coef: 1 }], [{ formula: "H2O", coef: 1 }]);
    expect(no.ok && no.value.elementExcess).toEqual({ O: -1 });
    // NH3 + H+ → NH4+ balanced in charge
    const ch = checkElementBalance([{ formula: "NH3", coef: 1 }, { formula: "H+", coef: 1 }], [{ formula: "NH4+", coef: 1 }]);
    expect(ch.ok && ch.value.balanced).toBe(true);
  });
});
