/**
 * Analysis of simulations: half-lives and times to a conversion, final conversion, yields and
 * selectivity, sensitivity of chosen outcomes to each step's barrier, degree of rate control,
 * and the mass-balance (element and conservation-law) drift of a run.
 *
 * Units: times s; concentrations mol/L; rates mol L⁻¹ s⁻¹; temperatures K; barrier shifts
 * J/mol internally, sensitivities reported per kJ/mol; conversions, yields, selectivities and
 * degrees of rate control are fractions (unitless).
 *
 * Barrier sensitivity. Shifting the transition-state free energy of step i by δ (J/mol)
 * multiplies both its forward and reverse rate constants by exp(−δ/RT), leaving K_eq unchanged.
 * The sensitivity of an outcome O is ∂O/∂ΔG‡_i, found by a central difference over ±δ
 * (default δ = 0.01 kJ/mol). The normalised sensitivity is
 *     X_i = ∂ln O/∂ln k_i = −RT·∂ln O/∂ΔG‡_i,
 * which for O a rate of product formation is Campbell's degree of rate control
 * (C. T. Campbell, J. Catal. 204, 520 (2001); C. Stegelmann, A. Andreasen, C. T. Campbell,
 * J. Am. Chem. Soc. 131, 8077 (2009)). At a steady state, Σ_i X_i = 1 over the steps.
 */
import { R_GAS } from "./constants.ts";
import { parseFormula } from "./formula.ts";
import type { CompiledModel } from "./model.ts";
import { simulate, type SimulateOptions, type SimulationResult, type StepRateFunctions } from "./simulate.ts";
import type { EngineError, Result, Species } from "./types.ts";

function bad<T>(code: string, message: string, path?: string): Result<T> {
  const error: EngineError = path ? { code, message, path } : { code, message };
  return { ok: false, error };
}

// ---------------------------------------------------------------------------------------------
// Times to conversion

/**
 * Times (s) at which `species` reaches each fractional conversion (0–1), found on the dense
 * output of one run; null where the conversion is not reached by options.tEnd.
 */
export function timesToConversion(model: CompiledModel, options: SimulateOptions, species: string, conversions: number[]): Result<(number | null)[]> {
  if (!Array.isArray(conversions) || conversions.length === 0) return bad("BAD_EVENT", "At least one conversion is needed.", "conversions");
  const r = simulate(model, { ...options, conversionEvents: conversions.map((conversion) => ({ species, conversion })) });
  if (!r.ok) return r;
  return { ok: true, value: r.value.events.map((e) => e.time) };
}

/** Half-life (s) of `species`: the time at which half of it is consumed; null if not reached by tEnd. */
export function halfLife(model: CompiledModel, options: SimulateOptions, species: string): Result<number | null> {
  const r = timesToConversion(model, options, species, [0.5]);
  return r.ok ? { ok: true, value: r.value[0] } : r;
}

// ---------------------------------------------------------------------------------------------
// Yields and selectivity

export interface YieldRequest {
  /** Limiting reactant. */
  reactant: string;
  /** Products whose yields and selectivities are wanted. */
  products: string[];
  /**
   * Moles of reactant consumed per mole of each product formed (default 1 for each), so that
   * yield = ν·Δc_product / c_reactant(0).
   */
  reactantPerProduct?: Record<string, number>;
  /** Index into result.times; default the last output time. */
  at?: number;
}

export interface YieldReport {
  /** s */
  time: number;
  /** Fraction of the reactant consumed. */
  conversion: number;
  /** Per product: fraction of the initial reactant that became this product. */
  yields: Record<string, number>;
  /** Per product: its share of the reactant turned into the listed products (sums to 1). */
  selectivity: Record<string, number>;
  /** Fraction of the consumed reactant not found in the listed products (intermediates, other products). */
  unaccounted: number;
}

