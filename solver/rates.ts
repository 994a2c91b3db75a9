/**
 * Forward rate constants of elementary steps (transition-state theory and empirical forms).
 *
 * Eyring–Polanyi: k = κ·(k_B T/h)·(c°)^(1−m)·exp(−ΔG‡/RT), c° the standard concentration of
 * the barrier's standard state in mol/L (standard-state.ts). Every k returned here is in
 * mol/L-based units, (mol/L)^(1−m)·s⁻¹: s⁻¹, L mol⁻¹ s⁻¹, L² mol⁻² s⁻¹ for m = 1, 2, 3.
 * T is in K, energies in J/mol, entropies in J/(mol·K) throughout.
 *
 * Derived quantities (convertBarrier) are defined from the k(T) law of the step:
 *  - Ea is the local Arrhenius energy RT²·d ln k/dT, computed exactly from the law. For a
 *    barrier in the 1 mol/L state this is Ea = ΔH‡ + RT for every molecularity (solution,
 *    PΔV‡ ≈ 0); in an ideal-gas state (1 bar, 1 atm) it is Ea = ΔH‡ + (1−Δn‡)·RT = ΔH‡ + m·RT
 *    with Δn‡ = 1−m, because c° = p/(RT) itself varies with T. A Wigner factor adds
 *    RT²·d ln κ_W/dT (negative).
 *  - A = k·exp(Ea/RT): the Arrhenius pre-exponential factor of the tangent at T.
 *  - ΔG‡, ΔH‡, ΔS‡ are given in the requested standard state (step.targetStandardState,
 *    default 1 M), as the transition-state values that reproduce k with the step's κ and
 *    Wigner factor divided out. For Arrhenius and measured forms they are apparent values
 *    (κ = 1).
 */
import { KB_OVER_H, LN_KB_OVER_H, R_GAS } from "./constants.ts";
import { compileStep, dLnRateDT, lnRateCompiled, rateLawTable, type CompiledRate, type RateLaw, type RateLawTable } from "./barrier-forms.ts";
import { checkTemperature, fail, joinPath, ok } from "./input-checks.ts";
import {
  describeStandardStateShift,
  isStandardState,
  standardConcentrationUnchecked,
  standardPressure,
  standardStateShiftUnchecked,
  standardStateTExponent,
} from "./standard-state.ts";
import { formatOrder, rateConstantUnitLabel, type RateConstantUnitLabel } from "./units.ts";
import type { Barrier, Result, StandardState, StepKinetics } from "./types.ts";

export { molecularity, compileStep, rateLaw, rateLawTable, type CompiledRate, type RateLaw, type RateLawTable } from "./barrier-forms.ts";

/** ln of the largest finite double: exp of anything above overflows. */
export const LN_MAX_DOUBLE = Math.log(Number.MAX_VALUE);

/** Temperatures closer than this (K) to a form's anchor temperature are not "extrapolated". */
const ANCHOR_TOLERANCE_K = 1e-6;

export interface RateConstantValue {
  /** (mol/L)^(1−m)·s⁻¹ */
  k: number;
  /** ln of k in those units (stays finite when k underflows to 0). */
  lnk: number;
  units: RateConstantUnitLabel;
  /** True when the temperature dependence was assumed (ΔG‡ held constant) away from its reference T. */
  extrapolated: boolean;
}

