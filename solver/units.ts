/**
 * Unit conversion for user input and display. Internal units of the engine:
 * energy J/mol, entropy J/(mol·K), temperature K, concentration mol/L, time s,
 * rate constants (mol/L)^(1−m)·s⁻¹.
 *
 * Each unit list is a const array of { id, label } so forms can build selectors from it.
 * Every conversion returns Result<number>: a non-finite value, an unknown unit id or a
 * temperature at or below 0 K gives a typed error, never NaN.
 */
import { CAL_TH, C_LIGHT_CM, E_CHARGE, HARTREE_J, H_PLANCK, N_A, P_ATM, R_GAS } from "./constants.ts";
import { checkFinite, checkTemperature, fail, ok } from "./input-checks.ts";
import type { Result } from "./types.ts";

// ---------------------------------------------------------------- energy (molar)

export const ENERGY_UNITS = [
  { id: "kJ/mol", label: "kJ/mol" },
  { id: "kcal/mol", label: "kcal/mol" },
  { id: "J/mol", label: "J/mol" },
  { id: "eV", label: "eV (per particle)" },
  { id: "cm-1", label: "cm⁻¹" },
  { id: "hartree", label: "Eₕ (hartree)" },
] as const;
export type EnergyUnit = (typeof ENERGY_UNITS)[number]["id"];

/**
 * J/mol per one unit. kcal is the thermochemical calorie (4.184 J); eV, cm⁻¹ and hartree
 * are per particle and are multiplied by N_A (cm⁻¹: E = h·c·ν̃ with c in cm/s).
 */
export const ENERGY_FACTORS: Readonly<Record<EnergyUnit, number>> = {
  "J/mol": 1,
  "kJ/mol": 1000,
  "kcal/mol": 1000 * CAL_TH,
  eV: E_CHARGE * N_A,
  "cm-1": H_PLANCK * C_LIGHT_CM * N_A,
  hartree: HARTREE_J * N_A,
};

function lookup<U extends string>(table: Readonly<Record<U, number>>, unit: string, kind: string, path: string): Result<number> {
  if (!Object.prototype.hasOwnProperty.call(table, unit)) {
    return fail("UNKNOWN_UNIT", `"${unit}" is not a known ${kind} unit.`, path);
  }
  return ok(table[unit as U]);
}

/** Energy in `unit` → J/mol. */
export function energyToJPerMol(value: number, unit: EnergyUnit, path = "value"): Result<number> {
  const bad = checkFinite(value, "The energy", path);
  if (bad) return bad;
  const f = lookup(ENERGY_FACTORS, unit, "energy", path);
  return f.ok ? ok(value * f.value) : f;
}

/** Energy in J/mol → `unit`. */
export function energyFromJPerMol(valueJPerMol: number, unit: EnergyUnit, path = "value"): Result<number> {
  const bad = checkFinite(valueJPerMol, "The energy", path);
  if (bad) return bad;
  const f = lookup(ENERGY_FACTORS, unit, "energy", path);
  return f.ok ? ok(valueJPerMol / f.value) : f;
}

// ---------------------------------------------------------------- entropy (molar)

export const ENTROPY_UNITS = [
  { id: "J/(mol K)", label: "J/(mol·K)" },
  { id: "cal/(mol K)", label: "cal/(mol·K) (e.u.)" },
] as const;
export type EntropyUnit = (typeof ENTROPY_UNITS)[number]["id"];

/** J/(mol·K) per one unit (thermochemical calorie). */
export const ENTROPY_FACTORS: Readonly<Record<EntropyUnit, number>> = {
  "J/(mol K)": 1,
  "cal/(mol K)": CAL_TH,
};

/** Entropy in `unit` → J/(mol·K). */
export function entropyToSI(value: number, unit: EntropyUnit, path = "value"): Result<number> {
  const bad = checkFinite(value, "The entropy", path);
  if (bad) return bad;
  const f = lookup(ENTROPY_FACTORS, unit, "entropy", path);
  return f.ok ? ok(value * f.value) : f;
}

