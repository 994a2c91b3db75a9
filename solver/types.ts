/**
 * Shared types of the kinetics engine. Internal units are SI-molar throughout:
 * energies J/mol, entropies J/(mol·K), temperatures K, time s, concentrations mol/L,
 * frequencies cm⁻¹ (wavenumbers, as quantum-chemistry output gives them).
 * Unit conversion for user input happens in solver/units.ts before values reach here.
 */

/** Standard state a barrier or reaction free energy refers to. */
export type StandardState =
  | "1M" // solution, c° = 1 mol/L
  | "1bar" // ideal gas at 1 bar (c° = p°/RT)
  | "1atm"; // ideal gas at 1 atm (c° = 101325 Pa / RT)

/** One of the barrier forms a step may carry (see DESIGN.md, "Barrier forms"). */
export type Barrier =
  | {
      form: "dG"; // ΔG‡ at a reference temperature
      dG: number; // J/mol
      Tref: number; // K
      dH?: number; // J/mol, optional: with it ΔS‡ = (ΔH‡ − ΔG‡)/Tref and k(T) follows
      standardState: StandardState;
    }
  | {
      form: "dHdS"; // ΔH‡ and ΔS‡
      dH: number; // J/mol
      dS: number; // J/(mol·K)
      standardState: StandardState;
    }
  | {
      form: "thermal"; // Ea, ΔS‡, Δn‡ (ideal-gas PΔV‡ treatment)
      Ea: number; // J/mol
      dS: number; // J/(mol·K)
      dn: number; // Δn‡: 0 unimolecular, −1 bimolecular, −2 termolecular
      standardState: StandardState;
      /** K, temperature at which Ea was determined (ΔH‡ = Ea − (1−Δn‡)·R·Tref); required, never assumed. */
      Tref: number;
    }
  | {
      form: "arrhenius"; // k = A·(T/Tref)^n·exp(−Ea/RT)
      A: number; // (mol/L)^(1−m) s⁻¹
      Ea: number; // J/mol
      n?: number; // temperature exponent, default 0
      Tref?: number; // K, default 1 (so A·T^n)
    }
  | {
      form: "measured"; // a measured k at one temperature
      k: number; // (mol/L)^(1−m) s⁻¹
      T: number; // K
      Ea?: number; // J/mol, optional: with it k(T) follows Arrhenius through (T, k)
    };

/** Thermochemistry of the overall step, for reverse rates by detailed balance. */
export type ReactionThermo =
  | { form: "dG"; dG: number; Tref: number; dH?: number; standardState: StandardState } // ΔG°rxn J/mol
  | { form: "dHdS"; dH: number; dS: number; standardState: StandardState }; // J/mol, J/(mol·K)

/** A stoichiometric term: species id and its coefficient (positive integer, usually 1–3). */
export interface StoichTerm {
  species: string;
  coef: number;
}

/** Everything the engine needs to know about one elementary step. */
export interface StepKinetics {
  id: string;
  reactants: StoichTerm[];
  products: StoichTerm[];
  reversible: boolean;
  barrier: Barrier;
  /** Required when reversible. */
  thermo?: ReactionThermo;
  /** Transmission coefficient κ, default 1. */
  kappa?: number;
  /** Imaginary frequency of the transition state in cm⁻¹ (magnitude), for the Wigner correction. */
  imagFreq?: number;
  /** Standard state the rate constant is wanted in; default "1M" (solution). */
  targetStandardState?: StandardState;
}

export interface Species {
  id: string;
  label?: string;
  formula?: string; // e.g. "C6H5Br", "Cu(NH3)4+2"
  charge?: number;
  phase?: "solution" | "gas" | "solid" | "liquid";
}

/** A typed failure from the engine: never NaN, never a throw across the API boundary. */
export interface EngineError {
  code: string; // e.g. "EMPTY_MECHANISM", "UNKNOWN_SPECIES", "MOLECULARITY", "NON_FINITE", "BUDGET"
  message: string; // one clear sentence for a person
  path?: string; // where in the input, e.g. "steps[3].barrier.dG"
}

export type Result<T> = { ok: true; value: T } | { ok: false; error: EngineError };
