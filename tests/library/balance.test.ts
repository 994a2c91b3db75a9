// The step form's balance line: a source or a sink is reported, not refused; fractional
// coefficients balance when the atoms do (O3 → 1.5 O2).
import { describe, expect, it } from "vitest";
import { balanceOf } from "../../app/components/library/balance";

const O3 = { label: "ozone", formula: "O3" };
const O2 = { label: "dioxygen", formula: "O2" };

describe("balance line of the step form", () => {
  it("O3 → 1.5 O2 balances", () => {
    expect(balanceOf([{ species: O3, coef: 1 }], [{ species: O2, coef: 1.5 }]).state).toBe("balanced");
  });
  it("a source and a sink are named as such", () => {
    expect(balanceOf([], [{ species: O2, coef: 1 }]).message).toMatch(/zero-order source/);
    expect(balanceOf([{ species: O3, coef: 1 }], []).message).toMatch(/sink/);
  });
});
