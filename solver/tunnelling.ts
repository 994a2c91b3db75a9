/**
 * Transmission coefficient and the Wigner tunnelling correction.
 *
 * Wigner (Z. Phys. Chem. B 19, 203 (1932)): κ_W = 1 + (1/24)·(h·ν‡/(k_B·T))², with ν‡ the
 * magnitude of the imaginary frequency of the transition state. With ν̃‡ in cm⁻¹,
 * h·ν‡ = h·c·ν̃‡ with c in cm/s. Written as κ_W = 1 + w/T² with w = (h·c·ν̃‡/k_B)²/24 in K².
 * The correction is a leading-order expansion, reliable only while κ_W stays small
 * (roughly below 2, common practice).
 */
import { C_LIGHT_CM, H_PLANCK, K_B } from "./constants.ts";
import { checkFinite, checkTemperature, fail, ok } from "./input-checks.ts";
import type { Result } from "./types.ts";

/** Largest accepted |ν̃‡|, cm⁻¹ (beyond any real transition state; O–H stretches are ~3700). */
export const MAX_IMAG_FREQ_CM = 10000;

/** w = (h·c·ν̃/k_B)²/24 in K², for |ν̃| in cm⁻¹; κ_W(T) = 1 + w/T². */
export function wignerCoefficient(imagFreqCm: number): number {
  const theta = (H_PLANCK * C_LIGHT_CM * Math.abs(imagFreqCm)) / K_B; // K
  return (theta * theta) / 24;
}

/**
 * Wigner κ_W at T (K) for an imaginary frequency ν̃‡ in cm⁻¹ (the magnitude is used, so a
 * frequency printed as negative by quantum-chemistry output is accepted).
 */
export function wignerKappa(imagFreqCm: number, T: number): Result<number> {
  const bad = checkFinite(imagFreqCm, "The imaginary frequency", "imagFreq");
  if (bad) return bad;
  if (Math.abs(imagFreqCm) > MAX_IMAG_FREQ_CM) {
    return fail("FREQUENCY", `The imaginary frequency must be at most ${MAX_IMAG_FREQ_CM} cm⁻¹ in magnitude (got ${imagFreqCm}).`, "imagFreq");
  }
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  return ok(1 + wignerCoefficient(imagFreqCm) / (T * T));
}

/** u = h·c·ν̃/(k_B·T), dimensionless, for |ν̃| in cm⁻¹ and T in K (unchecked). */
export function reducedFrequency(imagFreqCm: number, T: number): number {
  return (H_PLANCK * C_LIGHT_CM * Math.abs(imagFreqCm)) / (K_B * T);
}
