/**
 * Validation of a step's barrier and its reduction to one compiled temperature law.
 *
 * Every barrier form reduces exactly to
 *     k(T) = κ · κ_W(T) · exp(a + b·ln T − c/T),     κ_W(T) = 1 + w/T²
 * with k in (mol/L)^(1−m)·s⁻¹, T in K, c in K, w in K². The single-step functions and the
 * batch path both evaluate this law, so they agree to rounding.
 *
 * Reductions (m = molecularity, c°_s(T) the standard concentration of the barrier's state,
 * "gas" = 1 bar or 1 atm where c° = p/(1000·R·T) mol/L):
 *  - dHdS:  k = κ(k_BT/h)(c°)^(1−m)·e^(ΔS‡/R)·e^(−ΔH‡/RT)
 *           → a = ln(k_B/h) + ΔS‡/R [+ (1−m)·ln(p/(1000R)) for gas], b = 1 [m for gas], c = ΔH‡/R.
 *  - dG with ΔH‡: ΔS‡ = (ΔH‡ − ΔG‡)/Tref, then dHdS.
 *  - dG alone: ΔG‡ held constant in its state (ΔH‡ = ΔG‡, ΔS‡ = 0); flagged `extrapolated`
 *           at T ≠ Tref.
 *  - thermal (Ea, ΔS‡, Δn‡ and the Tref at which Ea holds, always stated — Ea alone does not
 *           fix ΔH‡, so no temperature is assumed): ΔH‡ = Ea − (1−Δn‡)·R·Tref, then
 *           dHdS in its standard state. At Tref this is exactly
 *           k = κ(k_BT/h)(c°)^(1−m)·e^(1−Δn‡)·e^(ΔS‡/R)·e^(−Ea/RT). Δn‡ must equal 1−m.
 *           In a gas state the local Arrhenius energy at Tref equals the entered Ea; in the
 *           1 M state it is ΔH‡ + RT = Ea + Δn‡·RT (the ideal-gas PΔV‡ term does not apply in
 *           solution) and a note says so.
 *  - arrhenius: k = A·(T/Tref)^n·e^(−Ea/RT) → a = ln A − n·ln Tref, b = n, c = Ea/R.
 *  - measured with Ea: Arrhenius through (T₀, k₀) → a = ln k₀ + Ea/(R·T₀), b = 0, c = Ea/R.
 *  - measured alone: apparent ΔG‡ = −RT₀·ln(k₀·h/(k_B·T₀)) in the 1 M state held constant
 *           → a = ln(k_B/h), b = 1, c = ΔG‡/R; flagged `extrapolated` at T ≠ T₀.
 * κ and the Wigner factor apply to the transition-state forms (dG, dHdS, thermal) only: an
 * Arrhenius or measured k already contains whatever tunnelling and recrossing there is.
 *
 * Accepted ranges (outside them: BARRIER_RANGE):
 *  ΔG‡ from −50 to 1000 kJ/mol (a negative ΔG‡ arises legitimately only from standard-state
 *  bookkeeping of very fast associations; below −50 kJ/mol is taken as an input error);
 *  ΔH‡ and Ea from −100 to 1000 kJ/mol (negative apparent activation energies are real for
 *  some radical associations); |ΔS‡| ≤ 1000 J/(mol·K); |n| ≤ 20.
 */
import { LN_KB_OVER_H, R_GAS } from "./constants.ts";
import { fail, joinPath, ok, type RateErrorCode } from "./input-checks.ts";
import { isStandardState, standardPressure } from "./standard-state.ts";
import { MAX_IMAG_FREQ_CM, wignerCoefficient } from "./tunnelling.ts";
import type { Barrier, Result, StandardState, StepKinetics, StoichTerm } from "./types.ts";

export const DG_MIN = -50e3; // J/mol
export const DG_MAX = 1000e3; // J/mol
export const DH_MIN = -100e3; // J/mol, also for Ea
export const DH_MAX = 1000e3; // J/mol, also for Ea
export const DS_ABS_MAX = 1000; // J/(mol·K)
export const N_ABS_MAX = 20;

