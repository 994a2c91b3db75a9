/**
 * Unit conversions. Reference factors: CODATA 2018 energy conversion table (NIST,
 * "energy equivalents"); IUPAC Green Book (3rd ed.) for the thermochemical calorie.
 */
import { describe, expect, it } from "vitest";
import {
  CONCENTRATION_UNITS,
  ENERGY_UNITS,
  concentrationFromMolPerL,
  concentrationToMolPerL,
  energyFromJPerMol,
  energyToJPerMol,
  entropyFromSI,
  entropyToSI,
  rateConstantFromSI,
  rateConstantToSI,
  rateConstantUnit,
  temperatureFromK,
  temperatureToK,
  timeFromSeconds,
  timeToSeconds,
  type EnergyUnit,
} from "../../solver/units.ts";
import type { Result } from "../../solver/types.ts";

function val(r: Result<number | string>): number | string {
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
}
function num(r: Result<number>): number {
  return val(r) as number;
}

describe("energy", () => {
  it("converts kcal/mol with the thermochemical calorie", () => {
    // IUPAC Green Book: 1 cal_th = 4.184 J (exact)
    expect(num(energyToJPerMol(1, "kcal/mol"))).toBe(4184);
    expect(num(energyFromJPerMol(4184, "kcal/mol"))).toBe(1);
    expect(num(energyToJPerMol(2.5, "kJ/mol"))).toBe(2500);
  });

  it("converts eV per particle to 96.485 332 kJ/mol", () => {
    // CODATA 2018: 1 eV ↔ 96.485 332 12 kJ/mol (F·1 V)
    expect(num(energyToJPerMol(1, "eV")) / 1000).toBeCloseTo(96.48533212, 7);
  });

  it("converts cm⁻¹ to 11.962 66 J/mol", () => {
    // CODATA 2018: 1 cm⁻¹ ↔ 1.239 841 984e-4 eV → × 96 485.332 = 11.962 657 J/mol
    expect(num(energyToJPerMol(1, "cm-1"))).toBeCloseTo(11.962657, 5);
  });

  it("converts the hartree to 2625.4996 kJ/mol, 27.211 386 eV and 219 474.63 cm⁻¹", () => {
    // CODATA 2018: E_h = 27.211 386 245 988 eV = 219 474.631 363 20 cm⁻¹; 2625.499 639 kJ/mol
    const j = num(energyToJPerMol(1, "hartree"));
    expect(j / 1000).toBeCloseTo(2625.499639, 5);
    expect(num(energyFromJPerMol(j, "eV"))).toBeCloseTo(27.211386245988, 9);
    expect(num(energyFromJPerMol(j, "cm-1"))).toBeCloseTo(219474.6313632, 3);
  });

  it("converts 1 kcal/mol to 349.755 cm⁻¹", () => {
    // Common practice conversion (1 kcal/mol = 349.755 cm⁻¹), recomputed from CODATA 2018
    expect(num(energyFromJPerMol(4184, "cm-1"))).toBeCloseTo(349.755, 3);
  });

  it("round-trips every listed unit", () => {
    for (const u of ENERGY_UNITS) {
      const j = num(energyToJPerMol(12.345, u.id));
      expect(num(energyFromJPerMol(j, u.id))).toBeCloseTo(12.345, 10);
      expect(typeof u.label).toBe("string");
    }
  });

  it("rejects non-finite values and unknown units with typed errors", () => {
    const a = energyToJPerMol(Number.NaN, "kJ/mol", "barrier.dG");
    expect(a.ok).toBe(false);
    if (!a.ok) {
      expect(a.error.code).toBe("NON_FINITE");
      expect(a.error.path).toBe("barrier.dG");
    }
    const b = energyToJPerMol(1, "furlong" as EnergyUnit);
    expect(!b.ok && b.error.code).toBe("UNKNOWN_UNIT");
    const c = energyFromJPerMol(Infinity, "eV");
    expect(!c.ok && c.error.code).toBe("NON_FINITE");
  });
});

describe("entropy, temperature, time", () => {
  it("converts entropy units (cal/(mol·K), e.u.)", () => {
    expect(num(entropyToSI(-10, "cal/(mol K)"))).toBeCloseTo(-41.84, 12);
    expect(num(entropyFromSI(41.84, "cal/(mol K)"))).toBeCloseTo(10, 12);
  });

  it("converts °C with 0 °C = 273.15 K and refuses T ≤ 0 K", () => {
    // SI Brochure (9th ed.): T/K = t/°C + 273.15
    expect(num(temperatureToK(25, "degC"))).toBeCloseTo(298.15, 12);
    expect(num(temperatureFromK(298.15, "degC"))).toBeCloseTo(25, 12);
    const r = temperatureToK(-300, "degC");
    expect(!r.ok && r.error.code).toBe("TEMPERATURE");
    const z = temperatureToK(0, "K");
    expect(!z.ok && z.error.code).toBe("TEMPERATURE");
  });

  it("converts time units", () => {
    expect(num(timeToSeconds(1.5, "h"))).toBe(5400);
    expect(num(timeToSeconds(2, "d"))).toBe(172800);
    expect(num(timeFromSeconds(90, "min"))).toBe(1.5);
  });
});

