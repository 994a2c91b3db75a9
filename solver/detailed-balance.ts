/**
 * Reverse rate constants by detailed balance.
 *
 * The reaction free energy ΔG°rxn (J/mol) refers to the standard state of the step's
 * ReactionThermo. The dimensionless K° = exp(−ΔG°rxn/RT) and the concentration equilibrium
 * constant in mol/L units is
 *     K_c = K°·(c°)^(Δν),   Δν = Σν_products − Σν_reactants,   K_c in (mol/L)^Δν,
 * because K° = Π(c_i/c°)^ν_i = K_c·(c°)^(−Δν). Then k_rev = k_fwd/K_c, in
 * (mol/L)^(1−m_products)·s⁻¹. Check: for A + B ⇌ AB in a 1 bar state (c° = 0.0403 mol/L at
 * 298.15 K), K° = 1 gives K_c = 1/c° = 24.8 L/mol, the familiar ideal-gas result; and k_rev
 * equals the Eyring k of the reverse barrier ΔG‡_fwd − ΔG°rxn (tests check both).
 *
 * ΔG°rxn(T) = ΔH° − T·ΔS°. A "dG" thermo with ΔH° gives ΔS° = (ΔH° − ΔG°)/Tref; without ΔH°
 * ΔG°rxn is held constant and the result is flagged `extrapolated` at T ≠ Tref.
 * Accepted ranges: |ΔG°|, |ΔH°| ≤ 2000 kJ/mol, |ΔS°| ≤ 2000 J/(mol·K).
 */
import { R_GAS } from "./constants.ts";
import { compileStep, lnRateCompiled, rateLawTable, sideOrder, type CompiledRate, type RateLawTable } from "./barrier-forms.ts";
import { checkFinite, checkTemperature, fail, joinPath, ok } from "./input-checks.ts";
import { LN_MAX_DOUBLE, evaluateLawTable } from "./rates.ts";
import { isStandardState, standardPressure } from "./standard-state.ts";
import { rateConstantUnitLabel, type RateConstantUnitLabel } from "./units.ts";
import type { ReactionThermo, Result, StandardState, StepKinetics } from "./types.ts";

export const THERMO_ENERGY_ABS_MAX = 2000e3; // J/mol
export const THERMO_ENTROPY_ABS_MAX = 2000; // J/(mol·K)
const ANCHOR_TOLERANCE_K = 1e-6;

/** ln K_c(T) = alpha + beta·ln T − gamma/T, K_c in (mol/L)^Δν. */
export interface CompiledThermo {
  alpha: number;
  beta: number;
  /** K */
  gamma: number;
  /** Σν_products − Σν_reactants */
  deltaNu: number;
  /** Σ product coefficients (molecularity of the reverse step). */
  productOrder: number;
  standardState: StandardState;
  /** ΔH° (J/mol) and ΔS° (J/(mol·K)) in `standardState`. */
  dH: number;
  dS: number;
  /** K; non-null when ΔG° is held constant away from this temperature. */
  anchorT: number | null;
}

function rangeCheck(v: number, max: number, what: string, unit: string, scale: number, path: string): Result<never> | null {
  const nf = checkFinite(v, what, path);
  if (nf) return nf;
  if (Math.abs(v) > max) {
    return fail("BARRIER_RANGE", `${what} must lie between −${max / scale} and ${max / scale} ${unit} (got ${(v / scale).toPrecision(6)} ${unit}).`, path);
  }
  return null;
}

