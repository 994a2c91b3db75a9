/**
 * An ensemble request read against its mechanism: units to SI, each step's barrier uncertainty
 * (the request's value, else the step's stored uncertainty, else the request's default) and
 * method group (the step's provenance method, e.g. the level of theory), the output times and
 * the observables; then the members (solver/ensemble.ts planMembers) and the summary.
 * Pure (no DB, no node APIs).
 *
 * Units: K, mol/L, J/mol, s. Observables are fractions (0–1): conversion of the reactant
 * 1 − c_R(t)/c_R(0); yield of a product c_P(t)/c_R(0) (per mole of reactant charged);
 * selectivity c_P1/(c_P1 + c_P2).
 */
import type { MechanismDocument } from "../../solver/exchange-format";
import { concentrationToMolPerL, temperatureToK, timeToSeconds, type Result } from "../../solver/index";
import { ENERGY_FACTORS } from "../../solver/units";
import { planMembers, summarizeOutcomes, type EnsembleDesign, type EnsembleMember, type EnsembleSummary, type MemberResult, type SweepAxis } from "../../solver/ensemble";
import type { EnsembleSpec } from "./ensemble-spec";

export type ObservableKind = "conversion" | "yield" | "selectivity";

export interface ObservableDef {
  /** opaque key of the values (not shown) */
  key: string;
  kind: ObservableKind;
  /** species ids: [reactant] | [product] | [first, second] */
  species: string[];
}

export interface ResolvedEnsemble {
  design: EnsembleDesign;
  /** s, output times of every member (a band grid and the chosen times) */
  times: number[];
  /** indices into `times` of the chosen times, in the order asked */
  chosen: number[];
  observables: ObservableDef[];
  /** s */
  tEnd: number;
}

/** Points of the grid the bands are drawn on. */
export const BAND_POINTS = 30;

const fail = (code: string, message: string, path: string): Result<never> => ({ ok: false, error: { code, message, path } });
const tUnit = (u: string) => (u === "°C" ? "degC" : u) as "K" | "degC";

/** The method group of each step: its provenance method (trimmed), or null when it has none. */
export function methodGroups(doc: MechanismDocument): Record<string, string | null> {
  const out: Record<string, string | null> = {};
  for (const s of doc.steps) out[s.id] = s.provenance?.method?.trim() || null;
  return out;
}

/** The observables of a request, in display order. */
export function observablesOf(spec: Pick<EnsembleSpec, "observables">): ObservableDef[] {
  const o = spec.observables;
  const out: ObservableDef[] = [{ key: `conversion:${o.reactant}`, kind: "conversion", species: [o.reactant] }];
  for (const p of o.products ?? []) out.push({ key: `yield:${p}`, kind: "yield", species: [p] });
  if (o.selectivity) out.push({ key: `selectivity:${o.selectivity[0]}:${o.selectivity[1]}`, kind: "selectivity", species: [...o.selectivity] });
  return out;
}

function bandTimes(spec: EnsembleSpec, tEnd: number, firstTime: number | null): number[] {
  const linear = spec.conditions.output?.grid === "linear";
  const t1 = linear ? tEnd / BAND_POINTS : Math.min(firstTime ?? tEnd * 1e-3, tEnd);
  const out: number[] = [];
  for (let i = 0; i < BAND_POINTS; i++) {
    const f = i / (BAND_POINTS - 1);
    out.push(linear ? t1 + (tEnd - t1) * f : t1 * Math.pow(tEnd / t1, f));
  }
  out[out.length - 1] = tEnd;
  return out;
}