/** The numeric temperature law of a step (see the module comment). */
export interface RateLaw {
  /** Molecularity m: the reaction order Σ reactant coefficients, 0–3 (0 for a source; may be fractional). */
  m: number;
  /** ln k_core(T) = a + b·ln T − c/T, k_core in (mol/L)^(1−m)·s⁻¹. */
  a: number;
  b: number;
  /** K */
  c: number;
  /** ln κ (constant transmission coefficient); 0 for the empirical forms. */
  lnKappa: number;
  /** Wigner coefficient w in K² (κ_W = 1 + w/T²); 0 without a frequency or for empirical forms. */
  wigner: number;
  /** True for the transition-state forms (dG, dHdS, thermal). */
  tst: boolean;
  /** Temperature (K) away from which the temperature dependence is assumed; null when known. */
  anchorT: number | null;
}

/** A RateLaw with its provenance and display text. */
export interface CompiledRate extends RateLaw {
  form: Barrier["form"];
  /** Standard state of the entered barrier; null for the empirical forms (k in mol/L units). */
  sourceStandardState: StandardState | null;
  /** Form-specific relations used to reduce the barrier (display text). */
  relations: string[];
  /** Remarks a person should see (assumptions, validity). */
  notes: string[];
}

/** A validation failure with a path relative to the step ("barrier.dG"). */
interface RelError {
  code: RateErrorCode;
  message: string;
  rel: string;
}
function relErr(code: RateErrorCode, message: string, rel: string): RelError {
  return { code, message, rel };
}
function isFiniteNumber(v: unknown): v is number {
  return typeof v === "number" && Number.isFinite(v);
}
function nonFinite(what: string, v: unknown, rel: string): RelError {
  return relErr("NON_FINITE", `${what} must be a finite number (got ${String(v)}).`, rel);
}
function badTemperature(v: unknown, rel: string): RelError | null {
  if (!isFiniteNumber(v)) return nonFinite("The temperature", v, rel);
  if (v <= 0) return relErr("TEMPERATURE", `The temperature must be above 0 K (got ${v} K).`, rel);
  return null;
}
function badRange(v: unknown, lo: number, hi: number, what: string, unit: string, scale: number, rel: string): RelError | null {
  if (!isFiniteNumber(v)) return nonFinite(what, v, rel);
  if (v < lo || v > hi) {
    return relErr("BARRIER_RANGE", `${what} must lie between ${lo / scale} and ${hi / scale} ${unit} (got ${(v / scale).toPrecision(6)} ${unit}).`, rel);
  }
  return null;
}
const badDG = (v: unknown, rel: string) => badRange(v, DG_MIN, DG_MAX, "ΔG‡", "kJ/mol", 1000, rel);
const badDH = (v: unknown, rel: string, what = "ΔH‡") => badRange(v, DH_MIN, DH_MAX, what, "kJ/mol", 1000, rel);
const badDS = (v: unknown, rel: string) => badRange(v, -DS_ABS_MAX, DS_ABS_MAX, "ΔS‡", "J/(mol·K)", 1, rel);
function badState(s: unknown, rel: string): RelError | null {
  return isStandardState(s) ? null : relErr("UNKNOWN_STANDARD_STATE", `"${String(s)}" is not a known standard state.`, rel);
}

/** Largest stoichiometric coefficient accepted on either side (products of lumped steps may be large). */
export const MAX_COEF = 1000;

/**
 * Σ coefficients of one side (its reaction order, 0–3), or an error with a path relative to
 * `rel`. An empty side is allowed: no reactants is a zero-order source (m = 0), no products a
 * sink. Coefficients are positive finite numbers; fractional ones are allowed (the rate law
 * uses them as orders: v = k·Π c^ν).
 */
function orderOf(terms: StoichTerm[] | undefined, rel: string, what: "reactant" | "product"): number | RelError {
  if (terms === undefined) terms = [];
  if (!Array.isArray(terms)) return relErr("STOICHIOMETRY", `The ${what}s must be a list.`, rel);
  let m = 0;
  for (let i = 0; i < terms.length; i++) {
    const t = terms[i];
    if (!t || typeof t.species !== "string" || t.species === "") {
      return relErr("STOICHIOMETRY", `Each ${what} needs a species id.`, `${rel}[${i}]`);
    }
    if (typeof t.coef !== "number" || !Number.isFinite(t.coef) || t.coef <= 0 || t.coef > MAX_COEF) {
      return relErr("STOICHIOMETRY", `A stoichiometric coefficient must be a positive number up to ${MAX_COEF} (got ${String(t.coef)}).`, `${rel}[${i}].coef`);
    }
    m += t.coef;
  }
  // Rounding of fractional coefficients (1/3 + 1/3 + 1/3) must not push an order of 3 over the limit.
  if (m > 3 + 1e-12) {
    return relErr("MOLECULARITY", `An elementary step has at most three ${what} molecules (the coefficients add up to ${m}).`, rel);
  }
  return m;
}

