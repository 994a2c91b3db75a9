/**
 * Physical constants against CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021);
 * NIST "Fundamental Physical Constants" tables, 2018 adjustment).
 */
import { describe, expect, it } from "vitest";
import {
  CAL_TH,
  C_LIGHT,
  E_CHARGE,
  FARADAY,
  HARTREE_J,
  H_PLANCK,
  KB_OVER_H,
  K_B,
  N_A,
  P_ATM,
  P_STANDARD,
  R_GAS,
} from "../../solver/constants.ts";

describe("CODATA 2018 constants", () => {
  it("holds the exact SI defining values", () => {
    // CODATA 2018 / SI 2019: exact values
    expect(K_B).toBe(1.380649e-23);
    expect(H_PLANCK).toBe(6.62607015e-34);
    expect(N_A).toBe(6.02214076e23);
    expect(C_LIGHT).toBe(299792458);
    expect(E_CHARGE).toBe(1.602176634e-19);
  });

  it("derives R = k_B·N_A = 8.314 462 618... J/(mol·K)", () => {
    // CODATA 2018: R = 8.314 462 618... J mol⁻¹ K⁻¹ (exact)
    expect(R_GAS).toBeCloseTo(8.314462618, 9);
  });

  it("derives the Faraday constant 96 485.332 12 C/mol", () => {
    // CODATA 2018: F = 96 485.332 12... C mol⁻¹ (exact)
    expect(FARADAY).toBeCloseTo(96485.33212, 5);
  });

  it("holds the hartree energy 4.359 744 722 2071e-18 J", () => {
    // CODATA 2018: E_h = 4.359 744 722 2071(85) × 10⁻¹⁸ J
    expect(HARTREE_J).toBe(4.3597447222071e-18);
  });

  it("holds p° = 1 bar, 1 atm = 101 325 Pa and the thermochemical calorie", () => {
    // IUPAC Green Book (3rd ed.), standard pressure and conversion factors
    expect(P_STANDARD).toBe(1e5);
    expect(P_ATM).toBe(101325);
    expect(CAL_TH).toBe(4.184);
  });

  it("gives k_B·T/h = 6.2124e12 s⁻¹ at 298.15 K", () => {
    // Computed from the CODATA values: 1.380649e-23 × 298.15 / 6.62607015e-34 = 6.21240e12 s⁻¹
    // (the textbook "6.2 × 10¹² s⁻¹" frequency factor at room temperature, common practice)
    const v = KB_OVER_H * 298.15;
    expect(Number(v.toPrecision(5))).toBe(6.2124e12);
  });
});