/** Conversion, yields and selectivity at one output time of a run. */
export function yieldsAndSelectivity(result: SimulationResult, req: YieldRequest): Result<YieldReport> {
  const idx = (id: string, path: string): Result<number> => {
    const i = result.speciesIds.indexOf(id);
    return i < 0 ? bad("UNKNOWN_SPECIES", `Species "${id}" is not in the run.`, path) : { ok: true, value: i };
  };
  const K = result.times.length;
  const at = req.at ?? K - 1;
  if (!Number.isInteger(at) || at < 0 || at >= K) return bad("BAD_INDEX", `The output index must be an integer from 0 to ${K - 1}.`, "at");
  const ri = idx(req.reactant, "reactant");
  if (!ri.ok) return ri;
  const cR0 = result.conc[ri.value][0];
  if (!(cR0 > 0)) return bad("BAD_EVENT", `The reactant "${req.reactant}" starts at zero concentration, so yields are undefined.`, "reactant");
  if (!Array.isArray(req.products) || req.products.length === 0) return bad("EMPTY_INPUT", "At least one product is needed.", "products");
  const conversion = (cR0 - result.conc[ri.value][at]) / cR0;
  const yields: Record<string, number> = {};
  const formed: number[] = [];
  for (let p = 0; p < req.products.length; p++) {
    const id = req.products[p];
    const pi = idx(id, `products[${p}]`);
    if (!pi.ok) return pi;
    const nu = req.reactantPerProduct?.[id] ?? 1;
    if (!(nu > 0) || !Number.isFinite(nu)) return bad("BAD_STOICHIOMETRY", `The reactant-per-product ratio of "${id}" must be a positive number.`, `reactantPerProduct.${id}`);
    const d = nu * (result.conc[pi.value][at] - result.conc[pi.value][0]);
    formed.push(d);
    yields[id] = d / cR0;
  }
  const total = formed.reduce((s, v) => s + v, 0);
  const selectivity: Record<string, number> = {};
  req.products.forEach((id, p) => (selectivity[id] = total > 0 ? formed[p] / total : 0));
  const consumed = cR0 - result.conc[ri.value][at];
  return {
    ok: true,
    value: { time: result.times[at], conversion, yields, selectivity, unaccounted: consumed > 0 ? (consumed - total) / cR0 : 0 },
  };
}

// ---------------------------------------------------------------------------------------------
// Barrier sensitivities and degree of rate control

export type Outcome =
  | { kind: "concentration"; species: string; time: number } // mol/L at time (s)
  | { kind: "rate"; species: string; time: number } // net formation rate dc/dt, mol L⁻¹ s⁻¹, at time (s)
  | { kind: "timeToConversion"; species: string; conversion: number } // s
  | { kind: "selectivity"; product: string; among: string[]; time: number }; // fraction at time (s)

export interface OutcomeSensitivity {
  outcome: Outcome;
  /** Value of the outcome in the unperturbed run (units of the outcome). */
  value: number;
  /** Per step id: ∂O/∂ΔG‡ in outcome units per kJ/mol. */
  perKJ: Record<string, number>;
  /** Per step id: ∂ln O/∂ln k = −RT·∂ln O/∂ΔG‡ (unitless); Campbell's X_RC for a rate. */
  normalized: Record<string, number>;
  /** Σ of the normalised sensitivities (1 for a rate at a steady state). */
  normalizedSum: number;
}

export interface SensitivityOptions {
  /** Step ids to perturb; default every step. */
  steps?: string[];
  /** Barrier shift for the central difference, J/mol; default 10 (0.01 kJ/mol, k changes by ≈0.4 % at 298 K). */
  delta?: number;
}

interface Evaluator {
  times: number[];
  evaluate(r: SimulationResult, kAt: (T: number) => { kf: Float64Array; kr: Float64Array }): Result<number[]>;
}

