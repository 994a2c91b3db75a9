/**
 * The step editor's form state (strings, as typed) ⇄ StepInput (numbers with units).
 * Pure: the browser uses it for live derived values and client-side checks, the server
 * receives the built StepInput and validates it again with the same zod schema.
 * Temperatures typed in °C are converted to K here (T/K = t/°C + 273.15).
 */
import type { DocumentReactionThermo, DocumentStep } from "../../../solver/exchange-format";
import { StepInputSchema, fieldErrors, speciesKey, type StepInput } from "./step-schema";

export type BarrierForm = "dG" | "dHdS" | "thermal" | "arrhenius" | "measured";

export interface StepFormState {
  label: string;
  reactants: Array<{ speciesId: string; coef: string }>;
  products: Array<{ speciesId: string; coef: string }>;
  reversible: boolean;
  form: BarrierForm;
  eu: "kJ/mol" | "kcal/mol" | "eV";
  su: "J/(mol K)" | "cal/(mol K)";
  tu: "K" | "C";
  standardState: "1M" | "1bar" | "1atm";
  dG: string;
  dH: string;
  dS: string;
  Ea: string;
  dn: string;
  Tref: string;
  A: string;
  n: string;
  k: string;
  /** ΔG°rxn, optional on every step (required for a reversible one), in `eu` */
  rxnDG: string;
  /** ΔH°rxn (optional; gives ΔG°rxn its temperature dependence), in `eu` */
  rxnDH: string;
  /** temperature ΔG°rxn refers to, in `tu` */
  rxnT: string;
  /** standard state of ΔG°rxn */
  rxnSS: "1M" | "1bar" | "1atm";
  /** A stored ΔH°/ΔS° reaction thermochemistry, kept as it is unless a ΔG°rxn is typed. */
  rxnKept: DocumentReactionThermo | null;
  kappa: string;
  imag: string;
  tmin: string;
  tmax: string;
  unc: string;
  source: "computed" | "measured" | "estimated" | "literature";
  method: string;
  citation: string;
  doi: string;
  solvent: string;
  notes: string;
  tags: string;
  message: string;
}

export function emptyForm(): StepFormState {
  return {
    label: "",
    reactants: [{ speciesId: "", coef: "1" }],
    products: [{ speciesId: "", coef: "1" }],
    reversible: false,
    form: "dG",
    eu: "kJ/mol",
    su: "J/(mol K)",
    tu: "K",
    standardState: "1M",
    dG: "",
    dH: "",
    dS: "",
    Ea: "",
    dn: "-1",
    Tref: "298.15",
    A: "",
    n: "",
    k: "",
    rxnDG: "",
    rxnDH: "",
    rxnT: "298.15",
    rxnSS: "1M",
    rxnKept: null,
    kappa: "",
    imag: "",
    tmin: "",
    tmax: "",
    unc: "",
    source: "computed",
    method: "",
    citation: "",
    doi: "",
    solvent: "",
    notes: "",
    tags: "",
    message: "",
  };
}

const str = (v: number | undefined | null) => (v === undefined || v === null ? "" : String(v));