describe("concentration", () => {
  it("converts molar sub-units and molecules/cm³", () => {
    expect(num(concentrationToMolPerL(250, "mmol/L"))).toBeCloseTo(0.25, 14);
    expect(num(concentrationToMolPerL(3, "umol/L"))).toBeCloseTo(3e-6, 18);
    // 1 mol/L = N_A/1000 molecules cm⁻³ = 6.022 140 76e20 (from CODATA 2018 N_A)
    expect(num(concentrationFromMolPerL(1, "molecules/cm3"))).toBeCloseTo(6.02214076e20, -8);
  });

  it("converts an ideal-gas partial pressure at T: 1 bar at 298.15 K is 0.040 34 mol/L", () => {
    // p/(RT) = 1e5 / (8.314 462 618 × 298.15) mol/m³ = 40.34 mol/m³ (ideal gas law)
    expect(num(concentrationToMolPerL(1, "bar", 298.15))).toBeCloseTo(0.0403393, 6);
    // 1 atm at 298.15 K: 1/c = 24.465 L/mol (the familiar 24.46 L molar volume, common practice)
    expect(1 / num(concentrationToMolPerL(1, "atm", 298.15))).toBeCloseTo(24.4654, 3);
    expect(num(concentrationFromMolPerL(0.0403393, "Pa", 298.15))).toBeCloseTo(1e5, -1);
  });

  it("needs a temperature for a pressure and refuses negative concentrations", () => {
    const a = concentrationToMolPerL(1, "atm");
    expect(!a.ok && a.error.code).toBe("TEMPERATURE");
    const b = concentrationToMolPerL(-1, "mol/L");
    expect(!b.ok && b.error.code).toBe("NEGATIVE_VALUE");
    const c = concentrationToMolPerL(1, "bar", -5);
    expect(!c.ok && c.error.code).toBe("TEMPERATURE");
  });

  it("lists every unit with an id and a label", () => {
    expect(CONCENTRATION_UNITS.map((u) => u.id)).toContain("molecules/cm3");
  });
});

describe("rate constant units", () => {
  it("names the unit for m = 1, 2, 3 and refuses others", () => {
    expect(val(rateConstantUnit(1))).toBe("s⁻¹");
    expect(val(rateConstantUnit(2))).toBe("L mol⁻¹ s⁻¹");
    expect(val(rateConstantUnit(3))).toBe("L² mol⁻² s⁻¹");
    const r = rateConstantUnit(4);
    expect(!r.ok && r.error.code).toBe("MOLECULARITY");
  });

  it("converts cm³ molecule⁻¹ s⁻¹ to L mol⁻¹ s⁻¹ (× N_A/1000)", () => {
    // Common practice gas-kinetics conversion: 1e-10 cm³ molecule⁻¹ s⁻¹ = 6.022e10 L mol⁻¹ s⁻¹
    expect(num(rateConstantToSI(1e-10, 2, "molecules/cm3", "s"))).toBeCloseTo(6.02214076e10, -2);
    expect(num(rateConstantFromSI(6.02214076e10, 2, "molecules/cm3", "s"))).toBeCloseTo(1e-10, 20);
  });

  it("converts M⁻¹ min⁻¹ and mM-based units", () => {
    expect(num(rateConstantToSI(60, 2, "mol/L", "min"))).toBeCloseTo(1, 14);
    // 1 mM⁻¹ s⁻¹ = 1000 M⁻¹ s⁻¹
    expect(num(rateConstantToSI(1, 2, "mmol/L", "s"))).toBeCloseTo(1000, 10);
    expect(num(rateConstantToSI(5, 1, "umol/L", "h"))).toBeCloseTo(5 / 3600, 14);
  });
});

describe("rate-constant units for any reaction order", () => {
  it("names (mol/L)^(1−m)·s⁻¹ for a source (m = 0) and fractional orders", () => {
    expect(val(rateConstantUnit(0))).toBe("mol L⁻¹ s⁻¹");
    expect(val(rateConstantUnit(1.5))).toBe("L^0.5 mol^-0.5 s⁻¹");
    expect(val(rateConstantUnit(0.5))).toBe("mol^0.5 L^-0.5 s⁻¹");
    expect(!rateConstantUnit(-1).ok).toBe(true);
  });
  it("converts a zero-order k: 1 mmol L⁻¹ min⁻¹ = 1e-3/60 mol L⁻¹ s⁻¹ (definition of the units)", () => {
    expect(val(rateConstantToSI(1, 0, "mmol/L", "min")) as number).toBeCloseTo(1e-3 / 60, 18);
    // m = 1.5: (mmol/L)^(−0.5) = (1e-3 mol/L)^(−0.5) → k·1e-3^(−0.5)
    expect(val(rateConstantToSI(1, 1.5, "mmol/L", "s")) as number).toBeCloseTo(1e-3 ** -0.5, 9);
  });
});