/** Entropy in J/(mol·K) → `unit`. */
export function entropyFromSI(valueSI: number, unit: EntropyUnit, path = "value"): Result<number> {
  const bad = checkFinite(valueSI, "The entropy", path);
  if (bad) return bad;
  const f = lookup(ENTROPY_FACTORS, unit, "entropy", path);
  return f.ok ? ok(valueSI / f.value) : f;
}

// ---------------------------------------------------------------- temperature

export const TEMPERATURE_UNITS = [
  { id: "K", label: "K" },
  { id: "degC", label: "°C" },
] as const;
export type TemperatureUnit = (typeof TEMPERATURE_UNITS)[number]["id"];

/** 0 °C in K (exact by definition). */
export const ZERO_CELSIUS_K = 273.15;

/**
 * Highest temperature (K) Saddlebook stores or computes with: far above any condensed-phase or
 * combustion kinetics it is meant for, low enough that no stored value is absurd.
 */
export const MAX_TEMPERATURE_K = 10_000;

/** Temperature in `unit` → K; the result must be above 0 K. */
export function temperatureToK(value: number, unit: TemperatureUnit, path = "value"): Result<number> {
  const bad = checkFinite(value, "The temperature", path);
  if (bad) return bad;
  let T: number;
  if (unit === "K") T = value;
  else if (unit === "degC") T = value + ZERO_CELSIUS_K;
  else return fail("UNKNOWN_UNIT", `"${String(unit)}" is not a known temperature unit.`, path);
  const badT = checkTemperature(T, path);
  return badT ?? ok(T);
}

/** Temperature in K (> 0) → `unit`. */
export function temperatureFromK(T: number, unit: TemperatureUnit, path = "value"): Result<number> {
  const badT = checkTemperature(T, path);
  if (badT) return badT;
  if (unit === "K") return ok(T);
  if (unit === "degC") return ok(T - ZERO_CELSIUS_K);
  return fail("UNKNOWN_UNIT", `"${String(unit)}" is not a known temperature unit.`, path);
}

// ---------------------------------------------------------------- concentration

export const CONCENTRATION_UNITS = [
  { id: "mol/L", label: "mol/L (M)" },
  { id: "mmol/L", label: "mmol/L (mM)" },
  { id: "umol/L", label: "µmol/L (µM)" },
  { id: "molecules/cm3", label: "molecules cm⁻³" },
  { id: "Pa", label: "Pa (partial pressure, ideal gas)" },
  { id: "bar", label: "bar (partial pressure, ideal gas)" },
  { id: "atm", label: "atm (partial pressure, ideal gas)" },
] as const;
export type ConcentrationUnit = (typeof CONCENTRATION_UNITS)[number]["id"];

/** mol/L per one unit, for the units that need no temperature. */
export const CONCENTRATION_FACTORS = {
  "mol/L": 1,
  "mmol/L": 1e-3,
  "umol/L": 1e-6,
  // 1 molecule/cm³ = 1000 molecules/L = 1000/N_A mol/L
  "molecules/cm3": 1000 / N_A,
} as const;

/** Pa per one unit, for partial pressures. */
export const PRESSURE_FACTORS = { Pa: 1, bar: 1e5, atm: P_ATM } as const;

/** True when the unit is a partial pressure (conversion needs a temperature). */
export function isPressureUnit(unit: ConcentrationUnit): unit is keyof typeof PRESSURE_FACTORS {
  return Object.prototype.hasOwnProperty.call(PRESSURE_FACTORS, unit);
}

/**
 * Concentration in `unit` → mol/L. Partial pressures (Pa, bar, atm) are converted for an
 * ideal gas at temperature T (K): c = p/(RT) mol/m³ = p/(1000·RT) mol/L. Negative
 * concentrations are rejected.
 */