function toResult<T>(e: RelError, path: string): Result<T> {
  return fail(e.code, e.message, joinPath(path, e.rel));
}

/**
 * Molecularity (reaction order) m = Σ reactant coefficients, 0–3: 0 for a zero-order source
 * (no reactants), fractional when a coefficient is. Each coefficient must be a positive finite
 * number and each species id non-empty. Errors: MOLECULARITY, STOICHIOMETRY.
 */
export function molecularity(step: Pick<StepKinetics, "reactants">, path = "step"): Result<number> {
  const m = orderOf(step?.reactants, "reactants", "reactant");
  return typeof m === "number" ? ok(m) : toResult(m, path);
}

/** Σ coefficients of one side of a step (0–3), checked like molecularity; `path` names the side. */
export function sideOrder(terms: StoichTerm[] | undefined, path: string, what: "reactant" | "product"): Result<number> {
  const m = orderOf(terms, "", what);
  return typeof m === "number" ? ok(m) : toResult(m, path);
}

/** a, b of the transition-state law for ΔS‡ (J/(mol·K)) in `state` and molecularity m. */
function tstCoefficients(law: RateLaw, dS: number, state: StandardState, m: number): void {
  const p = standardPressure(state);
  if (p === null) {
    law.a = LN_KB_OVER_H + dS / R_GAS;
    law.b = 1;
  } else {
    // (c°)^(1−m) = (p/(1000·R))^(1−m) · T^(m−1)
    law.a = LN_KB_OVER_H + dS / R_GAS + (1 - m) * Math.log(p / (1000 * R_GAS));
    law.b = m;
  }
}

/**
 * Validates a step's forward kinetics and fills `law` (no allocation on success).
 * Returns null or an error with a path relative to the step.
 */
