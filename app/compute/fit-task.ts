/**
 * Fitting chosen step barriers to measured datasets (pure; runs in the worker pool).
 * Parameters are barrier shifts δ (J/mol) of the chosen steps (solver/fit.ts): every barrier
 * form moves by δ, so the fitted barrier is "entered value + δ" in the step's own form.
 *
 * Units: times s, concentrations mol/L, temperatures K, shifts and standard errors J/mol.
 */
import { documentToEngine, validateMechanismDocument } from "../../solver/exchange-format";
import { buildMechanism, fitBarriers, shiftBarrier, type FitExperiment } from "../../solver/index";
import type { DocumentStep } from "../../solver/exchange-format";

export interface FitTaskInput {
  snapshot: unknown;
  experiments: { id: string; temperatureK: number; initial: Record<string, number>; observations: { species: string; times: number[]; values: number[] }[] }[];
  stepIds: string[];
  maxWallMs: number;
}

export interface FittedStep {
  stepId: string;
  /** J/mol */
  shift: number;
  se: number;
  ci: number;
  atBound: boolean;
  /** The barrier as entered (exchange format), and the same barrier moved by the shift. */
  form: DocumentStep["barrier"]["form"];
  before: { value: number; unit: string; label: string };
  after: { value: number; unit: string; label: string };
  /** Fitted barrier moved back into an exchange-format step (for saving as a new step version). */
  fittedStep: DocumentStep;
}

export interface FitTaskOutput {
  steps: FittedStep[];
  correlation: number[][];
  ssr: number;
  ssrInitial: number;
  n: number;
  dof: number;
  iterations: number;
  simulations: number;
  converged: boolean;
  stopReason: string;
  confidence: number;
  /** per experiment, per observation: times s, measured and model mol/L, residual = model − measured */
  residuals: { experiment: string; species: string; times: number[]; measured: number[]; model: number[]; residual: number[] }[];
  wallMs: number;
}

export type FitTaskResult = { ok: true; value: FitTaskOutput } | { ok: false; message: string; path?: string };

const ENERGY_PER_J: Record<string, number> = { "kJ/mol": 1e-3, "kcal/mol": 1 / 4184, "J/mol": 1, eV: 1 / 96485.33212, "cm-1": 1 / 11.96265656, hartree: 1 / 2625499.6395 };

function barrierEnergy(b: DocumentStep["barrier"]): { key: "dG" | "dH" | "Ea" | "k"; value: number; unit: string; label: string } {
  switch (b.form) {
    case "dG":
      return { key: "dG", value: b.dG, unit: b.unit, label: `ΔG‡(${b.T} K)` };
    case "dHdS":
      return { key: "dH", value: b.dH, unit: b.unit, label: "ΔH‡" };
    case "thermal":
      return { key: "Ea", value: b.Ea, unit: b.unit, label: "Ea" };
    case "arrhenius":
      return { key: "Ea", value: b.Ea, unit: b.unit, label: "Ea" };
    case "measured":
      return { key: "k", value: b.k, unit: "k", label: `k(${b.T} K)` };
  }
}

/** The document step with its barrier moved by `shift` J/mol, in its own units. */
export function shiftDocumentStep(step: DocumentStep, shift: number): DocumentStep {
  const b = step.barrier;
  const per = (u: string) => ENERGY_PER_J[u] ?? 1e-3;
  const tidy = (v: number) => Number(v.toPrecision(10));
  switch (b.form) {
    case "dG":
      return { ...step, barrier: { ...b, dG: tidy(b.dG + shift * per(b.unit)), ...(b.dH !== undefined ? { dH: tidy(b.dH + shift * per(b.unit)) } : {}) } };
    case "dHdS":
      return { ...step, barrier: { ...b, dH: tidy(b.dH + shift * per(b.unit)) } };
    case "thermal":
      return { ...step, barrier: { ...b, Ea: tidy(b.Ea + shift * per(b.unit)) } };
    case "arrhenius":
      return { ...step, barrier: { ...b, Ea: tidy(b.Ea + shift * per(b.unit)) } };
    case "measured": {
      const k = tidy(b.k * Math.exp(-shift / (8.31446261815324 * b.T))); // R = k_B·N_A, CODATA 2018
      return { ...step, barrier: { ...b, k, ...(b.Ea !== undefined && b.unit ? { Ea: tidy(b.Ea + shift * per(b.unit)) } : {}) } };
    }
  }
}

export function fitTask(input: FitTaskInput, hooks: { signal?: { readonly aborted: boolean } } = {}): FitTaskResult {
  const t0 = performance.now();
  const doc = validateMechanismDocument(input.snapshot);
  if (!doc.ok) return { ok: false, message: `The mechanism snapshot is not valid: ${doc.error.message}` };
  const eng = documentToEngine(doc.value);
  if (!eng.ok) return { ok: false, message: eng.error.message, path: eng.error.path };
  const mech = buildMechanism(eng.value.species, eng.value.steps);
  if (!mech.ok) return { ok: false, message: mech.error.message, path: mech.error.path };
  const experiments: FitExperiment[] = input.experiments.map((e) => ({
    id: e.id,
    temperature: { kind: "isothermal", T: e.temperatureK },
    initial: e.initial,
    observations: e.observations.map((o) => ({ species: o.species, times: o.times, values: o.values })),
  }));
  const r = fitBarriers(
    mech.value.model,
    mech.value.rateConstants,
    experiments,
    input.stepIds.map((stepId) => ({ stepId })),
    { maxWallMs: input.maxWallMs, signal: hooks.signal as AbortSignal | undefined },
  );
  if (!r.ok) return { ok: false, message: r.error.message, path: r.error.path };
  const f = r.value;
  const steps: FittedStep[] = f.parameters.map((p) => {
    const st = doc.value.steps.find((s) => s.id === p.stepId)!;
    const be = barrierEnergy(st.barrier);
    const moved = shiftDocumentStep(st, p.shift);
    const ae = barrierEnergy(moved.barrier);
    const check = shiftBarrier(eng.value.steps.find((s) => s.id === p.stepId)!, p.shift); // engine agrees the shift applies to this form
    if (!check.ok) return null as never;
    return { stepId: p.stepId, shift: p.shift, se: p.se, ci: p.ci, atBound: p.atBound, form: st.barrier.form, before: { value: be.value, unit: be.unit, label: be.label }, after: { value: ae.value, unit: ae.unit, label: ae.label }, fittedStep: moved };
  });
  const residuals: FitTaskOutput["residuals"] = [];
  input.experiments.forEach((e, i) =>
    e.observations.forEach((o, j) =>
      residuals.push({ experiment: e.id, species: o.species, times: o.times, measured: o.values, model: f.fitted[i][j], residual: f.residuals[i][j] }),
    ),
  );
  return {
    ok: true,
    value: {
      steps,
      correlation: f.correlation,
      ssr: f.ssr,
      ssrInitial: f.ssrInitial,
      n: f.n,
      dof: f.dof,
      iterations: f.iterations,
      simulations: f.simulations,
      converged: f.converged,
      stopReason: f.stopReason,
      confidence: f.confidence,
      residuals,
      wallMs: performance.now() - t0,
    },
  };
}
