/**
 * One stored run, computed: mechanism snapshot (exchange format) + conditions + solver settings →
 * concentrations on the output grid and the analysis summary. Pure computation (no DB, no node
 * APIs) so it runs in a worker thread and in tests alike.
 *
 * Units: times s, concentrations mol/L, temperatures K, rate constants (mol/L)^(1−m)·s⁻¹.
 */
import { documentToEngine, validateMechanismDocument } from "../../solver/exchange-format";
import {
  buildMechanism,
  degreeOfRateControl,
  massBalanceReport,
  rateConstantUnitLabel,
  simulate,
  yieldsAndSelectivity,
  type SimulateOptions,
  type SimulationResult,
} from "../../solver/index";
import { toEngineConditions, type AnalysisRequest, type Conditions, type ResolvedSolverSettings } from "./run-request";

export interface RunTaskInput {
  snapshot: unknown;
  conditions: Conditions;
  solver: ResolvedSolverSettings;
  analysis?: AnalysisRequest;
}

export interface RunHooks {
  signal?: { readonly aborted: boolean };
  /** s, simulated time reached */
  onProgress?: (tReached: number) => void;
  now?: () => number;
}

export type FailureCode = "budget" | "cancelled" | "invalid" | "engine" | "crash";

export interface RunOutput {
  speciesIds: string[];
  times: Float64Array;
  temperatures: Float64Array;
  conc: Float64Array[];
  analysis: RunAnalysis;
  statistics: RunStatistics;
  warnings: string[];
}

export interface SpeciesSummary {
  /** mol/L */
  initial: number;
  final: number;
  min: number;
  max: number;
  /** s, time of the maximum (intermediates) */
  tMax: number;
  /** fraction consumed by the end, for species present at t = 0 */
  conversion?: number;
  /** s; null when not reached by the end time */
  t50?: number | null;
  t90?: number | null;
  t99?: number | null;
}

export interface RunAnalysis {
  species: Record<string, SpeciesSummary>;
  reactant: string | null;
  products: string[];
  yields: { time: number; conversion: number; yields: Record<string, number>; selectivity: Record<string, number>; unaccounted: number } | null;
  rateControl: { species: string; time: number; degree: Record<string, number>; sum: number; rateDetermining: string; rate: number } | null;
  rateControlNote: string | null;
  massBalance: { maxDrift: number; conservationMaxDrift: number; elements: { element: string; initial: number; maxRelDrift: number }[]; speciesWithoutFormula: string[] } | null;
  /** Rate constants at the start temperature T0. */
  rateConstants: { step: string; T: number; kf: number; kfUnit: string; kr: number | null; krUnit: string | null }[];
  heating: boolean;
  maxInitial: number;
  T0: number;
  eventsLocated: "dense-output" | "output-grid";
}

export interface RunStatistics {
  method: string;
  /** The integrator that produced the result: "rosenbrock", "bdf" or "nonstiff" (absent on runs stored before it was recorded). */
  integrator?: string;
  steps: number;
  accepted: number;
  rejected: number;
  rhsEvaluations: number;
  jacobianEvaluations: number;
  luDecompositions: number;
  /** ms, main integration */
  integrationMs: number;
  /** ms, everything including the analysis runs */
  totalMs: number;
  points: number;
  species: number;
  reactions: number;
}

export type RunTaskResult = { ok: true; value: RunOutput } | { ok: false; code: FailureCode; message: string; path?: string };

const CONVERSIONS = [0.5, 0.9, 0.99];
const MAX_EVENT_SPECIES = 30;
const DRC_MAX_STEPS = 40;

function sumCoef(t: { coef: number }[]): number {
  return t.reduce((s, x) => s + x.coef, 0);
}

