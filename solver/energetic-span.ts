/**
 * The energetic span model of a catalytic cycle (Kozuch, S.; Shaik, S. "How to Conceptualize
 * Catalytic Cycles? The Energetic Span Model", Acc. Chem. Res. 2011, 44, 101–110).
 *
 * Input: the free energies of the cycle's n intermediates I_0…I_{n−1} and of its n transition
 * states T_0…T_{n−1}, in the order the cycle runs (step j turns I_j into I_{j+1} over T_j; the
 * last step returns to I_0 of the next turnover), and the cycle's reaction free energy ΔG_r
 * (negative for an exergonic cycle). All energies in J/mol, any common zero; T in K.
 *
 * Output:
 * - TOF (s⁻¹) from the exact expression for a cycle of first-order (or pseudo-first-order)
 *   steps at steady state, with every state at its standard-state concentration:
 *     TOF = (k_B T/h) · (1 − e^{ΔG_r/RT}) / Σ_{i,j} e^{(T_i − I_j + δ_ij)/RT},
 *     δ_ij = ΔG_r when transition state i comes before intermediate j in the cycle, else 0.
 *   (Written with I_0 as the zero of the turnover; the paper writes the same expression with the
 *   numerator e^{−ΔG_r/RT} − 1 and the correction on the other pairs, which differs only in the
 *   zero of energy of the turnover: the two are equal.)
 * - the energetic span δE = max_{i,j} (T_i − I_j + δ_ij) and the TOF-determining transition
 *   state (TDTS) and intermediate (TDI) that maximise it, and the approximate
 *   TOF ≈ (k_B T/h)·e^{−δE/RT}, which the exact one approaches for a strongly exergonic cycle;
 * - the degree of TOF control of every state: X_TS,i = Σ_j e^{(T_i−I_j+δ_ij)/RT} / Σ_{i,j} …,
 *   X_I,j = Σ_i e^{(T_i−I_j+δ_ij)/RT} / Σ_{i,j} … (each set sums to 1).
 *
 * Sums are taken in log space, so spans of hundreds of kJ/mol neither overflow nor underflow.
 * Pure: no DB, no React, no Node-only imports.
 */
import { KB_OVER_H, R_GAS } from "./constants.ts";
import type { Result } from "./types.ts";

export interface EnergeticSpanInput {
  /** J/mol, free energies of the intermediates in cycle order (I_0 first). */
  intermediates: number[];
  /** J/mol, free energies of the transition states in cycle order (T_j between I_j and I_{j+1}). */
  transitionStates: number[];
  /** J/mol, reaction free energy of one turnover (negative: exergonic). */
  reactionEnergy: number;
  /** K */
  T: number;
}

export interface EnergeticSpan {
  /** s⁻¹, exact steady-state turnover frequency (negative when the cycle runs backwards, 0 at ΔG_r = 0). */
  tof: number;
  /** s⁻¹, (k_B T/h)·e^{−δE/RT} */
  tofApprox: number;
  /** J/mol, the energetic span */
  span: number;
  /** index into transitionStates of the TOF-determining transition state */
  tdts: number;
  /** index into intermediates of the TOF-determining intermediate */
  tdi: number;
  /** true when the TDTS comes before the TDI in the cycle (δE then includes ΔG_r) */
  tdtsBeforeTdi: boolean;
  /** degree of TOF control of each transition state (sums to 1) */
  controlTS: number[];
  /** degree of TOF control of each intermediate (sums to 1) */
  controlI: number[];
  /** Set when ΔG_r ≥ 0: the cycle has no forward driving force. */
  warning: string | null;
}

function logSumExp(xs: number[]): number {
  const m = Math.max(...xs);
  let s = 0;
  for (const x of xs) s += Math.exp(x - m);
  return m + Math.log(s);
}

export function energeticSpan(input: EnergeticSpanInput): Result<EnergeticSpan> {
  const { intermediates: I, transitionStates: TS, reactionEnergy: dGr, T } = input;
  const n = I.length;
  if (n === 0) return { ok: false, error: { code: "EMPTY_CYCLE", message: "A catalytic cycle needs at least one step." } };
  if (TS.length !== n)
    return { ok: false, error: { code: "CYCLE_SHAPE", message: `A cycle of ${n} intermediates needs ${n} transition states (got ${TS.length}).`, path: "transitionStates" } };
  if (!(T > 0) || !Number.isFinite(T)) return { ok: false, error: { code: "TEMPERATURE", message: "The temperature must be a finite number above 0 K.", path: "T" } };
  const bad = [...I.map((v, i) => [v, `intermediates[${i}]`] as const), ...TS.map((v, i) => [v, `transitionStates[${i}]`] as const), [dGr, "reactionEnergy"] as const].find(([v]) => !Number.isFinite(v));
  if (bad) return { ok: false, error: { code: "NON_FINITE", message: `Every free energy must be a finite number (${bad[1]} is not).`, path: bad[1] } };

  const RT = R_GAS * T;
  // term[i][j] = (T_i − I_j + δ_ij)/RT
  const terms: number[][] = TS.map((t, i) => I.map((g, j) => (t - g + (i < j ? dGr : 0)) / RT));
  const all = terms.flat();
  const lse = logSumExp(all);
  let best = -Infinity, tdts = 0, tdi = 0;
  terms.forEach((row, i) =>
    row.forEach((v, j) => {
      if (v > best) {
        best = v;
        tdts = i;
        tdi = j;
      }
    }),
  );
  const span = best * RT;
  const controlTS = terms.map((row) => Math.exp(logSumExp(row) - lse));
  const controlI = I.map((_, j) => Math.exp(logSumExp(terms.map((row) => row[j])) - lse));
  // 1 − e^{ΔG_r/RT}, kept accurate near ΔG_r = 0
  const drive = -Math.expm1(dGr / RT);
  const prefactor = KB_OVER_H * T;
  const tof = drive === 0 ? 0 : Math.sign(drive) * Math.exp(Math.log(prefactor) + Math.log(Math.abs(drive)) - lse);
  const tofApprox = Math.exp(Math.log(prefactor) - span / RT);
  const warning = dGr >= 0 ? (dGr === 0 ? "The cycle's reaction free energy is zero: it has no driving force and the turnover frequency is zero." : "The cycle's reaction free energy is positive: at standard-state concentrations it runs backwards (negative turnover frequency).") : null;
  return { ok: true, value: { tof, tofApprox, span, tdts, tdi, tdtsBeforeTdi: tdts < tdi, controlTS, controlI, warning } };
}
