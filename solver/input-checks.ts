/**
 * Small helpers that build typed EngineError results and check numeric input for the
 * rate-constant, unit and regression modules. Values are checked as given (no units
 * are implied here; each caller states its own).
 */
import type { EngineError, Result } from "./types.ts";

/** Error codes produced by the rate-constant half of the engine. */
export type RateErrorCode =
  | "NON_FINITE" // a number is NaN or ±Infinity
  | "TEMPERATURE" // T ≤ 0 K (or below absolute zero after conversion)
  | "KAPPA" // κ ≤ 0
  | "PREFACTOR" // Arrhenius A ≤ 0
  | "RATE_CONSTANT" // measured k ≤ 0
  | "BARRIER_RANGE" // ΔG‡, ΔH‡, Ea or ΔS‡ outside the accepted range
  | "FREQUENCY" // imaginary frequency out of range
  | "STOICHIOMETRY" // a coefficient that is not a positive finite number, or an empty species id
  | "MOLECULARITY" // Σ reactant coefficients above 3
  | "OPEN_STEP_REVERSIBLE" // a source (no reactants) or sink (no products) marked reversible
  | "THERMAL_DN" // Δn‡ of the thermal form does not match the molecularity
  | "MISSING_THERMO" // reversible step without reaction thermochemistry
  | "MISSING_TREF" // thermal form without the temperature at which Ea was determined
  | "OVERFLOW" // k or K_eq would exceed the double-precision range
  | "UNKNOWN_UNIT" // a unit id that is not in the unit lists
  | "UNKNOWN_STANDARD_STATE"
  | "TOO_FEW_POINTS" // regression with fewer than 3 points
  | "TEMPERATURES_NOT_DISTINCT" // regression with a single temperature
  | "NEGATIVE_VALUE" // a concentration below zero
  | "EMPTY_INPUT"; // empty step or temperature list

export function fail<T>(code: RateErrorCode, message: string, path?: string): Result<T> {
  const error: EngineError = path === undefined ? { code, message } : { code, message, path };
  return { ok: false, error };
}

export function ok<T>(value: T): Result<T> {
  return { ok: true, value };
}

/** Joins a path prefix and a field name: ("steps[2]", "barrier.dG") → "steps[2].barrier.dG". */
export function joinPath(prefix: string, field: string): string {
  if (prefix === "") return field;
  if (field === "") return prefix;
  return field.startsWith("[") ? `${prefix}${field}` : `${prefix}.${field}`;
}

/** Checks that a value is a finite number; returns an error result or null. */
export function checkFinite(value: unknown, what: string, path: string): Result<never> | null {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    return fail("NON_FINITE", `${what} must be a finite number (got ${String(value)}).`, path);
  }
  return null;
}

/** Checks a temperature in K: finite and > 0. */
export function checkTemperature(T: unknown, path: string): Result<never> | null {
  const nf = checkFinite(T, "The temperature", path);
  if (nf) return nf;
  if ((T as number) <= 0) {
    return fail("TEMPERATURE", `The temperature must be above 0 K (got ${String(T)} K).`, path);
  }
  return null;
}