function reduceStep(step: StepKinetics, law: RateLaw): RelError | null {
  if (!step || typeof step !== "object") return relErr("EMPTY_INPUT", "A step is missing.", "");
  const m = orderOf(step.reactants, "reactants", "reactant");
  if (typeof m !== "number") return m;
  const b = step.barrier as Barrier | undefined;
  if (!b || typeof b !== "object") return relErr("EMPTY_INPUT", "The step has no barrier.", "barrier");
  law.m = m;
  law.lnKappa = 0;
  law.wigner = 0;
  law.anchorT = null;
  const tst = b.form === "dG" || b.form === "dHdS" || b.form === "thermal";
  law.tst = tst;
  const kappa = step.kappa;
  if (kappa !== undefined) {
    if (!isFiniteNumber(kappa)) return nonFinite("κ", kappa, "kappa");
    if (kappa <= 0) return relErr("KAPPA", `The transmission coefficient κ must be positive (got ${kappa}).`, "kappa");
    if (tst) law.lnKappa = Math.log(kappa);
  }
  const nu = step.imagFreq;
  if (nu !== undefined) {
    if (!isFiniteNumber(nu)) return nonFinite("The imaginary frequency", nu, "imagFreq");
    if (Math.abs(nu) > MAX_IMAG_FREQ_CM) {
      return relErr("FREQUENCY", `The imaginary frequency must be at most ${MAX_IMAG_FREQ_CM} cm⁻¹ in magnitude (got ${nu}).`, "imagFreq");
    }
    if (tst && nu !== 0) law.wigner = wignerCoefficient(nu);
  }

  switch (b.form) {
    case "dHdS": {
      const e = badState(b.standardState, "barrier.standardState") ?? badDH(b.dH, "barrier.dH") ?? badDS(b.dS, "barrier.dS");
      if (e) return e;
      tstCoefficients(law, b.dS, b.standardState, m);
      law.c = b.dH / R_GAS;
      return null;
    }
    case "dG": {
      const e = badState(b.standardState, "barrier.standardState") ?? badDG(b.dG, "barrier.dG") ?? badTemperature(b.Tref, "barrier.Tref");
      if (e) return e;
      if (b.dH !== undefined) {
        const eh = badDH(b.dH, "barrier.dH");
        if (eh) return eh;
        const dS = (b.dH - b.dG) / b.Tref;
        const es = badDS(dS, "barrier.dH");
        if (es) return es;
        tstCoefficients(law, dS, b.standardState, m);
        law.c = b.dH / R_GAS;
        return null;
      }
      tstCoefficients(law, 0, b.standardState, m);
      law.c = b.dG / R_GAS;
      law.anchorT = b.Tref;
      return null;
    }
    case "thermal": {
      const Tref = b.Tref;
      if (Tref === undefined) {
        return relErr("MISSING_TREF", "The thermal form needs the temperature at which Ea was determined (Tref, K); none is assumed.", "barrier.Tref");
      }
      const e =
        badState(b.standardState, "barrier.standardState") ??
        badDH(b.Ea, "barrier.Ea", "Ea") ??
        badDS(b.dS, "barrier.dS") ??
        (isFiniteNumber(b.dn) ? null : nonFinite("Δn‡", b.dn, "barrier.dn")) ??
        badTemperature(Tref, "barrier.Tref");
      if (e) return e;
      if (b.dn !== 1 - m) {
        return relErr("THERMAL_DN", `Δn‡ must be 1 − m = ${1 - m} for a step of molecularity ${m} (got ${b.dn}).`, "barrier.dn");
      }
      tstCoefficients(law, b.dS, b.standardState, m);
      law.c = (b.Ea - (1 - b.dn) * R_GAS * Tref) / R_GAS;
      return null;
    }
    case "arrhenius": {
      const Tref = b.Tref ?? 1;
      const n = b.n ?? 0;
      const e =
        (isFiniteNumber(b.A) ? null : nonFinite("A", b.A, "barrier.A")) ??
        badDH(b.Ea, "barrier.Ea", "Ea") ??
        (isFiniteNumber(n) ? null : nonFinite("The temperature exponent n", n, "barrier.n")) ??
        badTemperature(Tref, "barrier.Tref");
      if (e) return e;
      if (b.A <= 0) return relErr("PREFACTOR", `The pre-exponential factor A must be positive (got ${b.A}).`, "barrier.A");
      if (Math.abs(n) > N_ABS_MAX) {
        return relErr("BARRIER_RANGE", `The temperature exponent n must lie between −${N_ABS_MAX} and ${N_ABS_MAX} (got ${n}).`, "barrier.n");
      }
      law.lnKappa = 0;
      law.wigner = 0;
      law.a = Math.log(b.A) - n * Math.log(Tref);
      law.b = n;
      law.c = b.Ea / R_GAS;
      return null;
    }
    case "measured": {
      const e = (isFiniteNumber(b.k) ? null : nonFinite("The measured rate constant", b.k, "barrier.k")) ?? badTemperature(b.T, "barrier.T");
      if (e) return e;
      if (b.k <= 0) return relErr("RATE_CONSTANT", `A measured rate constant must be positive (got ${b.k}).`, "barrier.k");
      law.lnKappa = 0;
      law.wigner = 0;
      if (b.Ea !== undefined) {
        const ee = badDH(b.Ea, "barrier.Ea", "Ea");
        if (ee) return ee;
        law.a = Math.log(b.k) + b.Ea / (R_GAS * b.T);
        law.b = 0;
        law.c = b.Ea / R_GAS;
        return null;
      }
      const dG = -R_GAS * b.T * (Math.log(b.k) - LN_KB_OVER_H - Math.log(b.T));
      law.a = LN_KB_OVER_H;
      law.b = 1;
      law.c = dG / R_GAS;
      law.anchorT = b.T;
      return null;
    }
    default:
      return relErr("EMPTY_INPUT", `Unknown barrier form "${String((b as { form?: unknown }).form)}".`, "barrier.form");
  }
}

function emptyLaw(): RateLaw {
  return { m: 1, a: 0, b: 0, c: 0, lnKappa: 0, wigner: 0, tst: false, anchorT: null };
}

/** Validates a step and returns its numeric law only (no display text). */
export function rateLaw(step: StepKinetics, path = "step"): Result<RateLaw> {
  const law = emptyLaw();
  const e = reduceStep(step, law);
  return e ? toResult(e, path) : ok(law);
}

/** Laws of many steps as parallel typed arrays (for batch evaluation). */
export interface RateLawTable {
  count: number;
  /** Reaction order of each law (0–3, may be fractional). */
  m: Float64Array;
  /** a + ln κ */
  a: Float64Array;
  b: Float64Array;
  c: Float64Array;
  wigner: Float64Array;
}