function outcomeEvaluator(model: CompiledModel, outcomes: Outcome[], tEnd: number): Result<Evaluator> {
  const times = new Set<number>([tEnd]);
  const sp = (id: string, path: string): Result<number> => {
    const i = model.speciesIndex.get(id);
    return i === undefined ? bad("UNKNOWN_SPECIES", `Outcome species "${id}" is not in the mechanism.`, path) : { ok: true, value: i };
  };
  for (let o = 0; o < outcomes.length; o++) {
    const oc = outcomes[o];
    const path = `outcomes[${o}]`;
    if (!oc || typeof oc !== "object") return bad("BAD_OUTCOME", "An outcome is missing.", path);
    if (oc.kind === "concentration" || oc.kind === "rate" || oc.kind === "selectivity") {
      if (!(oc.time >= 0 && oc.time <= tEnd)) return bad("BAD_OUTCOME", "An outcome time must lie within [0, end time] seconds.", `${path}.time`);
      times.add(oc.time);
    }
    if (oc.kind === "selectivity") {
      const e = sp(oc.product, `${path}.product`);
      if (!e.ok) return e;
      if (!Array.isArray(oc.among) || !oc.among.includes(oc.product)) return bad("BAD_OUTCOME", "A selectivity needs the list of products it is taken among, including its own product.", `${path}.among`);
      for (let j = 0; j < oc.among.length; j++) {
        const e2 = sp(oc.among[j], `${path}.among[${j}]`);
        if (!e2.ok) return e2;
      }
    } else if (oc.kind === "concentration" || oc.kind === "rate" || oc.kind === "timeToConversion") {
      const e = sp(oc.species, `${path}.species`);
      if (!e.ok) return e;
      if (oc.kind === "timeToConversion" && !(oc.conversion > 0 && oc.conversion < 1)) {
        return bad("BAD_OUTCOME", "A conversion must be a fraction strictly between 0 and 1.", `${path}.conversion`);
      }
    } else return bad("BAD_OUTCOME", `Unknown outcome kind "${String((oc as { kind?: unknown }).kind)}".`, `${path}.kind`);
  }
  const sorted = [...times].sort((a, b) => a - b);
  const nS = model.nSpecies;
  const c = new Float64Array(nS);
  const dc = new Float64Array(nS);
  return {
    ok: true,
    value: {
      times: sorted,
      evaluate(r, kAt) {
        const k = (t: number) => sorted.indexOf(t);
        const vals: number[] = [];
        let ev = 0;
        for (let o = 0; o < outcomes.length; o++) {
          const oc = outcomes[o];
          if (oc.kind === "concentration") vals.push(r.conc[model.speciesIndex.get(oc.species)!][k(oc.time)]);
          else if (oc.kind === "rate") {
            const j = k(oc.time);
            for (let i = 0; i < nS; i++) c[i] = r.conc[i][j];
            const kk = kAt(r.temperatures[j]);
            model.rhs(c, kk.kf, kk.kr, dc);
            vals.push(dc[model.speciesIndex.get(oc.species)!]);
          } else if (oc.kind === "timeToConversion") {
            const t = r.events[ev++].time;
            if (t === null) return bad("OUTCOME_UNDEFINED", `Species "${oc.species}" does not reach ${oc.conversion * 100} % conversion by the end time.`, `outcomes[${o}]`);
            vals.push(t);
          } else {
            const j = k(oc.time);
            let tot = 0;
            for (const id of oc.among) {
              const i = model.speciesIndex.get(id)!;
              tot += r.conc[i][j] - r.conc[i][0];
            }
            const i = model.speciesIndex.get(oc.product)!;
            if (!(tot > 0)) return bad("OUTCOME_UNDEFINED", "No product has formed yet at the selectivity time.", `outcomes[${o}]`);
            vals.push((r.conc[i][j] - r.conc[i][0]) / tot);
          }
        }
        return { ok: true, value: vals };
      },
    },
  };
}

function rateFns(options: SimulateOptions, model: CompiledModel): Result<StepRateFunctions[]> {
  const rc = options.rateConstants;
  if (Array.isArray(rc)) {
    if (rc.length !== model.nReactions) return bad("BAD_RATE_CONSTANTS", `Rate constants were given for ${rc.length} steps but the mechanism has ${model.nReactions}.`, "rateConstants");
    return { ok: true, value: rc };
  }
  if (!rc || typeof rc !== "object") return bad("BAD_RATE_CONSTANTS", "Rate constants are required.", "rateConstants");
  const out: StepRateFunctions[] = [];
  for (const id of model.reactionIds) {
    const f = rc[id];
    if (!f) return bad("BAD_RATE_CONSTANTS", `No rate constant was given for step "${id}".`, `rateConstants.${id}`);
    out.push(f);
  }
  return { ok: true, value: out };
}

/** Rate functions with step `r` shifted by δ J/mol: k → k·exp(−δ/RT) for both directions. */
function shifted(fns: StepRateFunctions[], r: number, delta: number): StepRateFunctions[] {
  const out = fns.slice();
  const f = fns[r];
  const g = (T: number) => Math.exp(-delta / (R_GAS * T));
  out[r] = { kf: (T) => f.kf(T) * g(T), kr: f.kr ? (T) => f.kr!(T) * g(T) : undefined };
  return out;
}

/**
 * Sensitivity of each outcome to each step's barrier (central difference on ΔG‡ of the
 * transition state), and the normalised sensitivities ∂ln O/∂ln k (degree of rate control for a
 * rate outcome). Runs 1 + 2·(number of steps) simulations with the caller's options
 * (rtol at most 1e-8 here so that the differences are resolved).
 */
