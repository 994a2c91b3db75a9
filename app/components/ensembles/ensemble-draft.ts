/**
 * The "New ensemble" form as typed (strings) and its translation into the request body
 * (app/ensembles/ensemble-spec.ts), with errors keyed by form field. Pure: browser and server.
 *
 * Units as the form shows them: temperatures K or °C, concentrations mol/L, mmol/L or µmol/L,
 * barrier shifts and σ kJ/mol, σ of T in K, times s, min or h.
 */
import { EnsembleSpecSchema, type EnsembleSpec } from "~/ensembles/ensemble-spec";
import type { Conditions, SolverSettings } from "~/compute/run-request";

export type AxisUnit = "K" | "°C" | "mol/L" | "mmol/L" | "umol/L" | "kJ/mol" | "kcal/mol";

export interface AxisDraft {
  /** "temperature", "initial:<species id>" or "barrier:<step id>" */
  parameter: string;
  from: string;
  to: string;
  unit: AxisUnit;
  points: string;
  grid: "linear" | "log";
}

export interface EnsembleDraft {
  name: string;
  mode: "uncertainty" | "sweep";
  samples: string;
  sampler: "latin-hypercube" | "monte-carlo";
  seed: string;
  /** kJ/mol, for steps without a stored uncertainty */
  defaultSigma: string;
  /** kJ/mol by step id; "" keeps the stored or default value */
  sigma: Record<string, string>;
  /** ρ by method group */
  correlation: Record<string, string>;
  /** K; "" or 0: exact */
  sigmaT: string;
  axes: AxisDraft[];
  reactant: string;
  products: string[];
  selFirst: string;
  selSecond: string;
  /** comma-separated */
  times: string;
  timeUnit: "s" | "min" | "h";
}

export function defaultAxis(parameter = "temperature"): AxisDraft {
  if (parameter.startsWith("initial:")) return { parameter, from: "0.05", to: "0.5", unit: "mol/L", points: "5", grid: "log" };
  if (parameter.startsWith("barrier:")) return { parameter, from: "-5", to: "5", unit: "kJ/mol", points: "5", grid: "linear" };
  return { parameter: "temperature", from: "20", to: "60", unit: "°C", points: "5", grid: "linear" };
}

export function defaultEnsembleDraft(o: { speciesIds: string[]; groups: string[]; products: string[] }): EnsembleDraft {
  return {
    name: "",
    mode: "uncertainty",
    samples: "200",
    sampler: "latin-hypercube",
    seed: "1",
    defaultSigma: "4",
    sigma: {},
    correlation: Object.fromEntries(o.groups.map((g) => [g, "0.5"])),
    sigmaT: "",
    axes: [defaultAxis()],
    reactant: o.speciesIds[0] ?? "",
    products: o.products.slice(0, 2),
    selFirst: "",
    selSecond: "",
    times: "30, 60, 120",
    timeUnit: "min",
  };
}

const num = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(/\u2212/g, "-")));

export type BuiltEnsemble = { ok: true; spec: EnsembleSpec } | { ok: false; errors: Record<string, string> };

/** Request path (array or dotted, "sweep[0].from.value" alike) → form field key ("samples", "sigma.s1", "axis0.from", "times", …). */
export function ensembleDraftKey(path: (string | number)[]): string {
  const p = path
    .map(String)
    .join(".")
    .replace(/\[(\d+)\]/g, ".$1")
    .split(".")
    .filter(Boolean);
  if (p[0] === "uncertainty") {
    if (p[1] === "sigma") return `sigma.${p[2]}`;
    if (p[1] === "correlation") return `correlation.${p[2]}`;
    if (p[1] === "temperatureSigma") return "sigmaT";
    return p[1] ?? "samples";
  }
  if (p[0] === "sweep") {
    const field = p[2];
    return `axis${p[1] ?? "0"}.${field === "to" || field === "points" ? field : field === "from" ? "from" : "parameter"}`;
  }
  if (p[0] === "observables") return p[1] === "times" || p[1] === "products" || p[1] === "selectivity" ? p[1] : "reactant";
  if (p[0] === "name") return "name";
  return p[0] ?? "form";
}