export interface BarrierConversion {
  stepId: string;
  /** K */
  T: number;
  molecularity: number;
  /** The form the step was entered in. */
  form: Barrier["form"];
  /** Standard state of the entered barrier; null for Arrhenius and measured forms. */
  sourceStandardState: StandardState | null;
  /** Standard state of dG, dH, dS below. */
  standardState: StandardState;
  /** c° of `standardState` at T, mol/L. */
  standardConcentration: number;
  /** (mol/L)^(1−m)·s⁻¹ */
  k: number;
  lnk: number;
  units: RateConstantUnitLabel;
  /** Constant transmission coefficient applied (1 for empirical forms). */
  kappa: number;
  /** Wigner factor at T (1 when none). */
  kappaWigner: number;
  /** J/mol, in `standardState` */
  dG: number;
  /** J/mol, in `standardState` */
  dH: number;
  /** J/(mol·K), in `standardState` */
  dS: number;
  /** ΔG‡ at T in the source standard state (J/mol); null for empirical forms. */
  dGSource: number | null;
  /** ΔG‡(standardState) − ΔG‡(source state), J/mol (0 when the states agree or the form is empirical). */
  standardStateShift: number;
  /** Local Arrhenius energy RT²·d ln k/dT, J/mol. */
  Ea: number;
  /** Arrhenius pre-exponential factor at T, (mol/L)^(1−m)·s⁻¹. */
  A: number;
  lnA: number;
  extrapolated: boolean;
  /** The relation between Ea and ΔH‡ used at T, short display text, e.g. "Ea = ΔH‡ + RT". */
  eaRelation: string;
  /** Each relation used, as display text. */
  relations: string[];
  notes: string[];
}

function isExtrapolated(c: RateLaw, T: number): boolean {
  return c.anchorT !== null && Math.abs(T - c.anchorT) > ANCHOR_TOLERANCE_K;
}

function overflow(path: string, T: number): Result<never> {
  return fail("OVERFLOW", `The rate constant at ${T} K is too large to represent; check the barrier.`, path);
}

/**
 * k(T) of a compiled law without checks, in (mol/L)^(1−m)·s⁻¹. For hot loops (temperature
 * programs) after compileStep has succeeded; the caller checks for a non-finite result.
 */
export function rateFromCompiled(c: RateLaw, T: number): number {
  return Math.exp(lnRateCompiled(c, T));
}

/** Forward rate constant of a step at T (K). */
export function rateConstant(step: StepKinetics, T: number, path = "step"): Result<RateConstantValue> {
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  const cr = compileStep(step, path);
  if (!cr.ok) return cr;
  const c = cr.value;
  const lnk = lnRateCompiled(c, T);
  if (!(lnk < LN_MAX_DOUBLE)) return overflow(joinPath(path, "barrier"), T);
  return ok({ k: Math.exp(lnk), lnk, units: rateConstantUnitLabel(c.m), extrapolated: isExtrapolated(c, T) });
}

/**
 * All derived forms of a step's barrier at T (K): ΔG‡, ΔH‡, ΔS‡ (in the step's target
 * standard state, default 1 M), the local Arrhenius Ea and A, k with its unit, the
 * standard-state shift from the entered state, and the relations used.
 */
