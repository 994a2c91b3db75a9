/**
 * The catalytic cycle of a mechanism for the workbench (pure; runs in the browser): the cycle
 * found in the step graph (solver/reaction-path.ts, the catalyst preferred by fewest atoms in
 * its formula, then document order), and, for a pathway that closes a cycle, the energetic span
 * model (solver/energetic-span.ts; Kozuch & Shaik, Acc. Chem. Res. 2011, 44, 101–110): TOF at T,
 * the TOF-determining transition state and intermediate by name, δE, and each state's degree of
 * TOF control. Energies J/mol in the 1 mol/L standard state; TOF in s⁻¹.
 */
import { energeticSpan, findCatalyticCycle, parseFormula, reactionPath, type EnergeticSpan, type StoichTerm } from "../../../solver/index";
import type { MechanismDocument } from "../../../solver/exchange-format";
import { namesOf } from "../names";
import { pathSteps, stateText, type StepNumbers } from "./step-rates";

/** The cycle's steps in order, starting with the step that consumes the catalyst; null when the mechanism has none. */
export function defaultCycle(doc: MechanismDocument): string[] | null {
  const order = new Map(doc.species.map((s, i) => [s.id, i]));
  const atoms = new Map(
    doc.species.map((s) => {
      const f = s.formula ? parseFormula(s.formula) : null;
      const n = f && f.ok ? Object.values(f.value.elements).reduce((a, b) => a + b, 0) : Infinity;
      return [s.id, n];
    }),
  );
  const rank = (id: string) => {
    const n = atoms.get(id) ?? Infinity;
    return (Number.isFinite(n) ? n * 1e6 : 1e12) + (order.get(id) ?? 1e5);
  };
  return findCatalyticCycle(doc.steps, rank);
}

export type CycleSummary =
  | { kind: "none" }
  | { kind: "unknown"; catalyst: string; reason: string }
  | {
      kind: "span";
      catalyst: string;
      result: EnergeticSpan;
      tdts: string;
      tdi: string;
      /** J/mol */
      reactionEnergy: number;
      states: Array<{ label: string; kind: "intermediate" | "ts"; G: number; control: number }>;
    };

export function cycleSummary(doc: MechanismDocument, numbers: StepNumbers[], pathway: string[], T: number): CycleSummary {
  const names = namesOf(doc);
  const steps = pathSteps(doc, numbers, pathway);
  const path = reactionPath(steps);
  if (!path.catalyst) return { kind: "none" };
  const catalyst = names.species(path.catalyst);
  const missing = steps.filter((s) => s.dGrxn === null).map((s) => `“${names.step(s.id)}” has no ΔG°rxn`);
  const noTs = steps.filter((s) => s.dGts === null).map((s) => `“${names.step(s.id)}” has no ΔG‡ at this temperature`);
  if (missing.length || noTs.length) return { kind: "unknown", catalyst, reason: [...missing, ...noTs].join("; ") };
  const label = (terms: StoichTerm[]) => stateText(names, terms);
  const I = path.states.slice(0, -1).map((s) => s.G!);
  const TS = path.transitionStates.map((s) => s.G!);
  const dGr = path.states[path.states.length - 1].G! - path.states[0].G!;
  const r = energeticSpan({ intermediates: I, transitionStates: TS, reactionEnergy: dGr, T });
  if (!r.ok) return { kind: "unknown", catalyst, reason: r.error.message };
  const iLabels = path.states.slice(0, -1).map((s) => label(s.species));
  const tsLabels = path.transitionStates.map((s) => `TS ${names.step(s.stepId)}`);
  const states: Array<{ label: string; kind: "intermediate" | "ts"; G: number; control: number }> = [];
  I.forEach((g, j) => {
    states.push({ label: iLabels[j], kind: "intermediate", G: g, control: r.value.controlI[j] });
    states.push({ label: tsLabels[j], kind: "ts", G: TS[j], control: r.value.controlTS[j] });
  });
  return { kind: "span", catalyst, result: r.value, tdts: tsLabels[r.value.tdts], tdi: iLabels[r.value.tdi], reactionEnergy: dGr, states };
}