/** A stored step (exchange-format content, user units) → form state. */
export function formFromContent(c: DocumentStep, display: { temperatureUnit?: string; entropyUnit?: string }): StepFormState {
  const f = emptyForm();
  const tu = display.temperatureUnit === "C" ? "C" : "K";
  const t = (K: number | undefined) => (K === undefined ? "" : tu === "C" ? String(Number((K - 273.15).toFixed(6))) : String(K));
  const b = c.barrier;
  f.tu = tu;
  f.label = c.label ?? "";
  f.reactants = c.reactants.map((r) => ({ speciesId: r.species.replace(/^s/, ""), coef: String(r.coef) }));
  f.products = c.products.map((r) => ({ speciesId: r.species.replace(/^s/, ""), coef: String(r.coef) }));
  f.reversible = c.reversible;
  f.form = b.form;
  if ("unit" in b && b.unit && ["kJ/mol", "kcal/mol", "eV"].includes(b.unit)) f.eu = b.unit as StepFormState["eu"];
  if ("entropyUnit" in b) f.su = b.entropyUnit;
  else if (display.entropyUnit === "cal/(mol K)") f.su = "cal/(mol K)";
  if ("standardState" in b) f.standardState = b.standardState;
  if (b.form === "dG") Object.assign(f, { dG: str(b.dG), dH: str(b.dH), Tref: t(b.T) });
  if (b.form === "dHdS") Object.assign(f, { dH: str(b.dH), dS: str(b.dS) });
  if (b.form === "thermal") Object.assign(f, { Ea: str(b.Ea), dS: str(b.dS), dn: str(b.dn), Tref: t(b.T) });
  if (b.form === "arrhenius") Object.assign(f, { A: str(b.A), Ea: str(b.Ea), n: str(b.n), Tref: t(b.T) });
  if (b.form === "measured") Object.assign(f, { k: str(b.k), Tref: t(b.T), Ea: str(b.Ea) });
  const th = c.reactionThermo;
  if (th) f.rxnSS = th.standardState;
  if (th?.form === "dG") Object.assign(f, { rxnDG: str(th.dG), rxnDH: str(th.dH), rxnT: t(th.T) });
  else if (th) f.rxnKept = th;
  if (th?.form === "dG" && th.unit !== (f.eu as string)) {
    // the form types ΔG°rxn in the barrier's energy unit: keep a value stored in another unit as it is
    f.rxnKept = th;
    Object.assign(f, { rxnDG: "", rxnDH: "" });
  }
  f.kappa = str(c.kappa);
  f.imag = str(c.imaginaryFrequency?.value);
  f.tmin = t(c.validRange?.Tmin);
  f.tmax = t(c.validRange?.Tmax);
  f.unc = str(c.uncertainty?.value);
  const p = c.provenance;
  if (p) Object.assign(f, { source: p.source, method: p.method ?? "", citation: p.citation ?? "", doi: p.doi ?? "", solvent: p.solvent ?? "", notes: p.notes ?? "" });
  f.tags = (c.tags ?? []).join(", ");
  return f;
}

export interface BuiltForm {
  input: StepInput | null;
  errors: Record<string, string>;
}