export function convertBarrier(step: StepKinetics, T: number, path = "step"): Result<BarrierConversion> {
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  const cr = compileStep(step, path);
  if (!cr.ok) return cr;
  const c = cr.value;
  const target: StandardState = step.targetStandardState ?? "1M";
  if (!isStandardState(target)) {
    return fail("UNKNOWN_STANDARD_STATE", `"${String(target)}" is not a known standard state.`, joinPath(path, "targetStandardState"));
  }
  const m = c.m;
  const RT = R_GAS * T;

  const lnk = lnRateCompiled(c, T);
  if (!(lnk < LN_MAX_DOUBLE)) return overflow(joinPath(path, "barrier"), T);
  const k = Math.exp(lnk);

  const dlnk = dLnRateDT(c, T);
  const Ea = R_GAS * T * T * dlnk;
  const lnA = lnk + Ea / RT;
  if (!(lnA < LN_MAX_DOUBLE)) {
    return fail("OVERFLOW", `The Arrhenius factor A at ${T} K is too large to represent; check the barrier.`, joinPath(path, "barrier"));
  }

  const x = c.wigner / (T * T);
  const lnKappaW = c.wigner !== 0 ? Math.log1p(x) : 0;
  const dlnKappaW = c.wigner !== 0 ? (-2 * x) / (T * (1 + x)) : 0;
  const lnKappaTotal = c.lnKappa + lnKappaW;

  // ΔG‡ in state s from k: k = κ_tot·(k_B T/h)·(c°_s)^(1−m)·exp(−ΔG‡/RT)
  const dGIn = (s: StandardState) =>
    -RT * (lnk - lnKappaTotal - LN_KB_OVER_H - Math.log(T) - (1 - m) * Math.log(standardConcentrationUnchecked(s, T)));
  const dG = dGIn(target);
  // ΔH‡ in the target state from the local slope: Ea − RT²·dlnκ_W/dT = ΔH‡ + RT − (1−m)·g·RT
  const g = standardStateTExponent(target);
  const dH = R_GAS * T * T * (dlnk - dlnKappaW) - RT - (1 - m) * g * RT;
  // ΔH‡ and ΔG‡ come from separate expressions; a difference at rounding level is ΔS‡ = 0.
  const dHG = dH - dG;
  const dS = Math.abs(dHG) <= 1e-12 * Math.max(Math.abs(dH), Math.abs(dG), 1) ? 0 : dHG / T;

  const src = c.sourceStandardState;
  const dGSource = src === null ? null : dGIn(src);
  const shift = src === null ? 0 : standardStateShiftUnchecked(src, target, m, T);

  const relations = [...c.relations];
  const cTarget = standardConcentrationUnchecked(target, T);
  if (standardPressure(target) === null) {
    relations.push("c° = 1 mol/L (solution standard state)");
  } else {
    relations.push(`c° = p°/(RT) = ${cTarget.toPrecision(5)} mol/L at ${T} K (ideal-gas standard state ${target})`);
  }
  if (src !== null && src !== target && m !== 1) relations.push(describeStandardStateShift(src, target, m, T));
  if (c.tst && c.lnKappa !== 0) relations.push(`κ = ${Math.exp(c.lnKappa).toPrecision(4)} (transmission coefficient)`);
  if (c.wigner !== 0) relations.push("κ_W = 1 + (1/24)·(h·c·ν̃‡/(k_B·T))²");
  relations.push("Ea = RT²·d ln k/dT (local Arrhenius energy)");
  const wignerTerm = c.wigner !== 0 ? " + RT²·d ln κ_W/dT" : "";
  const eaRelation = g === 0 ? `Ea = ΔH‡ + RT${wignerTerm}` : `Ea = ΔH‡ + ${m === 1 ? "" : formatOrder(m)}RT${wignerTerm}`;
  if (g === 0) relations.push(`Ea = ΔH‡ + RT${wignerTerm} (1 mol/L standard state, PΔV‡ ≈ 0)`);
  else relations.push(`Ea = ΔH‡ + (1−Δn‡)·RT${wignerTerm}, Δn‡ = 1−m = ${1 - m} (ideal-gas standard state)`);
  relations.push("A = k·exp(Ea/RT)");
  relations.push("ΔS‡ = (ΔH‡ − ΔG‡)/T");
  relations.push(`k in ${rateConstantUnitLabel(m)} (m = ${formatOrder(m)})`);

  const notes = [...c.notes];
  const extrapolated = isExtrapolated(c, T);
  if (extrapolated) {
    notes.push(`The temperature dependence is assumed (ΔG‡ held constant) away from ${c.anchorT} K.`);
  }
  if (k === 0) notes.push("k is below the smallest representable number and is reported as 0.");
  if (c.wigner !== 0 && 1 + x > 2) notes.push("The Wigner factor exceeds 2: the leading-order correction is unreliable there.");

  return ok({
    stepId: step.id,
    T,
    molecularity: m,
    form: c.form,
    sourceStandardState: src,
    standardState: target,
    standardConcentration: cTarget,
    k,
    lnk,
    units: rateConstantUnitLabel(m),
    kappa: Math.exp(c.lnKappa),
    kappaWigner: Math.exp(lnKappaW),
    dG,
    dH,
    dS,
    dGSource,
    standardStateShift: shift,
    Ea,
    A: Math.exp(lnA),
    lnA,
    extrapolated,
    eaRelation,
    relations,
    notes,
  });
}

