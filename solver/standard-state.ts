/**
 * Standard states and the conversion of activation free energies between them.
 *
 * c° is the standard concentration of a standard state, in mol/L:
 *   "1M"   → 1 mol/L (solution);
 *   "1bar" → p°/(RT) = 1e5 Pa /(R·T) mol/m³ = 1e5/(1000·R·T) mol/L (ideal gas);
 *   "1atm" → 101325 Pa /(1000·R·T) mol/L (ideal gas).
 *
 * A rate constant in (mol/L)^(1−m)·s⁻¹ is the same physical number whatever standard
 * state its barrier refers to; requiring k = κ(k_BT/h)(c°_a)^(1−m)e^(−ΔG‡_a/RT)
 * = κ(k_BT/h)(c°_b)^(1−m)e^(−ΔG‡_b/RT) gives
 *   ΔG‡_b − ΔG‡_a = (m−1)·RT·ln(c°_a/c°_b).
 * Example (common practice): 1 atm → 1 M, m = 2, 298.15 K: RT·ln(1/24.46) = −7.93 kJ/mol
 * (−1.89 kcal/mol): the barrier in the 1 M state is lower by RT·ln(24.46).
 */
import { P_ATM, P_STANDARD, R_GAS } from "./constants.ts";
import { checkTemperature, fail, ok } from "./input-checks.ts";
import type { Result, StandardState } from "./types.ts";

export const STANDARD_STATES = [
  { id: "1M", label: "1 mol/L (solution)" },
  { id: "1bar", label: "1 bar (ideal gas)" },
  { id: "1atm", label: "1 atm (ideal gas)" },
] as const satisfies readonly { id: StandardState; label: string }[];

/** Pressure in Pa of a gas standard state, or null for the 1 mol/L solution state. */
export function standardPressure(state: StandardState): number | null {
  if (state === "1bar") return P_STANDARD;
  if (state === "1atm") return P_ATM;
  return null;
}

export function isStandardState(x: unknown): x is StandardState {
  return x === "1M" || x === "1bar" || x === "1atm";
}

/**
 * c° in mol/L of `state` at T (K). Unchecked fast path: T must be finite and > 0 and the
 * state valid (use standardConcentration for checked input).
 */
export function standardConcentrationUnchecked(state: StandardState, T: number): number {
  const p = standardPressure(state);
  return p === null ? 1 : p / (1000 * R_GAS * T);
}

/**
 * T·d ln c°/dT of a standard state: 0 for "1M", −1 for the ideal-gas states (c° ∝ 1/T).
 * It enters the local Arrhenius energy: (1−m)·RT·g is added to Ea.
 */
export function standardStateTExponent(state: StandardState): number {
  return standardPressure(state) === null ? 0 : -1;
}

/** c° in mol/L of `state` at T (K), checked. */
export function standardConcentration(state: StandardState, T: number, path = "standardState"): Result<number> {
  if (!isStandardState(state)) return fail("UNKNOWN_STANDARD_STATE", `"${String(state)}" is not a known standard state.`, path);
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  return ok(standardConcentrationUnchecked(state, T));
}

/** Unchecked: ΔG‡_to − ΔG‡_from in J/mol = (m−1)·RT·ln(c°_from/c°_to). */
export function standardStateShiftUnchecked(from: StandardState, to: StandardState, m: number, T: number): number {
  if (from === to || m === 1) return 0;
  return (m - 1) * R_GAS * T * Math.log(standardConcentrationUnchecked(from, T) / standardConcentrationUnchecked(to, T));
}

/**
 * The shift of an activation free energy (J/mol) when its standard state changes from
 * `from` to `to`, for a step of molecularity (reaction order) m at T (K), 0 ≤ m ≤ 3:
 *   ΔG‡_to − ΔG‡_from = (m−1)·RT·ln(c°_from/c°_to).
 * It is zero for unimolecular steps; for a zero-order source (m = 0) it has the sign of a
 * unimolecular step's opposite, and a fractional order scales it in proportion (the same
 * (c°)^(1−m) factor of the Eyring law, common practice). The same formula with (m−1) replaced by −Δν converts
 * a reaction free energy ΔG°rxn (see detailed-balance.ts).
 */
export function standardStateShift(from: StandardState, to: StandardState, m: number, T: number): Result<number> {
  if (!isStandardState(from)) return fail("UNKNOWN_STANDARD_STATE", `"${String(from)}" is not a known standard state.`, "from");
  if (!isStandardState(to)) return fail("UNKNOWN_STANDARD_STATE", `"${String(to)}" is not a known standard state.`, "to");
  if (!(typeof m === "number" && m >= 0 && m <= 3)) return fail("MOLECULARITY", `The reaction order must lie between 0 and 3 (got ${String(m)}).`, "molecularity");
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  return ok(standardStateShiftUnchecked(from, to, m, T));
}

/** One-line statement of a standard-state conversion, with numbers, for display. */
export function describeStandardStateShift(from: StandardState, to: StandardState, m: number, T: number): string {
  const cFrom = standardConcentrationUnchecked(from, T);
  const cTo = standardConcentrationUnchecked(to, T);
  const shift = standardStateShiftUnchecked(from, to, m, T);
  return (
    `ΔG‡(${to}) = ΔG‡(${from}) + (m−1)·RT·ln(c°(${from})/c°(${to})); ` +
    `c°(${from}) = ${cFrom.toPrecision(5)} mol/L, c°(${to}) = ${cTo.toPrecision(5)} mol/L, m = ${m}, ` +
    `T = ${T} K: shift = ${(shift / 1000).toFixed(3)} kJ/mol`
  );
}
