/**
 * Per-step numbers for the workbench at a chosen temperature (pure; runs in the browser):
 * k_fwd and k_rev with units, ΔG‡ in the 1 mol/L standard state, ΔG°rxn when the step carries
 * reaction thermochemistry, the half-life ln 2/k of unimolecular steps, and the barrier form.
 *
 * Units: T in K; k in (mol/L)^(1−m)·s⁻¹; energies J/mol; half-lives s.
 */
import { stepToEngine, type MechanismDocument } from "../../../solver/exchange-format";
import { R_GAS, convertBarrier, equilibriumConstant, reactionPath, reverseRateConstant, type PathStep, type StoichTerm } from "../../../solver/index";
import { namesOf, type Names } from "../names";
import { thermalReferenceWarning } from "../barrier-text";
import { barrierWarning } from "../step-guards";

export interface StepNumbers {
  id: string;
  /** The step's label, or its reaction with species names. */
  label: string;
  /** The reaction with species names. */
  reaction: string;
  reversible: boolean;
  molecularity: number;
  form: string;
  kf: number | null;
  kfUnit: string;
  kr: number | null;
  krUnit: string | null;
  /** J/mol, forward barrier at T in 1 mol/L (null when it cannot be computed) */
  dG: number | null;
  /** J/mol, reaction free energy at T in the standard state it was given in (null without reaction thermochemistry) */
  dGrxn: number | null;
  /** J/mol, reaction free energy at T in the 1 mol/L standard state, −RT ln K_c (null without reaction thermochemistry) */
  dGrxn1M: number | null;
  /** ΔG°rxn given at one temperature and held constant at T (no ΔH°rxn to carry it) */
  dGrxnExtrapolated: boolean;
  /** s, ln 2 / k_fwd for a unimolecular step */
  halfLife: number | null;
  extrapolated: boolean;
  problem: string | null;
  /** A caution that does not stop the numbers, e.g. a thermal-form barrier used far from its reference temperature. */
  caution: string | null;
}

export function stepNumbers(doc: MechanismDocument, T: number): StepNumbers[] {
  const names = namesOf(doc);
  return doc.steps.map((st, i) => {
    const m = st.reactants.reduce((s, t) => s + t.coef, 0);
    const base: StepNumbers = { id: st.id, label: names.step(st.id), reaction: names.reaction(st.id), reversible: st.reversible, molecularity: m, form: st.barrier.form, kf: null, kfUnit: "", kr: null, krUnit: null, dG: null, dGrxn: null, dGrxn1M: null, dGrxnExtrapolated: false, halfLife: null, extrapolated: false, problem: null, caution: thermalReferenceWarning(st.barrier, T) };
    const eng = stepToEngine(st, `steps[${i}]`);
    if (!eng.ok) return { ...base, problem: eng.error.message };
    const c = convertBarrier({ ...eng.value, targetStandardState: "1M" }, T, `steps[${i}]`);
    if (!c.ok) return { ...base, problem: c.error.message };
    const out: StepNumbers = { ...base, kf: c.value.k, kfUnit: c.value.units, dG: c.value.dG, extrapolated: !!c.value.extrapolated, halfLife: m === 1 && c.value.k > 0 ? Math.LN2 / c.value.k : null };
    const guard = barrierWarning({ dG: c.value.dG, kf: c.value.k, kfUnit: c.value.units }, T);
    if (guard) out.caution = [guard, out.caution].filter(Boolean).join(" ");
    if (eng.value.thermo) {
      const r = reverseRateConstant(eng.value, T, `steps[${i}]`);
      if (r.ok) {
        out.dGrxn = r.value.dGrxn;
        if (st.reversible) {
          out.kr = r.value.kRev;
          out.krUnit = r.value.unitsRev;
        }
      } else out.problem = r.error.message;
      const K = equilibriumConstant(eng.value, T, `steps[${i}]`);
      if (K.ok) {
        out.dGrxn1M = -R_GAS * T * K.value.lnKc;
        out.dGrxnExtrapolated = K.value.extrapolated;
      }
    }
    return out;
  });
}

/** The pathway's steps with their energies at T (J/mol; ΔG°rxn in 1 mol/L), for solver/reaction-path.ts. */
export function pathSteps(doc: MechanismDocument, numbers: StepNumbers[], pathway: string[]): PathStep[] {
  const byId = new Map(numbers.map((n) => [n.id, n]));
  return pathway.flatMap((id) => {
    const st = doc.steps.find((s) => s.id === id);
    const n = byId.get(id);
    return st && n ? [{ id, reactants: st.reactants, products: st.products, dGts: n.dG, dGrxn: n.dGrxn1M }] : [];
  });
}

/** A state's species by name, "Cat + 2 AcOH" ("∅" when nothing is left). */
export function stateText(names: Names, terms: StoichTerm[]): string {
  return terms.map((t) => (t.coef === 1 ? names.species(t.species) : `${t.coef} ${names.species(t.species)}`)).join(" + ") || "∅";
}

export interface ProfilePoint {
  kind: "minimum" | "ts";
  label: string;
  /** J/mol relative to the start, 1 mol/L standard state */
  G: number | null;
  /** Why G is unknown, in words with the step's name (null when G is known). */
  unknown: string | null;
}

/**
 * Free-energy profile along a pathway (steps in order, each taken forward), through
 * solver/reaction-path.ts: each state labelled by the species present (reactants of a later
 * step joining before it), each transition state by its step's name, energies from ΔG‡(T) and
 * ΔG°rxn(T) in the 1 mol/L standard state. A step without ΔG°rxn leaves the levels after it
 * unknown (null), saying which step lacks it; nothing is assumed zero.
 */
export function freeEnergyProfile(doc: MechanismDocument, numbers: StepNumbers[], pathway: string[]): ProfilePoint[] {
  const names = namesOf(doc);
  const steps = pathSteps(doc, numbers, pathway);
  const path = reactionPath(steps);
  const stateLabel = (terms: StoichTerm[]) => stateText(names, terms);
  const why = (id: string | null, own: boolean) => (id === null ? null : own ? `“${names.step(id)}” has no ΔG‡ at this temperature` : `“${names.step(id)}” has no ΔG°rxn`);
  const pts: ProfilePoint[] = [];
  path.states.forEach((s, k) => {
    pts.push({ kind: "minimum", label: stateLabel(s.species), G: s.G, unknown: s.G === null ? why(s.unknownBecause, false) : null });
    const ts = path.transitionStates[k];
    if (ts) pts.push({ kind: "ts", label: `TS ${names.step(ts.stepId)}`, G: ts.G, unknown: ts.G === null ? why(ts.unknownBecause, ts.unknownBecause === ts.stepId && steps[k].dGts === null) : null });
  });
  return pts;
}