export function runTask(input: RunTaskInput, hooks: RunHooks = {}): RunTaskResult {
  const now = hooks.now ?? (() => performance.now());
  const start = now();
  const doc = validateMechanismDocument(input.snapshot);
  if (!doc.ok) return { ok: false, code: "invalid", message: `The mechanism snapshot is not valid: ${doc.error.message}`, path: "mechanism" };
  const eng = documentToEngine(doc.value);
  if (!eng.ok) return { ok: false, code: "invalid", message: eng.error.message, path: eng.error.path };
  const mech = buildMechanism(eng.value.species, eng.value.steps);
  if (!mech.ok) return { ok: false, code: "invalid", message: mech.error.message, path: mech.error.path };
  const { model, rateConstants } = mech.value;
  const cond = toEngineConditions(input.conditions, model.speciesIds);
  if (!cond.ok) return { ok: false, code: "invalid", message: cond.error.message, path: cond.error.path };
  const c = cond.value;

  const present = model.speciesIds.filter((id) => (c.initial[id] ?? 0) > 0);
  const eventSpecies = present.slice(0, MAX_EVENT_SPECIES);
  const s = input.solver;
  const base: SimulateOptions = {
    rateConstants,
    temperature: c.temperature,
    initial: c.initial,
    tEnd: c.tEnd,
    grid: c.grid,
    rtol: s.rtol,
    atol: s.atol,
    method: s.method,
    maxSteps: s.maxSteps,
    maxWallMs: s.wallTimeMs,
    now,
    signal: hooks.signal as AbortSignal | undefined,
  };
  const run = simulate(model, {
    ...base,
    onProgress: hooks.onProgress,
    conversionEvents: eventSpecies.flatMap((species) => CONVERSIONS.map((conversion) => ({ species, conversion }))),
  });
  if (!run.ok) {
    const reason = (run.error as { reason?: string }).reason;
    if (reason === "cancelled") return { ok: false, code: "cancelled", message: "The run was cancelled." };
    if (reason === "budget-time" || reason === "budget-steps" || run.error.code === "BUDGET") {
      return { ok: false, code: "budget", message: `${run.error.message} Nothing was stored; raise the budget, shorten the end time or loosen the tolerances.` };
    }
    return { ok: false, code: "engine", message: run.error.message, path: run.error.path };
  }
  const res = run.value;
  hooks.onProgress?.(c.tEnd);
  const integrationMs = now() - start;

  // ---- per-species summary
  const K = res.times.length;
  const species: Record<string, SpeciesSummary> = {};
  model.speciesIds.forEach((id, i) => {
    const a = res.conc[i];
    let min = Infinity, max = -Infinity, tMax = 0;
    for (let k = 0; k < K; k++) {
      if (a[k] < min) min = a[k];
      if (a[k] > max) ((max = a[k]), (tMax = res.times[k]));
    }
    const sum: SpeciesSummary = { initial: a[0], final: a[K - 1], min, max, tMax };
    if (a[0] > 0) {
      sum.conversion = (a[0] - a[K - 1]) / a[0];
      for (const ev of res.events) {
        if (ev.species !== id) continue;
        if (ev.conversion === 0.5) sum.t50 = ev.time;
        if (ev.conversion === 0.9) sum.t90 = ev.time;
        if (ev.conversion === 0.99) sum.t99 = ev.time;
      }
    }
    species[id] = sum;
  });

  // ---- reactant, products, yields and selectivity
  const req = input.analysis ?? {};
  const reactant = req.reactant && species[req.reactant] ? req.reactant : (present[0] ?? null);
  let products = (req.products ?? []).filter((p) => species[p] && p !== reactant);
  if (products.length === 0 && reactant) {
    const c0R = species[reactant].initial;
    products = model.speciesIds.filter((id) => {
      const sp = species[id];
      if (sp.initial > 0 || id === reactant) return false;
      const i = model.speciesIndex.get(id)!;
      const a = res.conc[i];
      const rising = K < 3 || a[K - 1] >= a[K - 2] - 1e-12 * c0R;
      return sp.final > 0.01 * c0R && rising;
    });
  }
  let yields: RunAnalysis["yields"] = null;
  if (reactant && products.length > 0) {
    const y = yieldsAndSelectivity(res, { reactant, products });
    if (y.ok) yields = y.value;
  }

  // ---- mass balance
  const mb = massBalanceReport(eng.value.species, res);
  const massBalance = mb.ok ? { maxDrift: mb.value.maxDrift, conservationMaxDrift: mb.value.conservationMaxDrift, elements: mb.value.elements, speciesWithoutFormula: mb.value.speciesWithoutFormula } : null;

  // ---- rate constants at T0
  const rateTable = eng.value.steps.map((st, r) => ({
    step: st.id,
    T: c.T0,
    kf: rateConstants[r].kf(c.T0),
    kfUnit: rateConstantUnitLabel(sumCoef(st.reactants)),
    kr: rateConstants[r].kr ? rateConstants[r].kr!(c.T0) : null,
    krUnit: rateConstants[r].kr ? (rateConstantUnitLabel(sumCoef(st.products))) : null,
  }));

  // ---- degree of rate control (2 extra runs per step; within what is left of the budget)
  let rateControl: RunAnalysis["rateControl"] = null;
  let rateControlNote: string | null = null;
  const wantDrc = req.rateControl ?? model.nReactions <= DRC_MAX_STEPS;
  const product = products[0];
  if (!wantDrc) rateControlNote = `Degree of rate control not computed (${model.nReactions} steps; it costs 2 simulations per step — ask for it explicitly).`;
  else if (!product) rateControlNote = "Degree of rate control not computed: no product is forming at the end of the run.";
  else {
    const left = s.wallTimeMs - (now() - start);
    const tR = reactant ? species[reactant].t50 : null;
    const time = tR ?? c.tEnd / 2;
    if (left < 50) rateControlNote = "Degree of rate control skipped: the wall-time budget was used up by the main run.";
    else {
      const d = degreeOfRateControl(model, { ...base, grid: { kind: "times", times: [0, time, c.tEnd] }, maxWallMs: left / (2 * model.nReactions + 2) + 50 }, product, time);
      if (d.ok) rateControl = { species: product, time, ...d.value };
      else if (hooks.signal?.aborted) return { ok: false, code: "cancelled", message: "The run was cancelled." };
      else rateControlNote = `Degree of rate control not available: ${d.error.message}`;
    }
  }

  const statistics: RunStatistics = {
    method: s.method,
    integrator: res.method,
    steps: res.stats.steps,
    accepted: res.stats.accepted,
    rejected: res.stats.rejected,
    rhsEvaluations: res.stats.rhsEvals,
    jacobianEvaluations: res.stats.jacEvals,
    luDecompositions: res.stats.luDecomps,
    integrationMs,
    totalMs: now() - start,
    points: K,
    species: model.nSpecies,
    reactions: model.nReactions,
  };
  return {
    ok: true,
    value: {
      speciesIds: model.speciesIds,
      times: res.times,
      temperatures: res.temperatures,
      conc: res.conc,
      warnings: res.warnings,
      statistics,
      analysis: {
        species,
        reactant,
        products,
        yields,
        rateControl,
        rateControlNote,
        massBalance,
        rateConstants: rateTable,
        heating: c.heating,
        maxInitial: c.maxInitial,
        T0: c.T0,
        eventsLocated: s.method === "stiff" ? "dense-output" : "output-grid",
      },
    },
  };
}

// ---------------------------------------------------------------- compact result storage

/**
 * Results as one little-endian Float64 block: times (K values), temperatures (K values), then
 * each species' concentrations (K values each), in speciesIds order.
 */
export function packResults(out: Pick<RunOutput, "times" | "temperatures" | "conc">): Uint8Array {
  const K = out.times.length;
  const buf = new Float64Array(K * (2 + out.conc.length));
  buf.set(out.times, 0);
  buf.set(out.temperatures, K);
  out.conc.forEach((a, i) => buf.set(a, K * (2 + i)));
  return new Uint8Array(buf.buffer);
}

export function unpackResults(bytes: Uint8Array, points: number, nSpecies: number): { times: Float64Array; temperatures: Float64Array; conc: Float64Array[] } {
  const copy = new Uint8Array(bytes.byteLength);
  copy.set(bytes);
  const all = new Float64Array(copy.buffer, 0, points * (2 + nSpecies));
  const slice = (j: number) => all.subarray(points * j, points * (j + 1));
  return { times: slice(0), temperatures: slice(1), conc: Array.from({ length: nSpecies }, (_, i) => slice(2 + i)) };
}