/** The form → the request body (mechanism, conditions and solver from the caller). */
export function buildEnsemble(d: EnsembleDraft, base: { mechanismId: number; mechanismVersion?: number; conditions: Conditions; solver: SolverSettings }): BuiltEnsemble {
  const errors: Record<string, string> = {};
  const need = (key: string, s: string, what: string) => {
    const v = num(s);
    if (!Number.isFinite(v)) errors[key] ??= `${what} must be a number.`;
    return v;
  };
  const body: Record<string, unknown> = { mechanismId: base.mechanismId, conditions: base.conditions, solver: base.solver, mode: d.mode };
  if (base.mechanismVersion) body.mechanismVersion = base.mechanismVersion;
  if (d.name.trim()) body.name = d.name.trim();
  if (d.mode === "uncertainty") {
    const sigma: Record<string, unknown> = {};
    for (const [id, s] of Object.entries(d.sigma)) if (s.trim() !== "") sigma[id] = { value: need(`sigma.${id}`, s, "An uncertainty"), unit: "kJ/mol" };
    const correlation: Record<string, number> = {};
    for (const [g, s] of Object.entries(d.correlation)) correlation[g] = need(`correlation.${g}`, s, "A correlation");
    const u: Record<string, unknown> = {
      samples: Math.round(need("samples", d.samples, "The number of samples")),
      sampler: d.sampler,
      seed: Math.round(need("seed", d.seed, "The seed")),
      defaultSigma: { value: need("defaultSigma", d.defaultSigma, "The default uncertainty"), unit: "kJ/mol" },
      sigma,
      correlation,
    };
    if (d.sigmaT.trim() !== "" && num(d.sigmaT) !== 0) u.temperatureSigma = { value: need("sigmaT", d.sigmaT, "The temperature uncertainty"), unit: "K" };
    body.uncertainty = u;
  } else {
    body.sweep = d.axes.map((a, i) => {
      const from = need(`axis${i}.from`, a.from, "The start of the range");
      const to = need(`axis${i}.to`, a.to, "The end of the range");
      const points = Math.round(need(`axis${i}.points`, a.points, "The number of points"));
      const common = { points, grid: a.grid };
      if (a.parameter.startsWith("initial:")) return { parameter: "initial", species: a.parameter.slice(8), from: { value: from, unit: a.unit }, to: { value: to, unit: a.unit }, ...common };
      if (a.parameter.startsWith("barrier:")) return { parameter: "barrier", step: a.parameter.slice(8), from: { value: from, unit: a.unit }, to: { value: to, unit: a.unit }, ...common };
      return { parameter: "temperature", from: { value: from, unit: a.unit }, to: { value: to, unit: a.unit }, ...common };
    });
  }
  const times = d.times.split(/[,;\s]+/).filter(Boolean).map((s) => num(s));
  if (times.length === 0) errors.times ??= "Give at least one time, e.g. 10, 30, 60.";
  if (times.some((t) => !Number.isFinite(t))) errors.times ??= "Times must be numbers separated by commas.";
  const observables: Record<string, unknown> = { reactant: d.reactant, products: d.products, times: times.map((value) => ({ value, unit: d.timeUnit })) };
  if (d.selFirst && d.selSecond) observables.selectivity = [d.selFirst, d.selSecond];
  else if (d.selFirst || d.selSecond) errors.selectivity = "Choose both products for the selectivity, or neither.";
  body.observables = observables;
  if (Object.keys(errors).length) return { ok: false, errors };
  const parsed = EnsembleSpecSchema.safeParse(body);
  if (!parsed.success) {
    for (const iss of parsed.error.issues) errors[ensembleDraftKey(iss.path as (string | number)[])] ??= iss.message;
    return { ok: false, errors };
  }
  return { ok: true, spec: parsed.data };
}