/** Validates a step's products and thermochemistry and reduces ln K_c(T) to a compiled law. */
export function compileThermo(step: StepKinetics, path = "step"): Result<CompiledThermo> {
  const rOrder = sideOrder(step.reactants, joinPath(path, "reactants"), "reactant");
  if (!rOrder.ok) return rOrder;
  const pOrder = sideOrder(step.products, joinPath(path, "products"), "product");
  if (!pOrder.ok) return pOrder;
  if (rOrder.value === 0 || pOrder.value === 0) {
    return fail(
      "OPEN_STEP_REVERSIBLE",
      "A source (no reactants) or a sink (no products) exchanges matter with the surroundings and has no equilibrium constant; make it irreversible, and enter any return flow as a step of its own.",
      joinPath(path, "reversible"),
    );
  }
  const th = step.thermo as ReactionThermo | undefined;
  const tp = joinPath(path, "thermo");
  if (!th || typeof th !== "object") {
    return fail("MISSING_THERMO", "A reversible step needs its reaction free energy (ΔG°rxn, or ΔH° and ΔS°) for detailed balance.", tp);
  }
  if (!isStandardState(th.standardState)) {
    return fail("UNKNOWN_STANDARD_STATE", `"${String(th.standardState)}" is not a known standard state.`, joinPath(tp, "standardState"));
  }
  let dH: number;
  let dS: number;
  let anchorT: number | null = null;
  if (th.form === "dHdS") {
    const e =
      rangeCheck(th.dH, THERMO_ENERGY_ABS_MAX, "ΔH°rxn", "kJ/mol", 1000, joinPath(tp, "dH")) ??
      rangeCheck(th.dS, THERMO_ENTROPY_ABS_MAX, "ΔS°rxn", "J/(mol·K)", 1, joinPath(tp, "dS"));
    if (e) return e;
    dH = th.dH;
    dS = th.dS;
  } else if (th.form === "dG") {
    const e =
      rangeCheck(th.dG, THERMO_ENERGY_ABS_MAX, "ΔG°rxn", "kJ/mol", 1000, joinPath(tp, "dG")) ??
      checkTemperature(th.Tref, joinPath(tp, "Tref"));
    if (e) return e;
    if (th.dH !== undefined) {
      const eh = rangeCheck(th.dH, THERMO_ENERGY_ABS_MAX, "ΔH°rxn", "kJ/mol", 1000, joinPath(tp, "dH"));
      if (eh) return eh;
      dH = th.dH;
      dS = (th.dH - th.dG) / th.Tref;
      const es = rangeCheck(dS, THERMO_ENTROPY_ABS_MAX, "ΔS°rxn", "J/(mol·K)", 1, joinPath(tp, "dH"));
      if (es) return es;
    } else {
      dH = th.dG;
      dS = 0;
      anchorT = th.Tref;
    }
  } else {
    return fail("EMPTY_INPUT", `Unknown thermochemistry form "${String((th as { form?: unknown }).form)}".`, joinPath(tp, "form"));
  }
  const deltaNu = pOrder.value - rOrder.value;
  const p = standardPressure(th.standardState);
  // ln K_c = −ΔH°/RT + ΔS°/R + Δν·ln c°(T); gas: ln c° = ln(p/(1000R)) − ln T
  const alpha = dS / R_GAS + (p === null ? 0 : deltaNu * Math.log(p / (1000 * R_GAS)));
  const beta = p === null ? 0 : -deltaNu;
  return ok({ alpha, beta, gamma: dH / R_GAS, deltaNu, productOrder: pOrder.value, standardState: th.standardState, dH, dS, anchorT });
}

/** ln K_c at T (K) of a compiled thermo law (unchecked). */
export function lnEquilibriumCompiled(t: CompiledThermo, T: number): number {
  return t.alpha + t.beta * Math.log(T) - t.gamma / T;
}

/** The reverse-step law: ln k_rev = ln k_fwd − ln K_c, molecularity = product order. */
export function reverseLaw(fwd: CompiledRate, th: CompiledThermo): CompiledRate {
  return {
    ...fwd,
    m: th.productOrder,
    a: fwd.a - th.alpha,
    b: fwd.b - th.beta,
    c: fwd.c - th.gamma,
    anchorT: fwd.anchorT ?? th.anchorT,
    relations: [...fwd.relations, "k_rev = k_fwd/K_c"],
  };
}

/** Display unit of K_c in (mol/L)^Δν. */
export function equilibriumConstantUnit(deltaNu: number): string {
  if (deltaNu === 0) return "dimensionless";
  const n = Math.abs(deltaNu);
  const sup = n === 1 ? "" : n === 2 ? "²" : n === 3 ? "³" : `^${n}`;
  const supNeg = n === 1 ? "⁻¹" : n === 2 ? "⁻²" : n === 3 ? "⁻³" : `^-${n}`;
  return deltaNu > 0 ? `mol${sup} L${supNeg}` : `L${sup} mol${supNeg}`;
}

export interface EquilibriumValue {
  /** (mol/L)^Δν */
  Kc: number;
  lnKc: number;
  /** Dimensionless K° = exp(−ΔG°rxn/RT) in the thermo's standard state. */
  K0: number;
  /** ΔG°rxn at T in the thermo's standard state, J/mol. */
  dGrxn: number;
  deltaNu: number;
  standardState: StandardState;
  units: string;
  extrapolated: boolean;
}

export interface ReverseRateValue extends EquilibriumValue {
  /** (mol/L)^(1−m_fwd)·s⁻¹ */
  kFwd: number;
  /** (mol/L)^(1−m_products)·s⁻¹ */
  kRev: number;
  lnkRev: number;
  unitsFwd: RateConstantUnitLabel;
  unitsRev: RateConstantUnitLabel;
  relations: string[];
}

function equilibriumFromCompiled(th: CompiledThermo, T: number, path: string): Result<EquilibriumValue> {
  const lnKc = lnEquilibriumCompiled(th, T);
  const dGrxn = th.dH - T * th.dS;
  const lnK0 = -dGrxn / (R_GAS * T);
  if (!(Math.abs(lnKc) < LN_MAX_DOUBLE) || !(Math.abs(lnK0) < LN_MAX_DOUBLE)) {
    return fail("OVERFLOW", `The equilibrium constant at ${T} K is outside the representable range; check ΔG°rxn.`, joinPath(path, "thermo"));
  }
  return ok({
    Kc: Math.exp(lnKc),
    lnKc,
    K0: Math.exp(lnK0),
    dGrxn,
    deltaNu: th.deltaNu,
    standardState: th.standardState,
    units: equilibriumConstantUnit(th.deltaNu),
    extrapolated: th.anchorT !== null && Math.abs(T - th.anchorT) > ANCHOR_TOLERANCE_K,
  });
}