export function resolveEnsemble(spec: EnsembleSpec, doc: MechanismDocument): Result<ResolvedEnsemble> {
  const species = new Set(doc.species.map((s) => s.id));
  const steps = new Set(doc.steps.map((s) => s.id));
  const c = spec.conditions;
  const tEnd = timeToSeconds(c.endTime.value, c.endTime.unit, "conditions.endTime.value");
  if (!tEnd.ok) return tEnd;
  let baseT: number | null = null;
  if (c.temperature) {
    const T = temperatureToK(c.temperature.value, tUnit(c.temperature.unit), "conditions.temperature.value");
    if (!T.ok) return T;
    baseT = T.value;
  }
  const T0 = baseT ?? 298.15;

  // observables
  const o = spec.observables;
  const named = [["observables.reactant", o.reactant], ...(o.products ?? []).map((p, i) => [`observables.products[${i}]`, p]), ...(o.selectivity ?? []).map((p, i) => [`observables.selectivity[${i}]`, p])];
  for (const [path, id] of named) if (!species.has(id)) return fail("UNKNOWN_SPECIES", `"${id}" is not a species of the mechanism.`, path);
  if (o.selectivity && o.selectivity[0] === o.selectivity[1]) return fail("BAD_OBSERVABLE", "Selectivity compares two different products.", "observables.selectivity[1]");
  const chosenSeconds: number[] = [];
  for (let i = 0; i < o.times.length; i++) {
    const t = timeToSeconds(o.times[i].value, o.times[i].unit, `observables.times[${i}].value`);
    if (!t.ok) return t;
    if (t.value > tEnd.value * (1 + 1e-12)) return fail("BAD_TIME", "Every chosen time must be within the end time.", `observables.times[${i}].value`);
    chosenSeconds.push(Math.min(t.value, tEnd.value));
  }
  let firstTime: number | null = null;
  if (c.output?.firstTime) {
    const f = timeToSeconds(c.output.firstTime.value, c.output.firstTime.unit, "conditions.output.firstTime.value");
    if (!f.ok) return f;
    firstTime = f.value;
  }
  const all = [...bandTimes(spec, tEnd.value, firstTime), ...chosenSeconds].sort((a, b) => a - b);
  const times = all.filter((t, i) => i === 0 || t - all[i - 1] > 1e-12 * t);
  const chosen = chosenSeconds.map((t) => times.findIndex((x) => Math.abs(x - t) <= 1e-12 * t));

  const design: EnsembleDesign = { mode: spec.mode, baseT };
  if (spec.mode === "sweep") {
    const axes: SweepAxis[] = [];
    for (let i = 0; i < (spec.sweep ?? []).length; i++) {
      const a = spec.sweep![i];
      const path = `sweep[${i}]`;
      if (a.parameter === "temperature") {
        const from = temperatureToK(a.from.value, tUnit(a.from.unit), `${path}.from.value`);
        if (!from.ok) return from;
        const to = temperatureToK(a.to.value, tUnit(a.to.unit), `${path}.to.value`);
        if (!to.ok) return to;
        axes.push({ parameter: { kind: "temperature" }, from: from.value, to: to.value, points: a.points, grid: a.grid });
      } else if (a.parameter === "initial") {
        if (!species.has(a.species)) return fail("UNKNOWN_SPECIES", `"${a.species}" is not a species of the mechanism.`, `${path}.species`);
        const from = concentrationToMolPerL(a.from.value, a.from.unit, T0, `${path}.from.value`);
        if (!from.ok) return from;
        const to = concentrationToMolPerL(a.to.value, a.to.unit, T0, `${path}.to.value`);
        if (!to.ok) return to;
        axes.push({ parameter: { kind: "initial", species: a.species }, from: from.value, to: to.value, points: a.points, grid: a.grid });
      } else {
        if (!steps.has(a.step)) return fail("UNKNOWN_STEP", `"${a.step}" is not a step of the mechanism.`, `${path}.step`);
        axes.push({ parameter: { kind: "barrier", step: a.step }, from: a.from.value * ENERGY_FACTORS[a.from.unit], to: a.to.value * ENERGY_FACTORS[a.to.unit], points: a.points, grid: a.grid });
      }
    }
    design.sweep = axes;
  } else if (spec.uncertainty) {
    const u = spec.uncertainty;
    for (const id of Object.keys(u.sigma ?? {})) if (!steps.has(id)) return fail("UNKNOWN_STEP", `"${id}" is not a step of the mechanism.`, `uncertainty.sigma.${id}`);
    const groups = methodGroups(doc);
    const J = (q: { value: number; unit: keyof typeof ENERGY_FACTORS }) => q.value * ENERGY_FACTORS[q.unit];
    design.uncertainty = {
      samples: u.samples,
      sampler: u.sampler,
      seed: u.seed,
      steps: doc.steps.map((s) => {
        const given = u.sigma?.[s.id];
        const sigma = given ? J(given) : s.uncertainty ? J(s.uncertainty) : J(u.defaultSigma);
        return { step: s.id, sigma, group: groups[s.id] };
      }),
      rho: u.correlation ?? {},
      temperatureSigma: u.temperatureSigma?.value,
    };
  }
  return { ok: true, value: { design, times, chosen, observables: observablesOf(spec), tEnd: tEnd.value } };
}

/** The members of a request (see solver/ensemble.ts planMembers). */
export function planEnsemble(spec: EnsembleSpec, doc: MechanismDocument): Result<EnsembleMember[]> {
  const r = resolveEnsemble(spec, doc);
  if (!r.ok) return r;
  return planMembers(r.value.design);
}

/** Statistics of the recorded members; sensitivities for uncertainty ensembles. */
export function summarizeEnsemble(spec: EnsembleSpec, doc: MechanismDocument, results: MemberResult[], total: number): Result<EnsembleSummary> {
  const r = resolveEnsemble(spec, doc);
  if (!r.ok) return r;
  const { times, chosen, observables } = r.value;
  return {
    ok: true,
    value: summarizeOutcomes({ times, chosen, observables: observables.map((o) => o.key), total, results, failed: total - results.length, sensitivity: spec.mode === "uncertainty" }),
  };
}