/** Form state → StepInput, with one message per field that cannot be read or fails the schema. */
export function buildStepInput(f: StepFormState): BuiltForm {
  const errors: Record<string, string> = {};
  const num = (key: string, v: string, required: boolean): number | undefined => {
    const s = v.trim().replace(/,/g, ".").replace(/[×x]10\^?/i, "e");
    if (s === "") {
      if (required) errors[key] = "Required.";
      return undefined;
    }
    const n = Number(s);
    if (!Number.isFinite(n)) {
      errors[key] = `"${v}" is not a number.`;
      return undefined;
    }
    return n;
  };
  const toK = (key: string, v: string, required: boolean) => {
    const n = num(key, v, required);
    if (n === undefined) return undefined;
    const K = f.tu === "C" ? n + 273.15 : n;
    if (!(K > 0)) {
      errors[key] = "Must be above absolute zero.";
      return undefined;
    }
    return K;
  };
  const terms = (side: "reactants" | "products") =>
    f[side]
      .filter((t) => t.speciesId !== "")
      .map((t, i) => ({ speciesId: Number(t.speciesId), coef: num(`${side}[${i}].coef`, t.coef, true) ?? 1 }));
  const rateUnit = { concentration: "mol/L" as const, time: "s" as const };
  let barrier: StepInput["barrier"] | undefined;
  switch (f.form) {
    case "dG": {
      const dG = num("barrier.dG", f.dG, true);
      const dH = num("barrier.dH", f.dH, false);
      const T = toK("barrier.T", f.Tref, true);
      if (dG !== undefined && T !== undefined) barrier = { form: "dG", dG, unit: f.eu, T, standardState: f.standardState, ...(dH !== undefined ? { dH } : {}) };
      break;
    }
    case "dHdS": {
      const dH = num("barrier.dH", f.dH, true);
      const dS = num("barrier.dS", f.dS, true);
      if (dH !== undefined && dS !== undefined) barrier = { form: "dHdS", dH, dS, unit: f.eu, entropyUnit: f.su, standardState: f.standardState };
      break;
    }
    case "thermal": {
      const Ea = num("barrier.Ea", f.Ea, true);
      const dS = num("barrier.dS", f.dS, true);
      const dn = num("barrier.dn", f.dn, true);
      const T = toK("barrier.T", f.Tref, true);
      if (Ea !== undefined && dS !== undefined && dn !== undefined && T !== undefined) barrier = { form: "thermal", Ea, dS, dn, unit: f.eu, entropyUnit: f.su, standardState: f.standardState, T };
      break;
    }
    case "arrhenius": {
      const A = num("barrier.A", f.A, true);
      const Ea = num("barrier.Ea", f.Ea, true);
      const n = num("barrier.n", f.n, false);
      const T = toK("barrier.T", f.Tref, false);
      if (A !== undefined && Ea !== undefined) barrier = { form: "arrhenius", A, rateUnit, Ea, unit: f.eu, ...(n !== undefined ? { n } : {}), ...(n !== undefined && T ? { T } : {}) };
      break;
    }
    case "measured": {
      const k = num("barrier.k", f.k, true);
      const T = toK("barrier.T", f.Tref, true);
      const Ea = num("barrier.Ea", f.Ea, false);
      if (k !== undefined && T !== undefined) barrier = { form: "measured", k, rateUnit, T, ...(Ea !== undefined ? { Ea, unit: f.eu } : {}) };
      break;
    }
  }
  const rxnDG = num("reactionThermo.dG", f.rxnDG, f.reversible && !f.rxnKept);
  const rxnDH = num("reactionThermo.dH", f.rxnDH, false);
  const rxnT = f.rxnDG.trim() ? toK("reactionThermo.T", f.rxnT, true) : undefined;
  let reactionThermo: DocumentReactionThermo | undefined = f.rxnKept ?? undefined;
  if (rxnDG !== undefined && rxnT !== undefined) reactionThermo = { form: "dG", dG: rxnDG, unit: f.eu, T: rxnT, standardState: f.rxnSS, ...(rxnDH !== undefined ? { dH: rxnDH } : {}) };
  const kappa = num("kappa", f.kappa, false);
  const imag = num("imaginaryFrequency", f.imag, false);
  const tmin = toK("validRange.Tmin", f.tmin, false);
  const tmax = toK("validRange.Tmax", f.tmax, false);
  if ((tmin === undefined) !== (tmax === undefined) && !errors["validRange.Tmin"] && !errors["validRange.Tmax"]) errors["validRange.Tmax"] = "Give both ends of the range, or neither.";
  const unc = num("uncertainty.value", f.unc, false);
  if (!barrier) return { input: null, errors };
  const input: StepInput = {
    ...(f.label.trim() ? { label: f.label.trim() } : {}),
    reactants: terms("reactants"),
    products: terms("products"),
    reversible: f.reversible,
    barrier,
    ...(reactionThermo ? { reactionThermo } : {}),
    ...(kappa !== undefined ? { kappa } : {}),
    ...(imag !== undefined ? { imaginaryFrequency: imag } : {}),
    ...(tmin !== undefined && tmax !== undefined ? { validRange: { Tmin: tmin, Tmax: tmax } } : {}),
    ...(unc !== undefined ? { uncertainty: { value: unc, unit: f.eu } } : {}),
    provenance: {
      source: f.source,
      ...(f.method.trim() ? { method: f.method.trim() } : {}),
      ...(f.citation.trim() ? { citation: f.citation.trim() } : {}),
      ...(f.doi.trim() ? { doi: f.doi.trim() } : {}),
      ...(f.solvent.trim() ? { solvent: f.solvent.trim() } : {}),
      ...(f.notes.trim() ? { notes: f.notes.trim() } : {}),
    },
    tags: f.tags
      .split(",")
      .map((t) => t.trim())
      .filter(Boolean),
    display: { energyUnit: f.eu, entropyUnit: f.su, temperatureUnit: f.tu },
    ...(f.message.trim() ? { message: f.message.trim() } : {}),
  };
  const parsed = StepInputSchema.safeParse(input);
  if (!parsed.success) Object.assign(errors, fieldErrors(parsed.error), errors);
  return { input: Object.keys(errors).length ? null : input, errors };
}

/** The exchange-format step the engine reads, for live derived values (species as s<id>). */
export function previewDocument(input: StepInput): DocumentStep {
  return {
    id: "preview",
    reactants: input.reactants.map((t) => ({ species: speciesKey(t.speciesId), coef: t.coef })),
    products: input.products.map((t) => ({ species: speciesKey(t.speciesId), coef: t.coef })),
    reversible: !!input.reversible,
    barrier: input.barrier,
    ...(input.reactionThermo ? { reactionThermo: input.reactionThermo } : {}),
    ...(input.kappa !== undefined ? { kappa: input.kappa } : {}),
    ...(input.imaginaryFrequency !== undefined ? { imaginaryFrequency: { value: input.imaginaryFrequency, unit: "cm-1" as const } } : {}),
  };
}
