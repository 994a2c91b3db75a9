/**
 * Forward rate constants: Eyring–Polanyi, barrier forms, standard states, tunnelling.
 * Constants are CODATA 2018 (solver/constants.ts). Worked values are derived by hand from
 * those constants (stated beside each check); textbook relations are from transition-state
 * theory in its thermodynamic formulation (e.g. Laidler, "Chemical Kinetics", 3rd ed.,
 * ch. 4; Steinfeld, Francisco & Hase, "Chemical Kinetics and Dynamics", 2nd ed., ch. 10 —
 * cited from memory for the form of the relations).
 */
import { describe, expect, it } from "vitest";
import { KB_OVER_H, R_GAS } from "../../solver/constants.ts";
import { convertBarrier, molecularity, rateConstant, rateConstantsBatch } from "../../solver/rates.ts";
import { standardConcentration, standardStateShift } from "../../solver/standard-state.ts";
import { wignerKappa } from "../../solver/tunnelling.ts";
import type { Barrier, Result, StandardState, StepKinetics } from "../../solver/types.ts";
import { randomSteps, temperatureGrid } from "../../bench/rate-steps.ts";

function get<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message} (${r.error.path})`);
  return r.value;
}
function errCode<T>(r: Result<T>): string {
  return r.ok ? "ok" : r.error.code;
}

const uni = [{ species: "A", coef: 1 }];
const bi = [{ species: "A", coef: 1 }, { species: "B", coef: 1 }];
const ter = [{ species: "A", coef: 2 }, { species: "B", coef: 1 }];
const reactantsFor = (m: number) => (m === 1 ? uni : m === 2 ? bi : ter);

function step(barrier: Barrier, m = 1, extra: Partial<StepKinetics> = {}): StepKinetics {
  return { id: "s", reactants: reactantsFor(m), products: [{ species: "P", coef: 1 }], reversible: false, barrier, ...extra };
}

/** Local Arrhenius energy by a central difference of ln k: RT²·d ln k/dT. */
function numericEa(s: StepKinetics, T: number): number {
  const h = 1e-3;
  const up = get(rateConstant(s, T + h)).lnk;
  const dn = get(rateConstant(s, T - h)).lnk;
  return (R_GAS * T * T * (up - dn)) / (2 * h);
}

describe("molecularity", () => {
  it("sums reactant coefficients (0 for a source, fractional allowed) and refuses more than three", () => {
    expect(get(molecularity({ reactants: ter }))).toBe(3);
    expect(errCode(molecularity({ reactants: [{ species: "A", coef: 4 }] }))).toBe("MOLECULARITY");
    expect(get(molecularity({ reactants: [] }))).toBe(0);
    expect(get(molecularity({ reactants: [{ species: "A", coef: 1.5 }] }))).toBe(1.5);
    const neg = molecularity({ reactants: [{ species: "A", coef: -0.5 }] }, "steps[2]");
    expect(errCode(neg)).toBe("STOICHIOMETRY");
    expect(!neg.ok && neg.error.path).toBe("steps[2].reactants[0].coef");
  });
});

describe("Eyring–Polanyi worked values", () => {
  it("ΔG‡ = 20 kcal/mol at 298.15 K gives k = 1.359e-2 s⁻¹", () => {
    // Derived by hand from CODATA 2018: k_BT/h = 6.21240e12 s⁻¹, RT = 2478.957 J/mol,
    // exp(−83 680/2478.957) = 2.18726e-15 → k = 1.3588e-2 s⁻¹ (t½ ≈ 51 s)
    const r = get(rateConstant(step({ form: "dG", dG: 83680, Tref: 298.15, standardState: "1M" }), 298.15));
    expect(r.k).toBeCloseTo(1.3588e-2, 5);
    expect(r.units).toBe("s⁻¹");
    expect(r.extrapolated).toBe(false);
  });

  it("a one-minute half-life at 298.15 K corresponds to ΔG‡ ≈ 20.1 kcal/mol", () => {
    // Common practice heuristic "~20 kcal/mol ↔ minutes at room temperature"; exact:
    // ΔG‡ = RT·ln((k_BT/h)·60 s/ln 2) = 84.08 kJ/mol = 20.10 kcal/mol (derived from CODATA)
    const c = get(convertBarrier(step({ form: "measured", k: Math.LN2 / 60, T: 298.15 }), 298.15));
    expect(c.dG / 4184).toBeCloseTo(20.096, 3);
  });

  it("k_BT/h(c°)^(1−m) is the ΔG‡ = 0 limit for each molecularity", () => {
    for (const m of [1, 2, 3]) {
      const r = get(rateConstant(step({ form: "dG", dG: 0, Tref: 300, standardState: "1M" }, m), 300));
      expect(r.k / (KB_OVER_H * 300)).toBeCloseTo(1, 12);
    }
    const gas = get(rateConstant(step({ form: "dG", dG: 0, Tref: 298.15, standardState: "1bar" }, 2), 298.15));
    // (c°)^(−1) = 24.79 L/mol for 1 bar at 298.15 K (ideal gas, derived from CODATA R)
    expect(gas.k / (KB_OVER_H * 298.15)).toBeCloseTo(24.7896, 3);
    expect(gas.units).toBe("L mol⁻¹ s⁻¹");
  });
});

describe("standard states", () => {
  it("1 atm → 1 M for a bimolecular step: RT·ln(24.46) = 7.93 kJ/mol = 1.89 kcal/mol", () => {
    // Common practice correction (e.g. the "1.89 kcal/mol" standard-state term at 298.15 K)
    const s = get(standardStateShift("1atm", "1M", 2, 298.15));
    expect(s).toBeLessThan(0); // the barrier is lower in the 1 M state
    expect(-s / 1000).toBeCloseTo(7.926, 3);
    expect(-s / 4184).toBeCloseTo(1.894, 3);
    expect(1 / get(standardConcentration("1atm", 298.15))).toBeCloseTo(24.465, 3);
  });

  it("1 bar → 1 M: RT·ln(24.79) = 7.96 kJ/mol, twice that for a termolecular step, zero for unimolecular", () => {
    // Common practice (1 bar standard state, p° = 1e5 Pa): RT ln(24.79) at 298.15 K
    expect(-get(standardStateShift("1bar", "1M", 2, 298.15)) / 1000).toBeCloseTo(7.9585, 3);
    expect(-get(standardStateShift("1bar", "1M", 3, 298.15)) / 1000).toBeCloseTo(2 * 7.9585, 3);
    expect(get(standardStateShift("1bar", "1M", 1, 298.15))).toBe(0);
    expect(get(standardStateShift("1M", "1bar", 2, 298.15)) / 1000).toBeCloseTo(7.9585, 3);
  });

  it("gives the same k for a barrier stated in 1 bar and the shifted barrier in 1 M", () => {
    const T = 298.15;
    const dGbar = 60e3;
    const shift = get(standardStateShift("1bar", "1M", 2, T));
    const kBar = get(rateConstant(step({ form: "dG", dG: dGbar, Tref: T, standardState: "1bar" }, 2), T)).k;
    const kM = get(rateConstant(step({ form: "dG", dG: dGbar + shift, Tref: T, standardState: "1M" }, 2), T)).k;
    expect(kBar / kM).toBeCloseTo(1, 12);
    const conv = get(convertBarrier(step({ form: "dG", dG: dGbar, Tref: T, standardState: "1bar" }, 2), T));
    expect(conv.standardState).toBe("1M");
    expect(conv.dG).toBeCloseTo(dGbar + shift, 6);
    expect(conv.dGSource).toBeCloseTo(dGbar, 6);
    expect(conv.standardStateShift).toBeCloseTo(shift, 9);
    expect(conv.relations.some((r) => r.includes("(m−1)·RT·ln(c°(1bar)/c°(1M))"))).toBe(true);
  });
});

describe("Wigner tunnelling", () => {
  it("ν‡ = 1000i cm⁻¹ at 298.15 K: hcν/kT = 4.826, κ_W = 1.970", () => {
    // Derived from CODATA 2018: h·c·(1000 cm⁻¹)/(k_B·298.15 K) = 4.8257; κ_W = 1 + 4.8257²/24 = 1.9703
    // (the brief's rounded "4.827 → 1.971" agrees to the third decimal)
    const k = get(wignerKappa(1000, 298.15));
    expect(k).toBeCloseTo(1.9703, 4);
    expect(get(wignerKappa(-1000, 298.15))).toBe(k); // sign convention of QC output accepted
  });

  it("multiplies the Eyring k by κ·κ_W", () => {
    const base = step({ form: "dG", dG: 80e3, Tref: 298.15, standardState: "1M" });
    const k0 = get(rateConstant(base, 298.15)).k;
    const k1 = get(rateConstant({ ...base, kappa: 0.5, imagFreq: 1000 }, 298.15)).k;
    expect(k1 / k0).toBeCloseTo(0.5 * 1.9703, 4);
    const c = get(convertBarrier({ ...base, kappa: 0.5, imagFreq: 1000 }, 298.15));
    expect(c.kappaWigner).toBeCloseTo(1.9703, 4);
    expect(c.dG).toBeCloseTo(80e3, 6); // κ divided out of the reported ΔG‡
  });
});

describe("textbook relations", () => {
  it("Ea = ΔH‡ + RT for a unimolecular step in solution, and A = e·(k_BT/h)·e^(ΔS‡/R)", () => {
    // Laidler (3rd ed.), eq. for liquid-phase unimolecular reactions: Ea = ΔH‡ + RT
    const T = 310;
    const s = step({ form: "dHdS", dH: 90e3, dS: -15, standardState: "1M" });
    const c = get(convertBarrier(s, T));
    expect(c.Ea).toBeCloseTo(90e3 + R_GAS * T, 6);
    expect(c.A / (Math.E * KB_OVER_H * T * Math.exp(-15 / R_GAS))).toBeCloseTo(1, 12);
    expect(c.dH).toBeCloseTo(90e3, 6);
    expect(c.dS).toBeCloseTo(-15, 8);
    expect(numericEa(s, T)).toBeCloseTo(c.Ea, 1);
    expect(c.eaRelation).toBe("Ea = ΔH‡ + RT");
  });

  it("Ea = ΔH‡ + RT in the 1 M state for a bimolecular step too (PΔV‡ ≈ 0 in solution)", () => {
    const T = 298.15;
    const s = step({ form: "dHdS", dH: 50e3, dS: -100, standardState: "1M" }, 2);
    const c = get(convertBarrier(s, T));
    expect(c.Ea).toBeCloseTo(50e3 + R_GAS * T, 6);
    expect(numericEa(s, T)).toBeCloseTo(c.Ea, 1);
  });

  it("thermal form (gas): Ea = ΔH‡ + (1−Δn‡)RT and A = e^(1−Δn‡)·(k_BT/h)·e^(ΔS‡/R)·(c°)^(1−m)", () => {
    // Laidler (3rd ed.) gas-phase TST: Ea = ΔH‡ + (1−Δn‡)RT, A = e^(1−Δn‡)(k_BT/h)e^(ΔS‡/R)
    // in the units of the standard state; the (c°)^(1−m) factor converts to L mol⁻¹ s⁻¹.
    const T = 600;
    for (const m of [1, 2, 3]) {
      const dn = 1 - m;
      const Ea = 120e3;
      const dS = -40;
      const s = step({ form: "thermal", Ea, dS, dn, standardState: "1bar", Tref: T }, m);
      const c = get(convertBarrier({ ...s, targetStandardState: "1bar" }, T));
      const cst = get(standardConcentration("1bar", T));
      expect(c.Ea).toBeCloseTo(Ea, 6);
      expect(c.dH).toBeCloseTo(Ea - (1 - dn) * R_GAS * T, 6);
      expect(c.eaRelation).toBe(m === 1 ? "Ea = ΔH‡ + RT" : `Ea = ΔH‡ + ${m}RT`);
      const Atext = Math.exp(1 - dn) * KB_OVER_H * T * Math.exp(dS / R_GAS) * Math.pow(cst, 1 - m);
      expect(c.A / Atext).toBeCloseTo(1, 10);
      expect(c.dS).toBeCloseTo(dS, 8);
      // the literal thermal formula at Tref
      const kText = Atext * Math.exp(-Ea / (R_GAS * T));
      expect(c.k / kText).toBeCloseTo(1, 10);
      // local Ea by central difference equals the stated relation
      expect(numericEa(s, T)).toBeCloseTo(Ea, 0);
    }
  });

  it("gas-state dHdS: local Ea = ΔH‡ + m·RT, and ΔH‡(1 M) = ΔH‡(1 bar) + (m−1)RT", () => {
    const T = 500;
    const s = step({ form: "dHdS", dH: 70e3, dS: -80, standardState: "1bar" }, 2);
    const c = get(convertBarrier(s, T));
    expect(c.Ea).toBeCloseTo(70e3 + 2 * R_GAS * T, 6);
    expect(c.dH).toBeCloseTo(70e3 + R_GAS * T, 6); // reported in the 1 M state
    expect(c.Ea).toBeCloseTo(c.dH + R_GAS * T, 6); // Ea = ΔH‡ + RT in the 1 M state
    expect(numericEa(s, T)).toBeCloseTo(c.Ea, 0);
  });

  it("local Ea = RT²·d ln k/dT matches a central difference for every form, with tunnelling", () => {
    const forms: [Barrier, number][] = [
      [{ form: "dG", dG: 85e3, Tref: 298.15, standardState: "1M" }, 1],
      [{ form: "dG", dG: 85e3, dH: 70e3, Tref: 298.15, standardState: "1atm" }, 2],
      [{ form: "dHdS", dH: 40e3, dS: -120, standardState: "1bar" }, 3],
      [{ form: "thermal", Ea: 60e3, dS: -90, dn: -1, standardState: "1M", Tref: 298.15 }, 2],
      [{ form: "arrhenius", A: 3e9, Ea: 45e3, n: 1.7, Tref: 298 }, 2],
      [{ form: "measured", k: 2e-3, T: 298.15, Ea: 75e3 }, 1],
      [{ form: "measured", k: 2e-3, T: 298.15 }, 1],
    ];
    for (const [b, m] of forms) {
      const s = step(b, m, { imagFreq: 1200, kappa: 0.8 });
      for (const T of [250, 330, 420]) {
        const c = get(convertBarrier(s, T));
        expect(Math.abs(numericEa(s, T) - c.Ea)).toBeLessThan(0.05);
      }
    }
  });

  it("the same step in every form gives the same k at T", () => {
    const T = 320;
    const dH = 80e3;
    const dS = -20;
    const ref = step({ form: "dHdS", dH, dS, standardState: "1M" });
    const k = get(rateConstant(ref, T)).k;
    const conv = get(convertBarrier(ref, T));
    const forms: Barrier[] = [
      { form: "dG", dG: dH - 300 * dS, dH, Tref: 300, standardState: "1M" },
      { form: "dG", dG: conv.dG, Tref: T, standardState: "1M" },
      { form: "thermal", Ea: dH + R_GAS * 350, dS, dn: 0, standardState: "1M", Tref: 350 },
      { form: "arrhenius", A: conv.A, Ea: conv.Ea },
      { form: "measured", k, T },
      { form: "measured", k, T, Ea: conv.Ea },
    ];
    for (const b of forms) expect(get(rateConstant(step(b), T)).k / k).toBeCloseTo(1, 10);
    // and the dHdS values derived from a gas-state barrier reproduce it in the 1 M state
    const gas = step({ form: "dHdS", dH, dS, standardState: "1bar" }, 2);
    const g = get(convertBarrier(gas, T));
    const back = step({ form: "dG", dG: g.dG, dH: g.dH, Tref: T, standardState: "1M" }, 2);
    expect(get(rateConstant(back, T)).k / g.k).toBeCloseTo(1, 10);
  });

  it("Arrhenius and modified Arrhenius", () => {
    const T = 400;
    const k = get(rateConstant(step({ form: "arrhenius", A: 1e13, Ea: 100e3 }), T)).k;
    expect(k).toBeCloseTo(1e13 * Math.exp(-100e3 / (R_GAS * T)), 0);
    const km = get(rateConstant(step({ form: "arrhenius", A: 2e8, Ea: 30e3, n: 2, Tref: 300 }, 2), T)).k;
    expect(km / (2e8 * (T / 300) ** 2 * Math.exp(-30e3 / (R_GAS * T)))).toBeCloseTo(1, 12);
    const c = get(convertBarrier(step({ form: "arrhenius", A: 2e8, Ea: 30e3, n: 2, Tref: 300 }, 2), T));
    expect(c.Ea).toBeCloseTo(30e3 + 2 * R_GAS * T, 6); // Ea_local = Ea + n·RT
  });

  it("flags extrapolation for ΔG‡-only and k-only forms away from their temperature", () => {
    const dG = step({ form: "dG", dG: 90e3, Tref: 298.15, standardState: "1M" });
    expect(get(rateConstant(dG, 298.15)).extrapolated).toBe(false);
    expect(get(rateConstant(dG, 350)).extrapolated).toBe(true);
    const c = get(convertBarrier(dG, 350));
    expect(c.dG).toBeCloseTo(90e3, 6); // held constant
    expect(c.dS).toBeCloseTo(0, 9);
    const meas = step({ form: "measured", k: 1e-3, T: 300 });
    expect(get(rateConstant(meas, 330)).extrapolated).toBe(true);
    expect(get(rateConstant({ ...meas, barrier: { form: "measured", k: 1e-3, T: 300, Ea: 50e3 } }, 330)).extrapolated).toBe(false);
  });
});

describe("batch path", () => {
  it("matches rateConstant element by element (row-major steps × temperatures)", () => {
    const steps = randomSteps(300, 7);
    const temps = temperatureGrid(13, 260, 420);
    const out = get(rateConstantsBatch(steps, temps));
    expect(out.length).toBe(300 * 13);
    for (let i = 0; i < steps.length; i++) {
      for (let j = 0; j < temps.length; j++) {
        const k = get(rateConstant(steps[i], temps[j])).k;
        expect(Math.abs(out[i * 13 + j] / k - 1)).toBeLessThan(1e-12);
      }
    }
  });

  it("reports the failing step's path", () => {
    const steps = randomSteps(5, 3);
    steps[3] = step({ form: "dG", dG: Number.NaN, Tref: 298.15, standardState: "1M" });
    const r = rateConstantsBatch(steps, [300]);
    expect(!r.ok && r.error.code).toBe("NON_FINITE");
    expect(!r.ok && r.error.path).toBe("steps[3].barrier.dG");
    expect(errCode(rateConstantsBatch(randomSteps(2), []))).toBe("EMPTY_INPUT");
    expect(errCode(rateConstantsBatch(randomSteps(2), [300, -1]))).toBe("TEMPERATURE");
  });
});

describe("bad input → typed errors", () => {
  const ok1 = step({ form: "dG", dG: 80e3, Tref: 298.15, standardState: "1M" });
  const cases: [string, StepKinetics, number, string, string?][] = [
    ["T ≤ 0", ok1, 0, "TEMPERATURE"],
    ["T NaN", ok1, Number.NaN, "NON_FINITE"],
    ["κ ≤ 0", { ...ok1, kappa: 0 }, 300, "KAPPA", "step.kappa"],
    ["κ infinite", { ...ok1, kappa: Infinity }, 300, "NON_FINITE", "step.kappa"],
    ["A ≤ 0", step({ form: "arrhenius", A: -1, Ea: 1e4 }), 300, "PREFACTOR", "step.barrier.A"],
    ["k ≤ 0", step({ form: "measured", k: 0, T: 300 }), 300, "RATE_CONSTANT", "step.barrier.k"],
    ["ΔG‡ absurd", step({ form: "dG", dG: 2000e3, Tref: 300, standardState: "1M" }), 300, "BARRIER_RANGE", "step.barrier.dG"],
    ["ΔG‡ too negative", step({ form: "dG", dG: -60e3, Tref: 300, standardState: "1M" }), 300, "BARRIER_RANGE", "step.barrier.dG"],
    ["ΔS‡ absurd", step({ form: "dHdS", dH: 5e4, dS: 5000, standardState: "1M" }), 300, "BARRIER_RANGE", "step.barrier.dS"],
    ["Tref ≤ 0", step({ form: "dG", dG: 8e4, Tref: -3, standardState: "1M" }), 300, "TEMPERATURE", "step.barrier.Tref"],
    ["unknown state", step({ form: "dG", dG: 8e4, Tref: 300, standardState: "2M" as StandardState }), 300, "UNKNOWN_STANDARD_STATE"],
    ["Δn‡ mismatch", step({ form: "thermal", Ea: 8e4, dS: 0, dn: 0, standardState: "1bar", Tref: 300 }, 2), 300, "THERMAL_DN", "step.barrier.dn"],
    ["frequency absurd", { ...ok1, imagFreq: 1e6 }, 300, "FREQUENCY", "step.imagFreq"],
    [
      "thermal form without Tref (none is assumed)",
      step({ form: "thermal", Ea: 8e4, dS: 0, dn: -1, standardState: "1bar" } as unknown as Barrier, 2),
      300,
      "MISSING_TREF",
      "step.barrier.Tref",
    ],
    ["molecularity 4", { ...ok1, reactants: [{ species: "A", coef: 2 }, { species: "B", coef: 2 }] }, 300, "MOLECULARITY", "step.reactants"],
    ["non-finite coefficient", { ...ok1, reactants: [{ species: "A", coef: Number.NaN }] }, 300, "STOICHIOMETRY", "step.reactants[0].coef"],
    ["bad coefficient", { ...ok1, reactants: [{ species: "A", coef: 0 }] }, 300, "STOICHIOMETRY", "step.reactants[0].coef"],
    ["overflow", step({ form: "dG", dG: -50e3, Tref: 5, standardState: "1M" }), 5, "OVERFLOW"],
    ["unknown form", step({ form: "guess" } as unknown as Barrier), 300, "EMPTY_INPUT", "step.barrier.form"],
  ];
  for (const [name, s, T, code, path] of cases) {
    it(`${name} → ${code}`, () => {
      for (const r of [rateConstant(s, T), convertBarrier(s, T)] as Result<unknown>[]) {
        expect(r.ok).toBe(false);
        if (!r.ok) {
          expect(r.error.code).toBe(code);
          expect(r.error.message.length).toBeGreaterThan(10);
          if (path) expect(r.error.path).toBe(path);
        }
      }
    });
  }

  it("never returns NaN or Infinity for a huge but valid k (underflow reported as 0 with a note)", () => {
    const c = get(convertBarrier(step({ form: "dG", dG: 1000e3, Tref: 50, standardState: "1M" }), 50));
    expect(c.k).toBe(0);
    expect(Number.isFinite(c.lnk)).toBe(true);
    expect(c.notes.some((n) => n.includes("reported as 0"))).toBe(true);
  });
});

describe("derived forms at rounding level", () => {
  // A ΔG‡-only barrier has ΔH‡ = ΔG‡ by construction, so ΔS‡ is exactly zero at its
  // reference temperature (definition ΔG‡ = ΔH‡ − TΔS‡); rounding must not show as 1e-14.
  it("gives ΔS‡ = 0 for a ΔG‡-only bimolecular step at its reference temperature", () => {
    const conv = get(convertBarrier(step({ form: "dG", dG: 55.4e3, Tref: 298.15, standardState: "1M" }, 2), 298.15));
    expect(conv.dS).toBe(0);
  });
});

describe("Eyring law for a zero-order source and a fractional order (k = κ(k_BT/h)(c°)^(1−m)e^(−ΔG‡/RT))", () => {
  const T = 310;
  const dG = 90e3;
  const RT = R_GAS * T;
  const source = (state: StandardState): StepKinetics => ({ id: "src", reactants: [], products: [{ species: "P", coef: 1 }], reversible: false, barrier: { form: "dG", dG, Tref: T, standardState: state } });
  const half = (state: StandardState): StepKinetics => ({ id: "half", reactants: [{ species: "A", coef: 1.5 }], products: [{ species: "P", coef: 1 }], reversible: false, barrier: { form: "dG", dG, Tref: T, standardState: state } });

  it("m = 0: k in mol L⁻¹ s⁻¹ carries one factor c° of the barrier's standard state", () => {
    const c1bar = get(standardConcentration("1bar", T));
    const k = get(rateConstant(source("1bar"), T));
    expect(k.units).toBe("mol L⁻¹ s⁻¹");
    expect(k.k / (KB_OVER_H * T * c1bar * Math.exp(-dG / RT))).toBeCloseTo(1, 12);
    // the same barrier in 1 mol/L gives c° = 1
    expect(get(rateConstant(source("1M"), T)).k / (KB_OVER_H * T * Math.exp(-dG / RT))).toBeCloseTo(1, 12);
  });

  it("m = 0 and m = 1.5: the standard-state shift (m−1)·RT·ln(c°_from/c°_to) reproduces k in the other state", () => {
    for (const [mk, m] of [[source, 0], [half, 1.5]] as const) {
      const shift = get(standardStateShift("1bar", "1M", m, T));
      const c = get(convertBarrier({ ...mk("1bar"), targetStandardState: "1M" }, T));
      expect(c.standardStateShift).toBeCloseTo(shift, 9);
      expect(c.dG).toBeCloseTo(dG + shift, 6);
      // k is the same physical number whichever state the barrier was given in
      const kFrom1M = get(rateConstant(mk("1M"), T));
      const kBack = KB_OVER_H * T * Math.exp(-(dG + shift) / RT);
      expect(kFrom1M.k / (KB_OVER_H * T * Math.exp(-dG / RT))).toBeCloseTo(1, 12);
      expect(c.k / kBack).toBeCloseTo(1, 10);
    }
    expect(get(rateConstant(half("1M"), T)).units).toBe("L^0.5 mol^-0.5 s⁻¹");
  });
});
