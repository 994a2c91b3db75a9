/**
 * The states along a reaction pathway, and catalytic cycles in a mechanism's step graph.
 *
 * A pathway is a list of steps, each taken forward. The state before the first step is its
 * reactants; before each later step, any of its reactants not already present enter from
 * outside (at the standard state, so without a change of free energy); a step turns its
 * reactants into its products. Each state's free energy is the sum of the ΔG°rxn of the steps
 * before it; each transition state lies ΔG‡ above the state it starts from. A step without a
 * ΔG°rxn leaves every later level unknown (null), with the step named as the reason; a step
 * without a ΔG‡ leaves its own transition state unknown. Energies J/mol, at the standard state
 * the caller's numbers refer to (the workbench uses 1 mol/L).
 *
 * A pathway is a catalytic cycle when a species consumed by its first step is returned by the
 * end with no net change over the pathway (the catalyst). The cycle's intermediates are the
 * states before each step, its transition states those of the steps, and its reaction free
 * energy ΔG_r the last state's energy minus the first's — the input of the energetic span model
 * (energetic-span.ts). `findCatalyticCycle` looks for such a cycle in a mechanism: a closed walk
 * through the directed graph reactant → product of its steps, each step used once.
 *
 * Pure: no DB, no React, no Node-only imports.
 */
import type { StoichTerm } from "./types.ts";

export interface PathStep {
  id: string;
  reactants: StoichTerm[];
  products: StoichTerm[];
  /** J/mol, forward barrier at T (null when unknown) */
  dGts: number | null;
  /** J/mol, reaction free energy at T (null when the step carries none) */
  dGrxn: number | null;
}

export interface PathState {
  /** species amounts present (coefficients), in order of first appearance */
  species: StoichTerm[];
  /** J/mol relative to the first state, null when unknown */
  G: number | null;
  /** id of the step whose missing ΔG°rxn makes G unknown */
  unknownBecause: string | null;
}

export interface PathTransitionState {
  stepId: string;
  G: number | null;
  /** id of the step whose missing ΔG°rxn (or this step's missing ΔG‡) makes G unknown */
  unknownBecause: string | null;
}

export interface ReactionPath {
  /** n + 1 states for n steps: before each step (with entering species), and after the last */
  states: PathState[];
  /** one per step */
  transitionStates: PathTransitionState[];
  /** species key of the catalyst when the pathway is a closed catalytic cycle, else null */
  catalyst: string | null;
}

const EPS = 1e-9;

function addTerms(into: Map<string, number>, terms: StoichTerm[], sign: 1 | -1) {
  for (const t of terms) {
    const v = (into.get(t.species) ?? 0) + sign * t.coef;
    if (Math.abs(v) < EPS) into.delete(t.species);
    else into.set(t.species, v);
  }
}
const asTerms = (m: Map<string, number>): StoichTerm[] => [...m].filter(([, c]) => c > EPS).map(([species, coef]) => ({ species, coef }));

export function reactionPath(steps: PathStep[]): ReactionPath {
  const states: PathState[] = [];
  const tss: PathTransitionState[] = [];
  const present = new Map<string, number>();
  let G: number | null = 0;
  let because: string | null = null;
  steps.forEach((st) => {
    for (const r of st.reactants) {
      const have = present.get(r.species) ?? 0;
      if (have + EPS < r.coef) present.set(r.species, r.coef);
    }
    states.push({ species: asTerms(present), G, unknownBecause: because });
    tss.push({ stepId: st.id, G: G === null || st.dGts === null ? null : G + st.dGts, unknownBecause: G === null ? because : st.dGts === null ? st.id : null });
    addTerms(present, st.reactants, -1);
    addTerms(present, st.products, 1);
    if (G !== null && st.dGrxn === null) because = st.id;
    G = G === null || st.dGrxn === null ? null : G + st.dGrxn;
  });
  if (steps.length) states.push({ species: asTerms(present), G, unknownBecause: because });
  return { states, transitionStates: tss, catalyst: catalystOf(steps) };
}

/** A species consumed by the first step and back, with no net change, after the last one. */
function catalystOf(steps: PathStep[]): string | null {
  if (steps.length === 0) return null;
  const net = new Map<string, number>();
  for (const st of steps) {
    addTerms(net, st.reactants, -1);
    addTerms(net, st.products, 1);
  }
  const first = steps[0];
  for (const r of first.reactants) {
    const madeBack = first.products.every((p) => p.species !== r.species);
    if (madeBack && !net.has(r.species) && steps.slice(1).some((s) => s.products.some((p) => p.species === r.species))) return r.species;
  }
  return null;
}

export interface CycleStep {
  id: string;
  reactants: StoichTerm[];
  products: StoichTerm[];
}

/**
 * A catalytic cycle among the steps: the longest closed walk carrier → carrier (a reactant of a
 * step to one of its products), each step at most once, that the pathway rule above accepts as
 * a cycle. It starts with the step that consumes the preferred catalyst: the carrier ranked first
 * by `rank` (lower first; e.g. fewest atoms), ties in step order. At most `maxSteps` steps and a
 * bounded search, so a large mechanism answers quickly (null when none is found).
 */
export function findCatalyticCycle(steps: CycleStep[], rank: (species: string) => number = () => 0, maxSteps = 12): string[] | null {
  const from = new Map<string, number[]>();
  steps.forEach((s, i) => {
    for (const r of s.reactants) {
      if (!from.has(r.species)) from.set(r.species, []);
      from.get(r.species)!.push(i);
    }
  });
  let best: number[] | null = null;
  let budget = 2_000; // edges looked at, over the whole search
  const used = new Set<number>();
  const path: number[] = [];
  const walk = (start: string, at: string) => {
    for (const i of from.get(at) ?? []) {
      if (used.has(i)) continue;
      const st = steps[i];
      for (const p of st.products) {
        if (--budget < 0) return;
        if (p.species === at) continue;
        if (p.species === start) {
          if (!best || path.length + 1 > best.length) {
            const next = [...path, i];
            if (catalystOf(next.map((q) => ({ ...steps[q], dGts: null, dGrxn: null }))) === start) best = next;
          }
          continue;
        }
        if (path.length + 1 >= maxSteps) continue;
        used.add(i);
        path.push(i);
        walk(start, p.species);
        path.pop();
        used.delete(i);
      }
    }
  };
  const carriers = [...from.keys()];
  for (const c of carriers) walk(c, c);
  if (!best) return null;
  const cycle: number[] = best;
  // rotate so the cycle starts with the step that consumes the preferred catalyst
  const ids = cycle.map((i) => steps[i]);
  let start = 0;
  let bestRank = Infinity;
  ids.forEach((st, k) => {
    const prev = ids[(k + ids.length - 1) % ids.length];
    for (const r of st.reactants) {
      if (!prev.products.some((p) => p.species === r.species)) continue;
      const rot = [...ids.slice(k), ...ids.slice(0, k)].map((s) => ({ ...s, dGts: null, dGrxn: null }));
      if (catalystOf(rot) !== r.species) continue;
      const v = rank(r.species);
      if (v < bestRank) {
        bestRank = v;
        start = k;
      }
    }
  });
  return [...ids.slice(start), ...ids.slice(0, start)].map((s) => s.id);
}