/** Validates every step; errors carry the path "steps[i]…". */
export function rateLawTable(steps: StepKinetics[]): Result<RateLawTable> {
  if (!Array.isArray(steps)) return fail("EMPTY_INPUT", "The steps must be a list.", "steps");
  const n = steps.length;
  const t: RateLawTable = {
    count: n,
    m: new Float64Array(n),
    a: new Float64Array(n),
    b: new Float64Array(n),
    c: new Float64Array(n),
    wigner: new Float64Array(n),
  };
  const law = emptyLaw();
  for (let i = 0; i < n; i++) {
    const e = reduceStep(steps[i], law);
    if (e) return toResult(e, `steps[${i}]`);
    t.m[i] = law.m;
    t.a[i] = law.a + law.lnKappa;
    t.b[i] = law.b;
    t.c[i] = law.c;
    t.wigner[i] = law.wigner;
  }
  return ok(t);
}

const EYRING = "k = κ·(k_B T/h)·(c°)^(1−m)·exp(−ΔG‡/RT)";

/**
 * Validates a step's forward kinetics and reduces its barrier to a CompiledRate (law plus
 * display text). `path` prefixes error paths (e.g. "steps[3]").
 */
export function compileStep(step: StepKinetics, path = "step"): Result<CompiledRate> {
  const law = emptyLaw();
  const e = reduceStep(step, law);
  if (e) return toResult(e, path);
  const b = step.barrier;
  const notes: string[] = [];
  if (!law.tst && (step.kappa !== undefined || step.imagFreq !== undefined)) {
    notes.push("κ and the tunnelling correction are not applied to an Arrhenius or measured rate constant, which already contains them.");
  }
  let relations: string[];
  let source: StandardState | null = null;
  switch (b.form) {
    case "dHdS":
      source = b.standardState;
      relations = ["ΔG‡(T) = ΔH‡ − T·ΔS‡", EYRING];
      break;
    case "dG":
      source = b.standardState;
      relations =
        b.dH !== undefined
          ? ["ΔS‡ = (ΔH‡ − ΔG‡(Tref))/Tref", "ΔG‡(T) = ΔH‡ − T·ΔS‡", EYRING]
          : ["ΔG‡(T) = ΔG‡(Tref) (ΔH‡ unknown: ΔS‡ taken as 0, ΔG‡ held constant)", EYRING];
      break;
    case "thermal":
      source = b.standardState;
      relations = [
        `ΔH‡ = Ea − (1−Δn‡)·R·Tref (ideal-gas PΔV‡ = Δn‡·RT), Tref = ${b.Tref} K`,
        "k(Tref) = κ·(k_B T/h)·(c°)^(1−m)·e^(1−Δn‡)·e^(ΔS‡/R)·e^(−Ea/RT)",
        "ΔG‡(T) = ΔH‡ − T·ΔS‡",
        EYRING,
      ];
      if (standardPressure(b.standardState) === null && b.dn !== 0) {
        notes.push(
          "In the 1 mol/L state the local Arrhenius energy is ΔH‡ + RT, which differs from the entered Ea by Δn‡·RT: the ideal-gas PΔV‡ term is a gas-phase relation.",
        );
      }
      break;
    case "arrhenius":
      relations = [(b.n ?? 0) === 0 ? "k = A·exp(−Ea/RT)" : "k = A·(T/Tref)^n·exp(−Ea/RT)"];
      break;
    default:
      relations =
        b.Ea !== undefined
          ? ["k(T) = k(T₀)·exp(−(Ea/R)·(1/T − 1/T₀))"]
          : ["ΔG‡ = −RT₀·ln(k(T₀)·h/(k_B·T₀)) (1 mol/L, κ = 1), held constant", EYRING];
  }
  return ok({ ...law, form: b.form, sourceStandardState: source, relations, notes });
}

/** ln k(T) of a law, including κ and the Wigner factor (unchecked; T > 0). */
export function lnRateCompiled(c: RateLaw, T: number): number {
  let v = c.a + c.b * Math.log(T) - c.c / T + c.lnKappa;
  if (c.wigner !== 0) v += Math.log1p(c.wigner / (T * T));
  return v;
}

/** d ln k/dT in 1/K of a law, exact: b/T + c/T² + d ln κ_W/dT. */
export function dLnRateDT(c: RateLaw, T: number): number {
  let d = c.b / T + c.c / (T * T);
  if (c.wigner !== 0) {
    const x = c.wigner / (T * T);
    d += (-2 * x) / (T * (1 + x));
  }
  return d;
}