export function concentrationToMolPerL(value: number, unit: ConcentrationUnit, T?: number, path = "value"): Result<number> {
  const bad = checkFinite(value, "The concentration", path);
  if (bad) return bad;
  if (value < 0) return fail("NEGATIVE_VALUE", `A concentration cannot be negative (got ${value}).`, path);
  if (isPressureUnit(unit)) {
    if (T === undefined) return fail("TEMPERATURE", "A partial pressure needs a temperature to become a concentration.", path);
    const badT = checkTemperature(T, path);
    if (badT) return badT;
    return ok((value * PRESSURE_FACTORS[unit]) / (1000 * R_GAS * T));
  }
  const f = lookup(CONCENTRATION_FACTORS, unit, "concentration", path);
  return f.ok ? ok(value * f.value) : f;
}

/** Concentration in mol/L → `unit` (partial pressures need T in K, ideal gas). */
export function concentrationFromMolPerL(valueMolPerL: number, unit: ConcentrationUnit, T?: number, path = "value"): Result<number> {
  const bad = checkFinite(valueMolPerL, "The concentration", path);
  if (bad) return bad;
  if (valueMolPerL < 0) return fail("NEGATIVE_VALUE", `A concentration cannot be negative (got ${valueMolPerL}).`, path);
  if (isPressureUnit(unit)) {
    if (T === undefined) return fail("TEMPERATURE", "A partial pressure needs a temperature to become a concentration.", path);
    const badT = checkTemperature(T, path);
    if (badT) return badT;
    return ok((valueMolPerL * 1000 * R_GAS * T) / PRESSURE_FACTORS[unit]);
  }
  const f = lookup(CONCENTRATION_FACTORS, unit, "concentration", path);
  return f.ok ? ok(valueMolPerL / f.value) : f;
}

// ---------------------------------------------------------------- time

export const TIME_UNITS = [
  { id: "s", label: "s" },
  { id: "min", label: "min" },
  { id: "h", label: "h" },
  { id: "d", label: "d" },
] as const;
export type TimeUnit = (typeof TIME_UNITS)[number]["id"];

/** Seconds per one unit. */
export const TIME_FACTORS: Readonly<Record<TimeUnit, number>> = { s: 1, min: 60, h: 3600, d: 86400 };

/** Time in `unit` → s. */
export function timeToSeconds(value: number, unit: TimeUnit, path = "value"): Result<number> {
  const bad = checkFinite(value, "The time", path);
  if (bad) return bad;
  const f = lookup(TIME_FACTORS, unit, "time", path);
  return f.ok ? ok(value * f.value) : f;
}

/** Time in s → `unit`. */
export function timeFromSeconds(seconds: number, unit: TimeUnit, path = "value"): Result<number> {
  const bad = checkFinite(seconds, "The time", path);
  if (bad) return bad;
  const f = lookup(TIME_FACTORS, unit, "time", path);
  return f.ok ? ok(seconds / f.value) : f;
}

// ---------------------------------------------------------------- rate constants

/** Display unit of a rate constant in mol/L units for molecularity m = 1, 2, 3. */
export const RATE_CONSTANT_UNITS = ["s⁻¹", "L mol⁻¹ s⁻¹", "L² mol⁻² s⁻¹"] as const;
/**
 * A rate-constant unit as displayed: one of RATE_CONSTANT_UNITS, "mol L⁻¹ s⁻¹" for a zero-order
 * source (m = 0), or "L^(m−1) mol^(1−m) s⁻¹" written out for a fractional order.
 */
export type RateConstantUnitLabel = string;

/** Largest reaction order (sum of reactant coefficients) the engine accepts. */
export const MAX_ORDER = 3;

/** Reaction order m as display text: 0, 1, 2, 3 or up to four significant digits (0.5, 1.25). */
export function formatOrder(m: number): string {
  return Number.isInteger(m) ? String(m) : String(Number(m.toPrecision(4)));
}

