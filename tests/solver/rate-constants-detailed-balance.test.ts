/**
 * Reverse rate constants by detailed balance and Wegscheider cycle consistency.
 * Sources: detailed balance / microscopic reversibility, k_f/k_r = K_c (e.g. Laidler,
 * "Chemical Kinetics", 3rd ed. — from memory); K_c = K°·(c°)^Δν for ideal solutions and
 * ideal gases (IUPAC Green Book, 3rd ed., §2.11, equilibrium constants); Wegscheider,
 * Z. Phys. Chem. 39, 257 (1902) for the cycle condition. Numbers derived from CODATA 2018.
 */
import { describe, expect, it } from "vitest";
import { KB_OVER_H, R_GAS } from "../../solver/constants.ts";
import { equilibriumConstant, rateConstantsBatchBoth, reverseRateConstant } from "../../solver/detailed-balance.ts";
import { rateConstant } from "../../solver/rates.ts";
import { standardConcentration } from "../../solver/standard-state.ts";
import { checkThermoCycles, findThermoCycles, integerNullSpace } from "../../solver/thermo-cycles.ts";
import type { ReactionThermo, Result, StepKinetics, StoichTerm } from "../../solver/types.ts";

function get<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message} (${r.error.path})`);
  return r.value;
}
const t = (species: string, coef = 1): StoichTerm => ({ species, coef });

function rev(id: string, reactants: StoichTerm[], products: StoichTerm[], thermo: ReactionThermo, dG = 80e3, state: "1M" | "1bar" = "1M"): StepKinetics {
  return { id, reactants, products, reversible: true, barrier: { form: "dG", dG, Tref: 298.15, standardState: state }, thermo };
}
const dG0 = (dG: number, standardState: "1M" | "1bar" | "1atm" = "1M"): ReactionThermo => ({ form: "dG", dG, Tref: 298.15, standardState });

describe("reverse rate constants", () => {
  it("A ⇌ B with ΔG°rxn = 0 gives k_rev = k_fwd", () => {
    const r = get(reverseRateConstant(rev("r", [t("A")], [t("B")], dG0(0)), 298.15));
    expect(r.kRev).toBeCloseTo(r.kFwd, 15);
    expect(r.Kc).toBe(1);
    expect(r.units).toBe("dimensionless");
    expect(r.unitsRev).toBe("s⁻¹");
  });

  it("A ⇌ B: k_rev equals the Eyring k of the reverse barrier ΔG‡ − ΔG°rxn", () => {
    const T = 298.15;
    const r = get(reverseRateConstant(rev("r", [t("A")], [t("B")], dG0(-12e3), 85e3), T));
    const expected = KB_OVER_H * T * Math.exp(-(85e3 + 12e3) / (R_GAS * T));
    expect(r.kRev / expected).toBeCloseTo(1, 12);
  });

  it("bimolecular association in 1 bar: K_c = K°/c° (24.79 L/mol per unit K°) and k_rev from the reverse barrier", () => {
    const T = 298.15;
    const step = rev("assoc", [t("A"), t("B")], [t("AB")], dG0(-20e3, "1bar"), 50e3, "1bar");
    const eq = get(equilibriumConstant(step, T));
    const K0 = Math.exp(20e3 / (R_GAS * T));
    expect(eq.K0 / K0).toBeCloseTo(1, 12);
    // ideal gas: K_c = K°·(c°)^Δν with Δν = −1 → K°/0.040339 mol/L = K°·24.79 L/mol
    expect(eq.Kc / (K0 * 24.7896)).toBeCloseTo(1, 4);
    expect(eq.units).toBe("L mol⁻¹");
    const r = get(reverseRateConstant(step, T));
    expect(r.unitsFwd).toBe("L mol⁻¹ s⁻¹");
    expect(r.unitsRev).toBe("s⁻¹");
    // AB → A + B is unimolecular with ΔG‡_rev = ΔG‡_fwd − ΔG°rxn in the same (1 bar) state;
    // (c°)^(1−1) = 1 so the Eyring k needs no standard-state factor.
    const kRevEyring = KB_OVER_H * T * Math.exp(-(50e3 + 20e3) / (R_GAS * T));
    expect(r.kRev / kRevEyring).toBeCloseTo(1, 12);
  });

  it("the same association with ΔG°rxn converted to 1 M gives the same k_rev", () => {
    const T = 298.15;
    const cBar = get(standardConcentration("1bar", T));
    // ΔG°(1 M) = ΔG°(1 bar) − Δν·RT·ln(c°(1 bar)/1 M), Δν = −1 → lower by 7.96 kJ/mol
    const dG1M = -20e3 + R_GAS * T * Math.log(cBar);
    expect((dG1M + 20e3) / 1000).toBeCloseTo(-7.9585, 3);
    const a = get(reverseRateConstant(rev("a", [t("A"), t("B")], [t("AB")], dG0(-20e3, "1bar"), 50e3, "1bar"), T));
    const b = get(reverseRateConstant(rev("b", [t("A"), t("B")], [t("AB")], dG0(dG1M, "1M"), 50e3, "1bar"), T));
    expect(b.kRev / a.kRev).toBeCloseTo(1, 12);
  });

  it("dissociation A ⇌ B + C: k_rev in L mol⁻¹ s⁻¹", () => {
    const r = get(reverseRateConstant(rev("d", [t("A")], [t("B"), t("C")], dG0(10e3)), 300));
    expect(r.unitsRev).toBe("L mol⁻¹ s⁻¹");
    expect(r.units).toBe("mol L⁻¹");
  });

  it("follows van 't Hoff with ΔH°, ΔS°: d ln K/dT = ΔH°/RT² (1 M state)", () => {
    const step = rev("v", [t("A")], [t("B")], { form: "dHdS", dH: -40e3, dS: -50, standardState: "1M" });
    const T = 330;
    const h = 1e-3;
    const up = get(equilibriumConstant(step, T + h)).lnKc;
    const dn = get(equilibriumConstant(step, T - h)).lnKc;
    expect(((up - dn) / (2 * h)) * R_GAS * T * T).toBeCloseTo(-40e3, 1);
    const eq = get(equilibriumConstant(step, T));
    expect(eq.dGrxn).toBeCloseTo(-40e3 + T * 50, 8);
  });

  it("flags ΔG°rxn held constant away from Tref", () => {
    const step = rev("x", [t("A")], [t("B")], dG0(-5e3));
    expect(get(reverseRateConstant(step, 298.15)).extrapolated).toBe(false);
    expect(get(reverseRateConstant(step, 350)).extrapolated).toBe(true);
  });

  it("batch forward and reverse agree with the single-step functions; irreversible → 0", () => {
    const steps: StepKinetics[] = [
      rev("a", [t("A")], [t("B")], dG0(-3e3)),
      { ...rev("b", [t("B"), t("C")], [t("D")], { form: "dHdS", dH: -50e3, dS: -110, standardState: "1atm" }, 60e3, "1bar"), imagFreq: 900 },
      { ...rev("c", [t("D")], [t("E")], dG0(0)), reversible: false, thermo: undefined },
    ];
    const temps = [280, 300, 350];
    const both = get(rateConstantsBatchBoth(steps, temps));
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < temps.length; j++) {
        const r = get(reverseRateConstant(steps[i], temps[j]));
        expect(both.forward[i * 3 + j] / r.kFwd).toBeCloseTo(1, 12);
        expect(both.reverse[i * 3 + j] / r.kRev).toBeCloseTo(1, 12);
        expect(both.forward[i * 3 + j] / get(rateConstant(steps[i], temps[j])).k).toBeCloseTo(1, 12);
      }
    }
    expect(Array.from(both.reverse.subarray(6, 9))).toEqual([0, 0, 0]);
  });

  it("a reversible step without thermochemistry is MISSING_THERMO", () => {
    const s: StepKinetics = { ...rev("m", [t("A")], [t("B")], dG0(0)), thermo: undefined };
    const r = reverseRateConstant(s, 300);
    expect(!r.ok && r.error.code).toBe("MISSING_THERMO");
    expect(!r.ok && r.error.path).toBe("step.thermo");
    const b = rateConstantsBatchBoth([rev("ok", [t("A")], [t("B")], dG0(0)), s], [300]);
    expect(!b.ok && b.error.path).toBe("steps[1].thermo");
    const c = checkThermoCycles([s], 300);
    expect(!c.ok && c.error.code).toBe("MISSING_THERMO");
  });

  it("refuses absurd thermochemistry, a product side of four and bad temperatures", () => {
    expect(get.length).toBe(1);
    const a = reverseRateConstant(rev("x", [t("A")], [t("B")], dG0(5000e3)), 300);
    expect(!a.ok && a.error.code).toBe("BARRIER_RANGE");
    const b = reverseRateConstant(rev("x", [t("A")], [t("B", 4)], dG0(0)), 300);
    expect(!b.ok && b.error.code).toBe("MOLECULARITY");
    expect(!b.ok && b.error.path).toBe("step.products");
    const c = equilibriumConstant(rev("x", [t("A")], [t("B")], dG0(0)), -2);
    expect(!c.ok && c.error.code).toBe("TEMPERATURE");
    const d = equilibriumConstant(rev("x", [t("A")], [t("B")], dG0(Number.NaN)), 300);
    expect(!d.ok && d.error.code).toBe("NON_FINITE");
  });
});

describe("thermodynamic cycles (Wegscheider)", () => {
  const T = 298.15;
  const triangle = (dGca: number) => [
    rev("ab", [t("A")], [t("B")], dG0(-10e3)),
    rev("bc", [t("B")], [t("C")], dG0(-5e3)),
    rev("ca", [t("C")], [t("A")], dG0(dGca)),
  ];

  it("passes a consistent triangle A⇌B⇌C⇌A", () => {
    const all = get(findThermoCycles(triangle(15e3), T));
    expect(all.length).toBe(1);
    expect(all[0].stepIds).toEqual(["ab", "bc", "ca"]);
    expect(all[0].coefficients).toEqual([1, 1, 1]);
    expect(Math.abs(all[0].residual)).toBeLessThan(1e-6);
    expect(get(checkThermoCycles(triangle(15e3), T))).toEqual([]);
  });

  it("flags an inconsistent triangle with its residual", () => {
    const bad = get(checkThermoCycles(triangle(20e3), T));
    expect(bad.length).toBe(1);
    expect(bad[0].residual).toBeCloseTo(5e3, 6);
    expect(bad[0].consistent).toBe(false);
    // within the default 0.1 kJ/mol tolerance → not flagged
    expect(get(checkThermoCycles(triangle(15.05e3), T))).toEqual([]);
  });

  it("converts mixed standard states before summing (bimolecular cycle)", () => {
    // A + B ⇌ AB (1 bar), AB ⇌ C (1 M), C ⇌ A + B (1 M); consistent when the 1 bar value is
    // converted: ΔG°(1 M) = ΔG°(1 bar) + RT·ln c°(1 bar) for Δν = −1.
    const cBar = get(standardConcentration("1bar", T));
    const g1 = -30e3; // 1 bar
    const g1M = g1 + R_GAS * T * Math.log(cBar);
    const g2 = -4e3;
    const g3 = -(g1M + g2);
    const steps = [
      rev("assoc", [t("A"), t("B")], [t("AB")], dG0(g1, "1bar")),
      rev("iso", [t("AB")], [t("C")], dG0(g2)),
      rev("diss", [t("C")], [t("A"), t("B")], dG0(g3)),
    ];
    expect(get(checkThermoCycles(steps, T))).toEqual([]);
    // had the 1 bar value been used as if it were 1 M, the cycle would be off by 7.96 kJ/mol
    const wrong = [rev("assoc", [t("A"), t("B")], [t("AB")], dG0(g1)), steps[1], steps[2]];
    const flagged = get(checkThermoCycles(wrong, T));
    expect(flagged.length).toBe(1);
    expect(Math.abs(flagged[0].residual) / 1000).toBeCloseTo(7.9585, 3);
  });

  it("finds parallel steps and doubled stoichiometry, ignores irreversible steps and open chains", () => {
    const par = [rev("p1", [t("A")], [t("B")], dG0(-1e3)), rev("p2", [t("A")], [t("B")], dG0(-3e3))];
    const c = get(checkThermoCycles(par, T));
    expect(c[0].coefficients).toEqual([1, -1]);
    expect(c[0].residual).toBeCloseTo(2e3, 6);
    // 2A ⇌ A2 and A ⇌ X, A2 ⇌ 2X: cycle coefficients (1, 2, −1) up to sign
    const dimer = [
      rev("dim", [t("A", 2)], [t("A2")], dG0(-8e3)),
      rev("iso", [t("A")], [t("X")], dG0(-1e3)),
      rev("dimX", [t("A2")], [t("X", 2)], dG0(6e3)),
    ];
    const all = get(findThermoCycles(dimer, T));
    expect(all.length).toBe(1);
    expect(all[0].coefficients).toEqual([1, -2, 1]);
    expect(all[0].residual).toBeCloseTo(-8e3 + 2e3 + 6e3, 6);
    const chain = [rev("a", [t("A")], [t("B")], dG0(1)), rev("b", [t("B")], [t("C")], dG0(2))];
    expect(get(findThermoCycles(chain, T))).toEqual([]);
    const irr = triangle(20e3);
    irr[2] = { ...irr[2], reversible: false };
    expect(get(checkThermoCycles(irr, T))).toEqual([]);
  });

  it("integer null space: N·x = 0 with nullity = columns − rank", () => {
    // Steps A→B, B→C, C→A, A→C, C→B over species A, B, C (D spectator). Every column sums
    // to 0 (A + B + C is conserved), so the rows are dependent: rank 2 → 5 − 2 = 3 cycles.
    const N = [
      [-1, 0, 1, -1, 0],
      [1, -1, 0, 0, 1],
      [0, 1, -1, 1, -1],
      [0, 0, 0, 0, 0],
    ];
    const basis = integerNullSpace(N, 5);
    expect(basis.length).toBe(3);
    for (const x of basis) {
      for (const row of N) expect(row.reduce((s, v, j) => s + v * x[j], 0)).toBe(0);
      expect(x.every(Number.isInteger)).toBe(true);
    }
    // independent: the free-column entries form an identity pattern up to scale
    // (columns 2, 3, 4 are free after eliminating on columns 0, 1)
    const free = basis.map((x) => [x[2], x[3], x[4]].map((v) => (v !== 0 ? 1 : 0)));
    expect(free).toEqual([[1, 0, 0], [0, 1, 0], [0, 0, 1]]);
    // a full-rank 2 × 3 matrix has nullity 1: x0 + 2·x2 = 0, x1 − x2 = 0 → (−2, 1, 1),
    // reported primitive with its first nonzero entry positive
    const M = [
      [1, 0, 2],
      [0, 1, -1],
    ];
    expect(integerNullSpace(M, 3)).toEqual([[2, -1, -1]]);
  });
});