export function barrierSensitivities(
  model: CompiledModel,
  options: SimulateOptions,
  outcomes: Outcome[],
  sens: SensitivityOptions = {},
): Result<OutcomeSensitivity[]> {
  if (!Array.isArray(outcomes) || outcomes.length === 0) return bad("EMPTY_INPUT", "At least one outcome is needed.", "outcomes");
  const delta = sens.delta ?? 10;
  if (!(delta > 0) || !Number.isFinite(delta) || delta > 10e3) return bad("BAD_DELTA", "The barrier shift must be a positive number of J/mol up to 10 kJ/mol.", "delta");
  if (!(options?.tEnd > 0) || !Number.isFinite(options.tEnd)) return bad("TIME_SPAN", "The end time must be a positive finite number of seconds.", "tEnd");
  const ev = outcomeEvaluator(model, outcomes, options.tEnd);
  if (!ev.ok) return ev;
  const fnsR = rateFns(options, model);
  if (!fnsR.ok) return fnsR;
  const fns = fnsR.value;
  const stepIdx: number[] = [];
  for (const [j, id] of (sens.steps ?? model.reactionIds).entries()) {
    const r = model.reactionIds.indexOf(id);
    if (r < 0) return bad("UNKNOWN_STEP", `Step "${id}" is not in the mechanism.`, `steps[${j}]`);
    stepIdx.push(r);
  }
  const conversionEvents = outcomes.flatMap((o) => (o.kind === "timeToConversion" ? [{ species: o.species, conversion: o.conversion }] : []));
  const nR = model.nReactions;
  const kfBuf = new Float64Array(nR);
  const krBuf = new Float64Array(nR);
  const run = (f: StepRateFunctions[], label: string): Result<number[]> => {
    const r = simulate(model, {
      ...options,
      rtol: Math.min(options.rtol ?? 1e-8, 1e-8),
      rateConstants: f,
      grid: { kind: "times", times: ev.value.times },
      conversionEvents,
      conservation: false,
    });
    if (!r.ok) return bad(r.error.code, `${r.error.message} (${label})`, r.error.path);
    const kAt = (T: number) => {
      for (let q = 0; q < nR; q++) {
        kfBuf[q] = f[q].kf(T);
        krBuf[q] = model.reversible[q] ? f[q].kr!(T) : 0;
      }
      return { kf: kfBuf, kr: krBuf };
    };
    return ev.value.evaluate(r.value, kAt);
  };
  const base = run(fns, "unperturbed run");
  if (!base.ok) return base;
  // temperature at each outcome: the one at its time (end time for times to conversion)
  const T0 = simulateTemperature(options);
  const results: OutcomeSensitivity[] = outcomes.map((outcome, o) => ({ outcome, value: base.value[o], perKJ: {}, normalized: {}, normalizedSum: 0 }));
  for (const r of stepIdx) {
    const id = model.reactionIds[r];
    const up = run(shifted(fns, r, delta), `step "${id}" barrier +${delta} J/mol`);
    if (!up.ok) return up;
    const dn = run(shifted(fns, r, -delta), `step "${id}" barrier −${delta} J/mol`);
    if (!dn.ok) return dn;
    outcomes.forEach((oc, o) => {
      const d = (up.value[o] - dn.value[o]) / (2 * delta); // per J/mol
      const T = T0(oc.kind === "timeToConversion" ? base.value[o] : oc.time);
      const v = base.value[o];
      const x = v !== 0 ? (-R_GAS * T * d) / v : 0;
      results[o].perKJ[id] = d * 1000;
      results[o].normalized[id] = x;
      results[o].normalizedSum += x;
    });
  }
  return { ok: true, value: results };
}

/** T(t) in K of the options' temperature program (isothermal, ramp or holds), for normalisation. */
function simulateTemperature(options: SimulateOptions): (t: number) => number {
  const p = options.temperature;
  if (p.kind === "isothermal") return () => p.T;
  if (p.kind === "holds") {
    return (t) => {
      let k = 0;
      while (k + 1 < p.holds.length && t >= p.holds[k + 1][0]) k++;
      return p.holds[k][1];
    };
  }
  const perS = (p.rateUnit ?? "K/min") === "K/min" ? p.rate / 60 : p.rate;
  const hold = p.holdBefore ?? 0;
  const dir = Math.sign(p.T1 - p.T0);
  const tEndRamp = hold + Math.abs(p.T1 - p.T0) / perS;
  return (t) => (t <= hold ? p.T0 : t >= tEndRamp ? p.T1 : p.T0 + dir * perS * (t - hold));
}