/** Equilibrium constant of a step at T (K): K_c = exp(−ΔG°rxn/RT)·(c°)^Δν in (mol/L)^Δν. */
export function equilibriumConstant(step: StepKinetics, T: number, path = "step"): Result<EquilibriumValue> {
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  const th = compileThermo(step, path);
  if (!th.ok) return th;
  return equilibriumFromCompiled(th.value, T, path);
}

/**
 * Reverse rate constant of a step at T (K) by detailed balance, k_rev = k_fwd/K_c, in
 * (mol/L)^(1−m_products)·s⁻¹. Needs step.thermo (MISSING_THERMO otherwise); the products
 * must form a valid elementary reverse step (1–3 molecules).
 */
export function reverseRateConstant(step: StepKinetics, T: number, path = "step"): Result<ReverseRateValue> {
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  const fr = compileStep(step, path);
  if (!fr.ok) return fr;
  const th = compileThermo(step, path);
  if (!th.ok) return th;
  const eq = equilibriumFromCompiled(th.value, T, path);
  if (!eq.ok) return eq;
  const lnkF = lnRateCompiled(fr.value, T);
  if (!(lnkF < LN_MAX_DOUBLE)) {
    return fail("OVERFLOW", `The rate constant at ${T} K is too large to represent; check the barrier.`, joinPath(path, "barrier"));
  }
  const lnkRev = lnkF - eq.value.lnKc;
  if (!(lnkRev < LN_MAX_DOUBLE)) {
    return fail("OVERFLOW", `The reverse rate constant at ${T} K is too large to represent; check ΔG°rxn.`, joinPath(path, "thermo"));
  }
  const fwdExtrap = fr.value.anchorT !== null && Math.abs(T - fr.value.anchorT) > ANCHOR_TOLERANCE_K;
  return ok({
    ...eq.value,
    extrapolated: eq.value.extrapolated || fwdExtrap,
    kFwd: Math.exp(lnkF),
    kRev: Math.exp(lnkRev),
    lnkRev,
    unitsFwd: rateConstantUnitLabel(fr.value.m),
    unitsRev: rateConstantUnitLabel(th.value.productOrder),
    relations: [
      "ΔG°rxn(T) = ΔH° − T·ΔS°",
      "K° = exp(−ΔG°rxn/RT)",
      "K_c = K°·(c°)^Δν, Δν = Σν_products − Σν_reactants",
      "k_rev = k_fwd/K_c",
    ],
  });
}

/**
 * Forward and reverse rate constants of many steps at many temperatures (K). Row-major
 * Float64Arrays, out[i·nT + j], forward in (mol/L)^(1−m)·s⁻¹ and reverse in
 * (mol/L)^(1−m_products)·s⁻¹. Reverse entries of irreversible steps are 0; a reversible
 * step without thermochemistry is a MISSING_THERMO error.
 */
export function rateConstantsBatchBoth(
  steps: StepKinetics[],
  temperatures: ArrayLike<number>,
): Result<{ forward: Float64Array; reverse: Float64Array }> {
  const fwdTable = rateLawTable(steps);
  if (!fwdTable.ok) return fwdTable;
  const fwd = evaluateLawTable(fwdTable.value, temperatures);
  if (!fwd.ok) return fwd;
  const revIndex: number[] = [];
  const thermos: CompiledThermo[] = [];
  for (let i = 0; i < steps.length; i++) {
    if (!steps[i].reversible) continue;
    const th = compileThermo(steps[i], `steps[${i}]`);
    if (!th.ok) return th;
    revIndex.push(i);
    thermos.push(th.value);
  }
  const nR = revIndex.length;
  const F = fwdTable.value;
  const rev: RateLawTable = {
    count: nR,
    m: new Float64Array(nR),
    a: new Float64Array(nR),
    b: new Float64Array(nR),
    c: new Float64Array(nR),
    wigner: new Float64Array(nR),
  };
  for (let r = 0; r < nR; r++) {
    const i = revIndex[r];
    const th = thermos[r];
    rev.m[r] = th.productOrder;
    rev.a[r] = F.a[i] - th.alpha;
    rev.b[r] = F.b[i] - th.beta;
    rev.c[r] = F.c[i] - th.gamma;
    rev.wigner[r] = F.wigner[i];
  }
  const nT = temperatures.length;
  const reverse = new Float64Array(steps.length * nT);
  const rv = evaluateLawTable(rev, temperatures);
  if (!rv.ok) {
    const m = /^steps\[(\d+)\]/.exec(rv.error.path ?? "");
    const path = m ? `steps[${revIndex[Number(m[1])]}].thermo` : rv.error.path;
    return fail("OVERFLOW", "A reverse rate constant is too large to represent; check ΔG°rxn.", path);
  }
  for (let r = 0; r < nR; r++) {
    reverse.set(rv.value.subarray(r * nT, (r + 1) * nT), revIndex[r] * nT);
  }
  return ok({ forward: fwd.value, reverse });
}