/**
 * Unit of k in mol/L units, (mol/L)^(1−m)·s⁻¹, for any order m from 0 to 3 (unchecked):
 * m = 0 "mol L⁻¹ s⁻¹" (zero-order source), 1 "s⁻¹", 2 "L mol⁻¹ s⁻¹", 3 "L² mol⁻² s⁻¹",
 * fractional m "L^(m−1) mol^(1−m) s⁻¹" with the exponents written out, e.g. m = 1.5 →
 * "L^0.5 mol^-0.5 s⁻¹", m = 0.5 → "mol^0.5 L^-0.5 s⁻¹".
 */
export function rateConstantUnitLabel(m: number): RateConstantUnitLabel {
  if (m === 1 || m === 2 || m === 3) return RATE_CONSTANT_UNITS[m - 1];
  if (m === 0) return "mol L⁻¹ s⁻¹";
  const e = formatOrder(m - 1);
  const f = formatOrder(1 - m);
  return m > 1 ? `L^${e} mol^${f} s⁻¹` : `mol^${f} L^${e} s⁻¹`;
}

/** Unit string of k for order m (0 to 3, fractional allowed): see rateConstantUnitLabel. */
export function rateConstantUnit(m: number, path = "molecularity"): Result<RateConstantUnitLabel> {
  if (typeof m === "number" && Number.isFinite(m) && m >= 0 && m <= MAX_ORDER) return ok(rateConstantUnitLabel(m));
  return fail("MOLECULARITY", `A rate constant exists for reaction orders from 0 to ${MAX_ORDER} only (got ${String(m)}).`, path);
}

/**
 * Rate constant of molecularity m given in (concUnit)^(1−m)·timeUnit⁻¹ → (mol/L)^(1−m)·s⁻¹.
 * Example: 1e-10 cm³ molecule⁻¹ s⁻¹ (m = 2, "molecules/cm3", "s") → 6.022e10 L mol⁻¹ s⁻¹.
 * Partial-pressure units are not accepted here (they need a temperature).
 */
export function rateConstantToSI(
  k: number,
  m: number,
  concUnit: Exclude<ConcentrationUnit, "Pa" | "bar" | "atm">,
  timeUnit: TimeUnit,
  path = "k",
): Result<number> {
  const bad = checkFinite(k, "The rate constant", path);
  if (bad) return bad;
  if (k <= 0) return fail("RATE_CONSTANT", `A rate constant must be positive (got ${k}).`, path);
  const u = rateConstantUnit(m, path);
  if (!u.ok) return u;
  const fc = lookup(CONCENTRATION_FACTORS, concUnit, "concentration", path);
  if (!fc.ok) return fc;
  const ft = lookup(TIME_FACTORS, timeUnit, "time", path);
  if (!ft.ok) return ft;
  return ok((k * Math.pow(fc.value, 1 - m)) / ft.value);
}

/** Rate constant in (mol/L)^(1−m)·s⁻¹ → (concUnit)^(1−m)·timeUnit⁻¹. */
export function rateConstantFromSI(
  kSI: number,
  m: number,
  concUnit: Exclude<ConcentrationUnit, "Pa" | "bar" | "atm">,
  timeUnit: TimeUnit,
  path = "k",
): Result<number> {
  const bad = checkFinite(kSI, "The rate constant", path);
  if (bad) return bad;
  if (kSI <= 0) return fail("RATE_CONSTANT", `A rate constant must be positive (got ${kSI}).`, path);
  const u = rateConstantUnit(m, path);
  if (!u.ok) return u;
  const fc = lookup(CONCENTRATION_FACTORS, concUnit, "concentration", path);
  if (!fc.ok) return fc;
  const ft = lookup(TIME_FACTORS, timeUnit, "time", path);
  if (!ft.ok) return ft;
  return ok((kSI * ft.value) / Math.pow(fc.value, 1 - m));
}