/** Compiles every step with display text; errors carry the path "steps[i]…". */
export function compileSteps(steps: StepKinetics[]): Result<CompiledRate[]> {
  if (!Array.isArray(steps)) return fail("EMPTY_INPUT", "The steps must be a list.", "steps");
  const out: CompiledRate[] = new Array(steps.length);
  for (let i = 0; i < steps.length; i++) {
    const r = compileStep(steps[i], `steps[${i}]`);
    if (!r.ok) return r;
    out[i] = r.value;
  }
  return ok(out);
}

function checkTemperatures(temperatures: ArrayLike<number>): Result<never> | null {
  if (!temperatures || typeof temperatures.length !== "number" || temperatures.length === 0) {
    return fail("EMPTY_INPUT", "At least one temperature is needed.", "temperatures");
  }
  for (let j = 0; j < temperatures.length; j++) {
    const e = checkTemperature(temperatures[j], `temperatures[${j}]`);
    if (e) return e;
  }
  return null;
}

/**
 * Evaluates a law table on a temperature grid (K). Row-major: out[i·nT + j] = k of law i
 * at temperatures[j], in (mol/L)^(1−m_i)·s⁻¹. Fails with OVERFLOW (path "steps[i].barrier")
 * on the first infinite k.
 */
export function evaluateLawTable(table: RateLawTable, temperatures: ArrayLike<number>): Result<Float64Array> {
  const bad = checkTemperatures(temperatures);
  if (bad) return bad;
  const nT = temperatures.length;
  const lnT = new Float64Array(nT);
  const invT = new Float64Array(nT);
  const invT2 = new Float64Array(nT);
  for (let j = 0; j < nT; j++) {
    const T = temperatures[j];
    lnT[j] = Math.log(T);
    invT[j] = 1 / T;
    invT2[j] = 1 / (T * T);
  }
  const n = table.count;
  const A = table.a;
  const B = table.b;
  const C = table.c;
  const W = table.wigner;
  const out = new Float64Array(n * nT);
  for (let i = 0; i < n; i++) {
    const a = A[i];
    const b = B[i];
    const c = C[i];
    const w = W[i];
    const row = i * nT;
    let maxv = 0;
    if (w === 0) {
      for (let j = 0; j < nT; j++) {
        const v = Math.exp(a + b * lnT[j] - c * invT[j]);
        out[row + j] = v;
        if (v > maxv) maxv = v;
      }
    } else {
      for (let j = 0; j < nT; j++) {
        const v = Math.exp(a + b * lnT[j] - c * invT[j]) * (1 + w * invT2[j]);
        out[row + j] = v;
        if (v > maxv) maxv = v;
      }
    }
    if (maxv === Infinity) {
      let j = 0;
      while (out[row + j] !== Infinity) j++;
      return overflow(`steps[${i}].barrier`, temperatures[j]);
    }
  }
  return ok(out);
}

/**
 * Forward rate constants of many steps at many temperatures (K). Row-major Float64Array:
 * out[i·temperatures.length + j] = k of steps[i] at temperatures[j], in (mol/L)^(1−m)·s⁻¹.
 * Same numbers as rateConstant, to rounding.
 */
export function rateConstantsBatch(steps: StepKinetics[], temperatures: ArrayLike<number>): Result<Float64Array> {
  const bad = checkTemperatures(temperatures);
  if (bad) return bad;
  const laws = rateLawTable(steps);
  if (!laws.ok) return laws;
  return evaluateLawTable(laws.value, temperatures);
}

/** k_B·T/h in s⁻¹ at T (K), unchecked: the universal frequency factor. */
export function eyringFrequency(T: number): number {
  return KB_OVER_H * T;
}
