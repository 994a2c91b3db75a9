/**
 * One chunk of an ensemble, computed: the mechanism snapshot, the request and some members →
 * each member's observables on the ensemble's output times. Pure computation (no DB, no node
 * APIs): it runs in a worker thread, a queue worker or a test alike.
 *
 * A member's barrier shift δ (J/mol) multiplies the step's k_fwd and k_rev by exp(−δ/RT), i.e.
 * raises the transition state by δ and leaves the equilibrium constant as it was. Its T (K), when
 * set, replaces the base temperature (isothermal); its initial concentrations (mol/L) replace the
 * base ones of those species.
 */
import { buildMechanism, R_GAS, simulate, type KineticMechanism } from "../../solver/index";
import { documentToEngine, validateMechanismDocument, type MechanismDocument } from "../../solver/exchange-format";
import { valueKey, type EnsembleMember } from "../../solver/ensemble";
import { resolveSolver, toEngineConditions, type EngineConditions } from "../compute/run-request";
import { resolveEnsemble, type ObservableDef } from "./ensemble-plan";
import type { EnsembleSpec } from "./ensemble-spec";

export interface EnsembleChunkInput {
  snapshot: unknown;
  spec: EnsembleSpec;
  members: EnsembleMember[];
}

export interface MemberOutcome {
  index: number;
  ok: boolean;
  /** fractions (0–1) by valueKey(observable, time index) */
  values?: Record<string, number>;
  error?: string;
}

export interface EnsembleChunkHooks {
  shouldStop?: () => boolean;
  onMemberDone?: (o: MemberOutcome) => void;
}

interface Prepared {
  mech: KineticMechanism;
  cond: EngineConditions;
  times: number[];
  observables: ObservableDef[];
}

function prepare(input: EnsembleChunkInput): { ok: true; value: Prepared } | { ok: false; message: string } {
  const doc = validateMechanismDocument(input.snapshot);
  if (!doc.ok) return { ok: false, message: `The mechanism snapshot is not valid: ${doc.error.message}` };
  const eng = documentToEngine(doc.value);
  if (!eng.ok) return { ok: false, message: eng.error.message };
  const mech = buildMechanism(eng.value.species, eng.value.steps);
  if (!mech.ok) return { ok: false, message: mech.error.message };
  const cond = toEngineConditions(input.spec.conditions, mech.value.model.speciesIds);
  if (!cond.ok) return { ok: false, message: cond.error.message };
  const r = resolveEnsemble(input.spec, doc.value as MechanismDocument);
  if (!r.ok) return { ok: false, message: r.error.message };
  return { ok: true, value: { mech: mech.value, cond: cond.value, times: r.value.times, observables: r.value.observables } };
}

/** Observables of one simulated member at each output time; NaN where undefined (e.g. 0/0). */
function observe(p: Prepared, initial: Record<string, number>, at: (species: string, k: number) => number): Record<string, number> {
  const values: Record<string, number> = {};
  for (const o of p.observables) {
    for (let k = 0; k < p.times.length; k++) {
      let v: number;
      if (o.kind === "conversion") {
        const c0 = initial[o.species[0]] ?? 0;
        v = c0 > 0 ? 1 - at(o.species[0], k) / c0 : NaN;
      } else if (o.kind === "yield") {
        const c0 = initial[p.observables[0].species[0]] ?? 0;
        v = c0 > 0 ? at(o.species[0], k) / c0 : NaN;
      } else {
        const a = at(o.species[0], k);
        const b = at(o.species[1], k);
        v = a + b > 0 ? a / (a + b) : NaN;
      }
      if (Number.isFinite(v)) values[valueKey(o.key, k)] = v;
    }
  }
  return values;
}

function runMember(p: Prepared, spec: EnsembleSpec, m: EnsembleMember): MemberOutcome {
  const { model } = p.mech;
  const stepIds = model.reactionIds;
  const rateConstants = p.mech.rateConstants.map((rc, r) => {
    const shift = m.shifts[stepIds[r]] ?? 0;
    if (shift === 0) return rc;
    const f = (T: number) => Math.exp(-shift / (R_GAS * T));
    return { kf: (T: number) => rc.kf(T) * f(T), ...(rc.kr ? { kr: (T: number) => rc.kr!(T) * f(T) } : {}) };
  });
  const initial = { ...p.cond.initial, ...m.initial };
  const s = resolveSolver(spec.solver);
  const run = simulate(model, {
    rateConstants,
    temperature: m.T !== null ? { kind: "isothermal", T: m.T } : p.cond.temperature,
    initial,
    tEnd: p.cond.tEnd,
    grid: { kind: "times", times: [0, ...p.times] },
    rtol: s.rtol,
    atol: s.atol,
    method: s.method,
    maxSteps: s.maxSteps,
    maxWallMs: s.wallTimeMs,
  });
  if (!run.ok) return { index: m.index, ok: false, error: run.error.message };
  const res = run.value;
  const at = (species: string, k: number) => res.conc[model.speciesIndex.get(species)!][k + 1];
  return { index: m.index, ok: true, values: observe(p, initial, at) };
}

export function runEnsembleChunk(input: EnsembleChunkInput, hooks: EnsembleChunkHooks = {}): MemberOutcome[] {
  const prep = prepare(input);
  const out: MemberOutcome[] = [];
  for (const m of input.members) {
    if (hooks.shouldStop?.()) break;
    let o: MemberOutcome;
    if (!prep.ok) o = { index: m.index, ok: false, error: prep.message };
    else {
      try {
        o = runMember(prep.value, input.spec, m);
      } catch (e) {
        o = { index: m.index, ok: false, error: `The simulation stopped unexpectedly: ${(e as Error).message}` };
      }
    }
    out.push(o);
    hooks.onMemberDone?.(o);
  }
  return out;
}