export interface RateControlReport {
  /** Per step id: X_RC (unitless). */
  degree: Record<string, number>;
  /** Σ X_RC (≈ 1 at a steady state). */
  sum: number;
  /** Step id with the largest X_RC: the rate-determining step, when one dominates. */
  rateDetermining: string;
  /** Rate of formation of the species at the time, mol L⁻¹ s⁻¹. */
  rate: number;
}

/**
 * Campbell's degree of rate control of each step for the net formation rate of `species` at
 * `time` (s): X_RC,i = ∂ln r/∂ln k_i with K_eq,i held constant (see the module comment).
 */
export function degreeOfRateControl(
  model: CompiledModel,
  options: SimulateOptions,
  species: string,
  time: number,
  sens: SensitivityOptions = {},
): Result<RateControlReport> {
  const r = barrierSensitivities(model, options, [{ kind: "rate", species, time }], sens);
  if (!r.ok) return r;
  const s = r.value[0];
  if (s.value === 0) return bad("OUTCOME_UNDEFINED", `The formation rate of "${species}" is zero at ${time} s, so the degree of rate control is undefined.`, "species");
  let best = "";
  let bestV = -Infinity;
  for (const [id, v] of Object.entries(s.normalized)) if (v > bestV) ((bestV = v), (best = id));
  return { ok: true, value: { degree: s.normalized, sum: s.normalizedSum, rateDetermining: best, rate: s.value } };
}

// ---------------------------------------------------------------------------------------------
// Mass balance

export interface ElementDrift {
  element: string; // element symbol, or "charge"
  /** mol/L of the element (atoms) at t = 0. */
  initial: number;
  /** max over output times of |total(t) − total(0)| / total(0) (unitless; absolute when total(0) = 0). */
  maxRelDrift: number;
}

export interface MassBalanceReport {
  /** Per element from species formulas; empty when no species has a formula. */
  elements: ElementDrift[];
  /** Species without a usable formula (left out of the element totals). */
  speciesWithoutFormula: string[];
  /** Largest relative drift of the stoichiometric conservation laws (from the run). */
  conservationMaxDrift: number;
  /** Largest element or conservation drift. */
  maxDrift: number;
}

/**
 * Element (and charge) totals over a run from species formulas, and their drift; together with
 * the conservation-law drift simulate() already measured. `species` are the mechanism's species.
 */
export function massBalanceReport(species: Species[], result: SimulationResult): Result<MassBalanceReport> {
  if (!Array.isArray(species)) return bad("EMPTY_INPUT", "The species list is required.", "species");
  const counts = new Map<string, Float64Array>(); // element → atoms per species
  const missing: string[] = [];
  const nS = result.speciesIds.length;
  const charge = new Float64Array(nS);
  let anyCharge = false;
  for (let i = 0; i < nS; i++) {
    const s = species.find((x) => x.id === result.speciesIds[i]);
    if (!s?.formula) {
      missing.push(result.speciesIds[i]);
      continue;
    }
    const f = parseFormula(s.formula);
    if (!f.ok) {
      missing.push(result.speciesIds[i]);
      continue;
    }
    for (const [el, n] of Object.entries(f.value.elements)) {
      let a = counts.get(el);
      if (!a) counts.set(el, (a = new Float64Array(nS)));
      a[i] = n;
    }
    const q = s.charge ?? f.value.charge;
    if (q) ((charge[i] = q), (anyCharge = true));
  }
  const K = result.times.length;
  const driftOf = (w: Float64Array, name: string): ElementDrift => {
    let L0 = 0, scale = 0;
    for (let i = 0; i < nS; i++) ((L0 += w[i] * result.conc[i][0]), (scale += Math.abs(w[i]) * result.conc[i][0]));
    let m = 0;
    for (let k = 0; k < K; k++) {
      let L = 0;
      for (let i = 0; i < nS; i++) L += w[i] * result.conc[i][k];
      const d = Math.abs(L - L0) / (scale > 0 ? scale : 1);
      if (d > m) m = d;
    }
    return { element: name, initial: L0, maxRelDrift: m };
  };
  const elements = [...counts.keys()].sort().map((el) => driftOf(counts.get(el)!, el));
  if (anyCharge) elements.push(driftOf(charge, "charge"));
  const maxEl = elements.reduce((m, e) => Math.max(m, e.maxRelDrift), 0);
  return {
    ok: true,
    value: { elements, speciesWithoutFormula: missing, conservationMaxDrift: result.maxDrift, maxDrift: Math.max(maxEl, result.maxDrift) },
  };
}
