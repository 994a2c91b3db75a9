/**
 * The Saddlebook mechanism exchange format, version 1: a JSON document that carries a
 * mechanism (species, elementary steps, barriers with explicit units, provenance) between
 * the app, its REST API, files on disk and users' scripts. Documented in
 * docs/mechanism-format.md; its JSON Schema (docs/mechanism-format.schema.json) is generated
 * from the zod schema below by scripts/gen-format-schema.ts.
 *
 * Units in a document are always stated next to the numbers:
 *   energies    "unit": kJ/mol, kcal/mol (thermochemical, 4.184 kJ), J/mol, eV (per particle),
 *               cm-1 (per particle), hartree (per particle);
 *   entropies   "entropyUnit": J/(mol K) or cal/(mol K);
 *   temperatures "T": K;
 *   A and k     "rateUnit": {concentration, time}, meaning (concentration)^(1−m)·time⁻¹ for a
 *               step of molecularity m;
 *   frequencies {"value", "unit": "cm-1"}.
 * The converters turn a document into the engine's SI-molar StepKinetics / MechanismInput
 * (J/mol, J/(mol·K), K, (mol/L)^(1−m)·s⁻¹) and back.
 *
 * Pure: no I/O, runs in the browser and on the server.
 */
import { z } from "zod";
import type { Barrier, EngineError, ReactionThermo, Result, Species, StandardState, StepKinetics, StoichTerm } from "./types.ts";
import type { MechanismInput } from "./model.ts";
import { MAX_COEF } from "./barrier-forms.ts";
import {
  ENERGY_FACTORS,
  ENTROPY_FACTORS,
  rateConstantFromSI,
  rateConstantToSI,
  type EnergyUnit,
  type EntropyUnit,
  type TimeUnit,
  MAX_TEMPERATURE_K,
} from "./units.ts";
import { FORMULA_MAX_LENGTH } from "./formula.ts";

/** Value of the "format" field of every document. */
export const MECHANISM_FORMAT_ID = "saddlebook.mechanism";
/** The format version this module reads and writes. */
export const MECHANISM_FORMAT_VERSION = 1;
/** Canonical identifier of the JSON Schema. */
export const MECHANISM_SCHEMA_ID = "https://saddlebook.example/schemas/mechanism-format-v1.schema.json";

// ---------------------------------------------------------------- unit vocabularies

const ENERGY_UNIT_IDS = ["kJ/mol", "kcal/mol", "J/mol", "eV", "cm-1", "hartree"] as const satisfies readonly EnergyUnit[];
const ENTROPY_UNIT_IDS = ["J/(mol K)", "cal/(mol K)"] as const satisfies readonly EntropyUnit[];
const RATE_CONC_UNIT_IDS = ["mol/L", "mmol/L", "umol/L", "molecules/cm3"] as const;
const TIME_UNIT_IDS = ["s", "min", "h", "d"] as const satisfies readonly TimeUnit[];
const STANDARD_STATE_IDS = ["1M", "1bar", "1atm"] as const satisfies readonly StandardState[];

export const EnergyUnitSchema = z.enum(ENERGY_UNIT_IDS).meta({ description: "Energy unit; eV, cm-1 and hartree are per particle." });
export const EntropyUnitSchema = z.enum(ENTROPY_UNIT_IDS).meta({ description: "Molar entropy unit (thermochemical calorie)." });
export const StandardStateSchema = z.enum(STANDARD_STATE_IDS).meta({ description: "1M: 1 mol/L solution; 1bar, 1atm: ideal gas." });

const finite = () => z.number();
const kelvin = () => z.number().positive().max(MAX_TEMPERATURE_K, `at most ${MAX_TEMPERATURE_K} K`).meta({ description: `Temperature in K (above 0, at most ${MAX_TEMPERATURE_K}).` });
const text = (max: number) => z.string().max(max);

export const RateUnitSchema = z
  .strictObject({
    concentration: z.enum(RATE_CONC_UNIT_IDS),
    time: z.enum(TIME_UNIT_IDS),
  })
  .meta({ description: "Unit of A or k: (concentration)^(1−m)·time⁻¹ for molecularity m; e.g. mol/L and s give L mol⁻¹ s⁻¹ for m = 2." });
export type RateUnit = z.infer<typeof RateUnitSchema>;

// ---------------------------------------------------------------- barrier forms

const DGBarrierSchema = z
  .strictObject({
    form: z.literal("dG"),
    dG: finite().meta({ description: "ΔG‡ at T, in `unit`." }),
    dH: finite().optional().meta({ description: "ΔH‡ in `unit`; with it ΔS‡ and the temperature dependence follow." }),
    unit: EnergyUnitSchema,
    T: kelvin().meta({ description: "Temperature (K) at which ΔG‡ applies." }),
    standardState: StandardStateSchema,
  })
  .meta({ description: "Free energy of activation at a reference temperature." });

const DHDSBarrierSchema = z
  .strictObject({
    form: z.literal("dHdS"),
    dH: finite(),
    dS: finite(),
    unit: EnergyUnitSchema,
    entropyUnit: EntropyUnitSchema,
    standardState: StandardStateSchema,
  })
  .meta({ description: "Enthalpy and entropy of activation." });

const ThermalBarrierSchema = z
  .strictObject({
    form: z.literal("thermal"),
    Ea: finite(),
    dS: finite(),
    dn: z
      .number()
      .min(-2)
      .max(1)
      .meta({ description: "Δn‡ = 1 − m for reaction order m: 0 unimolecular, −1 bimolecular, −2 termolecular, 1 for a zero-order source; fractional for a fractional order." }),
    unit: EnergyUnitSchema,
    entropyUnit: EntropyUnitSchema,
    standardState: StandardStateSchema,
    T: kelvin().meta({ description: "Temperature (K) at which Ea was determined; required (ΔH‡ = Ea − (1 − Δn‡)·R·T depends on it)." }),
  })
  .meta({ description: "Thermal form: Ea, ΔS‡ and Δn‡ (ideal-gas PΔV‡ treatment)." });

const ArrheniusBarrierSchema = z
  .strictObject({
    form: z.literal("arrhenius"),
    A: z.number().positive(),
    rateUnit: RateUnitSchema,
    Ea: finite(),
    unit: EnergyUnitSchema,
    n: finite().optional().meta({ description: "Temperature exponent n of k = A·(T/T₀)^n·exp(−Ea/RT); default 0." }),
    T: kelvin().optional().meta({ description: "Reference temperature T₀ (K) of the (T/T₀)^n factor; default 1 K, i.e. A·T^n." }),
  })
  .meta({ description: "Arrhenius or modified Arrhenius parameters." });

const MeasuredBarrierSchema = z
  .strictObject({
    form: z.literal("measured"),
    k: z.number().positive(),
    rateUnit: RateUnitSchema,
    T: kelvin(),
    Ea: finite().optional(),
    unit: EnergyUnitSchema.optional().meta({ description: "Unit of Ea; required when Ea is given." }),
  })
  .meta({ description: "A measured rate constant at one temperature, optionally with Ea." });

export const BarrierSchema = z.discriminatedUnion("form", [
  DGBarrierSchema,
  DHDSBarrierSchema,
  ThermalBarrierSchema,
  ArrheniusBarrierSchema,
  MeasuredBarrierSchema,
]);
export type DocumentBarrier = z.infer<typeof BarrierSchema>;

export const ReactionThermoSchema = z.discriminatedUnion("form", [
  z
    .strictObject({
      form: z.literal("dG"),
      dG: finite().meta({ description: "ΔG°rxn at T, in `unit`." }),
      dH: finite().optional(),
      unit: EnergyUnitSchema,
      T: kelvin(),
      standardState: StandardStateSchema,
    })
    .meta({ description: "Reaction free energy at a reference temperature." }),
  z
    .strictObject({
      form: z.literal("dHdS"),
      dH: finite(),
      dS: finite(),
      unit: EnergyUnitSchema,
      entropyUnit: EntropyUnitSchema,
      standardState: StandardStateSchema,
    })
    .meta({ description: "Reaction enthalpy and entropy." }),
]);
export type DocumentReactionThermo = z.infer<typeof ReactionThermoSchema>;

// ---------------------------------------------------------------- species, steps, document

const idString = () => z.string().min(1).max(200);

export const SpeciesSchema = z.strictObject({
  id: idString().meta({ description: "Identifier used by the steps; unique in the document." }),
  label: text(500).optional(),
  formula: text(FORMULA_MAX_LENGTH).optional().meta({ description: "Elements with counts, parentheses and a trailing charge, e.g. Cu(NH3)4+2." }),
  charge: z.int().min(-20).max(20).optional(),
  phase: z.enum(["solution", "gas", "solid", "liquid"]).optional(),
  notes: text(10000).optional(),
});
export type DocumentSpecies = z.infer<typeof SpeciesSchema>;

export const StoichTermSchema = z.strictObject({
  species: idString(),
  coef: z
    .number()
    .positive()
    .max(MAX_COEF)
    .meta({ description: "Stoichiometric coefficient, a positive number; fractional values are allowed and a reactant's coefficient is its order in the rate law." }),
});

export const ProvenanceSchema = z.strictObject({
  source: z.enum(["computed", "measured", "estimated", "literature"]),
  method: text(1000).optional().meta({ description: "E.g. the level of theory, or the experimental technique." }),
  citation: text(2000).optional(),
  doi: text(300).optional(),
  solvent: text(300).optional(),
  contributor: text(300).optional(),
  notes: text(10000).optional(),
});
export type DocumentProvenance = z.infer<typeof ProvenanceSchema>;

export const StepSchema = z.strictObject({
  id: idString().meta({ description: "Identifier of the step; unique in the document." }),
  label: text(500).optional(),
  reactants: z
    .array(StoichTermSchema)
    .max(3)
    .meta({ description: "Reactants; none for a zero-order source (k in concentration·time⁻¹). A species may also appear among the products (autocatalysis)." }),
  products: z.array(StoichTermSchema).max(20).meta({ description: "Products; none for a sink." }),
  reversible: z.boolean(),
  barrier: BarrierSchema,
  reactionThermo: ReactionThermoSchema.optional().meta({ description: "Required for a reversible step (reverse rate by detailed balance)." }),
  kappa: z.number().positive().optional().meta({ description: "Transmission coefficient κ; default 1." }),
  imaginaryFrequency: z
    .strictObject({ value: z.number().positive(), unit: z.literal("cm-1") })
    .optional()
    .meta({ description: "Magnitude of the transition state's imaginary frequency, for the Wigner correction." }),
  reportStandardState: StandardStateSchema.optional().meta({ description: "Standard state in which derived ΔG‡, ΔH‡, ΔS‡ are reported; default 1M." }),
  validRange: z
    .strictObject({ Tmin: kelvin(), Tmax: kelvin() })
    .optional()
    .meta({ description: "Temperature range (K) over which the barrier is known to hold." }),
  uncertainty: z
    .strictObject({ value: z.number().nonnegative(), unit: EnergyUnitSchema })
    .optional()
    .meta({ description: "Standard uncertainty of the barrier." }),
  provenance: ProvenanceSchema.optional(),
  tags: z.array(text(100)).max(100).optional(),
});
export type DocumentStep = z.infer<typeof StepSchema>;

export const AboutSchema = z.strictObject({
  name: z.string().min(1).max(300),
  description: text(20000).optional(),
  authors: z.array(text(300)).max(100).optional(),
  created: text(100).optional().meta({ description: "ISO 8601 date or date-time." }),
  tags: z.array(text(100)).max(100).optional(),
  illustrative: z.boolean().optional().meta({ description: "True for invented demonstration data." }),
});

export const MechanismDocumentSchema = z
  .strictObject({
    format: z.literal(MECHANISM_FORMAT_ID),
    version: z.literal(MECHANISM_FORMAT_VERSION),
    about: AboutSchema,
    species: z.array(SpeciesSchema).min(1).max(5000),
    steps: z.array(StepSchema).min(1).max(20000),
  })
  .meta({ title: "Saddlebook mechanism", description: "A reaction mechanism in the Saddlebook exchange format, version 1." });
export type MechanismDocument = z.infer<typeof MechanismDocumentSchema>;

/** The JSON Schema (draft 2020-12) of the document, generated from the zod schema. */
export function mechanismJsonSchema(): Record<string, unknown> {
  const generated = z.toJSONSchema(MechanismDocumentSchema, { target: "draft-2020-12", io: "input" }) as Record<string, unknown>;
  const { $schema, ...rest } = generated;
  return { $schema, $id: MECHANISM_SCHEMA_ID, ...rest };
}

// ---------------------------------------------------------------- issues with paths and lines

/** One problem found in a document, at a field path ("steps[2].barrier.dG"), with its place in the text when known. */
export interface FormatIssue {
  code: string;
  path: string;
  message: string;
  /** 1-based line and column in the source text, when the document came from text. */
  line?: number;
  column?: number;
}

/** A failed parse: an EngineError (the first issue) with every issue listed. */
export interface FormatError extends EngineError {
  issues: FormatIssue[];
}

export type FormatResult<T> = { ok: true; value: T } | { ok: false; error: FormatError };

const IDENT = /^[A-Za-z_$][A-Za-z0-9_$]*$/;

/** Path segments → "steps[2].barrier.dG"; keys that are not identifiers are quoted: initial["A-1"]. */
export function formatPath(segments: readonly PropertyKey[]): string {
  let out = "";
  for (const s of segments) {
    if (typeof s === "number") out += `[${s}]`;
    else {
      const k = String(s);
      if (IDENT.test(k)) out += out === "" ? k : `.${k}`;
      else out += `[${JSON.stringify(k)}]`;
    }
  }
  return out;
}

/** 1-based line and column of a character offset in text. */
export function lineColumn(textValue: string, offset: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  const end = Math.min(Math.max(offset, 0), textValue.length);
  for (let i = 0; i < end; i++) {
    if (textValue.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: end - lineStart + 1 };
}

/**
 * Offsets of every member key and array element of a JSON text that JSON.parse accepted,
 * by path (formatPath). A member maps to the offset of its key, an element to its value.
 */
export function locateJsonPaths(src: string): Map<string, number> {
  const where = new Map<string, number>();
  let i = 0;
  const ws = () => {
    while (i < src.length && (src[i] === " " || src[i] === "\t" || src[i] === "\n" || src[i] === "\r")) i++;
  };
  const str = (): string => {
    const start = i;
    i++; // opening quote
    while (i < src.length && src[i] !== '"') i += src[i] === "\\" ? 2 : 1;
    i++; // closing quote
    return JSON.parse(src.slice(start, i)) as string;
  };
  const value = (path: PropertyKey[], depth: number): void => {
    if (depth > 500) throw new Error("nesting");
    ws();
    const ch = src[i];
    if (ch === "{") {
      i++;
      ws();
      if (src[i] === "}") return void i++;
      for (;;) {
        ws();
        const at = i;
        const key = str();
        const child = [...path, key];
        where.set(formatPath(child), at);
        ws();
        i++; // colon
        value(child, depth + 1);
        ws();
        if (src[i++] === "}") return;
      }
    }
    if (ch === "[") {
      i++;
      ws();
      if (src[i] === "]") return void i++;
      for (let k = 0; ; k++) {
        ws();
        where.set(formatPath([...path, k]), i);
        value([...path, k], depth + 1);
        ws();
        if (src[i++] === "]") return;
      }
    }
    if (ch === '"') return void str();
    while (i < src.length && !",]} \t\n\r".includes(src[i])) i++;
  };
  try {
    value([], 0);
  } catch {
    // a locator failure only loses line numbers
  }
  return where;
}

/**
 * Offset of the first syntax error of a JSON text (RFC 8259 grammar), or null when the text
 * is valid. Used for line and column where the runtime's JSON.parse message has no position.
 */
export function jsonSyntaxErrorOffset(src: string): number | null {
  let i = 0;
  const n = src.length;
  class Stop {
    constructor(readonly at: number) {}
  }
  const stop = (at = i): never => {
    throw new Stop(at);
  };
  const ws = () => {
    while (i < n && (src[i] === " " || src[i] === "\t" || src[i] === "\n" || src[i] === "\r")) i++;
  };
  const str = () => {
    if (src[i] !== '"') stop();
    i++;
    while (i < n && src[i] !== '"') {
      const code = src.charCodeAt(i);
      if (code < 0x20) stop();
      if (src[i] === "\\") {
        const e = src[i + 1];
        if (e === "u") {
          if (!/^[0-9a-fA-F]{4}$/.test(src.slice(i + 2, i + 6))) stop(i + 1);
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else stop(i + 1);
      } else i++;
    }
    if (i >= n) stop();
    i++;
  };
  const num = () => {
    const m = /^-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?/.exec(src.slice(i, i + 400));
    if (!m || m[0] === "" || m[0] === "-") stop();
    i += m![0].length;
  };
  const value = (depth: number): void => {
    if (depth > 1000) stop();
    ws();
    const ch = src[i];
    if (ch === "{") {
      i++;
      ws();
      if (src[i] === "}") return void i++;
      for (;;) {
        ws();
        str();
        ws();
        if (src[i] !== ":") stop();
        i++;
        value(depth + 1);
        ws();
        if (src[i] === ",") i++;
        else if (src[i] === "}") return void i++;
        else stop();
      }
    }
    if (ch === "[") {
      i++;
      ws();
      if (src[i] === "]") return void i++;
      for (;;) {
        value(depth + 1);
        ws();
        if (src[i] === ",") i++;
        else if (src[i] === "]") return void i++;
        else stop();
      }
    }
    if (ch === '"') return str();
    if (ch === "-" || (ch !== undefined && ch >= "0" && ch <= "9")) return num();
    for (const lit of ["true", "false", "null"]) {
      if (src.startsWith(lit, i)) {
        i += lit.length;
        return;
      }
    }
    stop();
  };
  try {
    value(0);
    ws();
    return i < n ? i : null;
  } catch (e) {
    if (e instanceof Stop) return Math.min(e.at, n);
    return null;
  }
}

/** Line, column and a one-sentence reason for a JSON.parse failure of `src`. */
export function describeJsonSyntaxError(src: string, err: unknown): { line: number; column: number; detail: string } {
  const raw = err instanceof Error ? err.message : String(err);
  const m = /position (\d+)/.exec(raw);
  const offset = m ? Number(m[1]) : (jsonSyntaxErrorOffset(src) ?? src.length);
  const detail = raw
    .replace(/\s*\(line \d+ column \d+\)/, "")
    .replace(/ in JSON at position \d+/, "")
    .replace(/, "[\s\S]*" is not valid JSON$/, "");
  return { ...lineColumn(src, offset), detail };
}

/** Turns a JSON.parse failure into an issue with line and column (V8 reports "position N"). */
function jsonSyntaxIssue(src: string, err: unknown): FormatIssue {
  const { line, column, detail } = describeJsonSyntaxError(src, err);
  return { code: "json_syntax", path: "", message: `The text is not valid JSON: ${detail}.`, line, column };
}

function zodIssues(error: z.ZodError): FormatIssue[] {
  const out: FormatIssue[] = [];
  for (const iss of error.issues) {
    if (iss.code === "unrecognized_keys") {
      for (const key of iss.keys) {
        out.push({ code: "unknown_field", path: formatPath([...iss.path, key]), message: `Unknown field "${key}".` });
      }
      continue;
    }
    if (iss.code === "invalid_union" && "note" in iss && iss.note === "No matching discriminator") {
      const thermo = iss.path.includes("reactionThermo");
      const forms = thermo ? "dG or dHdS" : "dG, dHdS, thermal, arrhenius or measured";
      out.push({ code: "invalid_value", path: formatPath(iss.path), message: `Unknown form; expected ${forms}.` });
      continue;
    }
    out.push({ code: iss.code, path: formatPath(iss.path), message: iss.message });
  }
  return out;
}

/** Cross-field checks the schema alone cannot express: unique ids, known species, required thermo. */
function documentIssues(doc: MechanismDocument): FormatIssue[] {
  const out: FormatIssue[] = [];
  const species = new Set<string>();
  doc.species.forEach((s, i) => {
    if (species.has(s.id)) out.push({ code: "duplicate_id", path: `species[${i}].id`, message: `Species "${s.id}" is listed more than once.` });
    species.add(s.id);
  });
  const steps = new Set<string>();
  doc.steps.forEach((st, i) => {
    if (steps.has(st.id)) out.push({ code: "duplicate_id", path: `steps[${i}].id`, message: `Step "${st.id}" is listed more than once.` });
    steps.add(st.id);
    for (const side of ["reactants", "products"] as const) {
      st[side].forEach((t, j) => {
        if (!species.has(t.species)) {
          out.push({ code: "unknown_species", path: `steps[${i}].${side}[${j}].species`, message: `Species "${t.species}" is not in the species list.` });
        }
      });
    }
    if (st.reactants.length === 0 && st.products.length === 0) {
      out.push({ code: "empty_step", path: `steps[${i}]`, message: "A step needs at least one reactant or one product." });
    }
    if (st.reversible && (st.reactants.length === 0 || st.products.length === 0)) {
      out.push({
        code: "open_step_reversible",
        path: `steps[${i}].reversible`,
        message: "A source (no reactants) or a sink (no products) cannot be reversible; enter any return flow as a step of its own.",
      });
    }
    if (st.reversible && !st.reactionThermo) {
      out.push({ code: "missing_thermo", path: `steps[${i}].reactionThermo`, message: "A reversible step needs its reaction thermochemistry (reactionThermo) for the reverse rate." });
    }
    if (st.barrier.form === "measured" && st.barrier.Ea !== undefined && st.barrier.unit === undefined) {
      out.push({ code: "missing_unit", path: `steps[${i}].barrier.unit`, message: "The energy unit of Ea is required when Ea is given." });
    }
    if (st.validRange && st.validRange.Tmin > st.validRange.Tmax) {
      out.push({ code: "invalid_range", path: `steps[${i}].validRange`, message: "Tmin must not exceed Tmax." });
    }
  });
  return out;
}

function failure<T>(issues: FormatIssue[], src?: string): FormatResult<T> {
  if (src !== undefined) {
    const where = locateJsonPaths(src);
    for (const iss of issues) {
      if (iss.line !== undefined) continue;
      // the deepest located prefix of the path
      let p = iss.path;
      for (;;) {
        const at = where.get(p);
        if (at !== undefined) {
          Object.assign(iss, lineColumn(src, at));
          break;
        }
        const cut = Math.max(p.lastIndexOf("."), p.lastIndexOf("["));
        if (cut <= 0) break;
        p = p.slice(0, cut);
      }
    }
  }
  const first = issues[0];
  const where = first.line !== undefined ? ` (line ${first.line}, column ${first.column})` : "";
  const at = first.path ? `${first.path}: ` : "";
  const more = issues.length > 1 ? ` (${issues.length} problems in all)` : "";
  const message = `${at}${first.message}${where}${more}`;
  const error: FormatError = { code: "INVALID_DOCUMENT", message, issues };
  if (first.path) error.path = first.path;
  return { ok: false, error };
}

/**
 * Validates a parsed value as a mechanism document: schema (unknown fields rejected) and
 * cross-field checks. `sourceText`, when given, adds line and column to each issue.
 */
export function validateMechanismDocument(value: unknown, sourceText?: string): FormatResult<MechanismDocument> {
  const parsed = MechanismDocumentSchema.safeParse(value);
  if (!parsed.success) return failure(zodIssues(parsed.error), sourceText);
  const extra = documentIssues(parsed.data);
  if (extra.length > 0) return failure(extra, sourceText);
  return { ok: true, value: parsed.data };
}

/** Parses JSON text as a mechanism document; syntax errors carry line and column. */
export function parseMechanismText(src: string): FormatResult<MechanismDocument> {
  if (typeof src !== "string") return failure([{ code: "invalid_type", path: "", message: "The document must be text." }]);
  const body = src.charCodeAt(0) === 0xfeff ? src.slice(1) : src;
  let value: unknown;
  try {
    value = JSON.parse(body);
  } catch (e) {
    return failure([jsonSyntaxIssue(body, e)]);
  }
  return validateMechanismDocument(value, body);
}

// ---------------------------------------------------------------- document → engine (SI)

/** What the engine needs from a document, plus the descriptive fields the engine ignores. */
export interface EngineMechanism {
  species: Species[];
  steps: StepKinetics[];
  /** Ready for compileMechanism: the same species and steps. */
  mechanism: MechanismInput;
  annotations: MechanismAnnotations;
}

/** Descriptive fields of a document that have no place in the engine's types. */
export interface MechanismAnnotations {
  about: MechanismDocument["about"];
  species: Record<string, { notes?: string }>;
  steps: Record<string, StepAnnotations>;
}

export interface StepAnnotations {
  label?: string;
  provenance?: DocumentProvenance;
  tags?: string[];
  /** K */
  validRange?: { Tmin: number; Tmax: number };
  /** J/mol */
  uncertainty?: number;
}

const energy = (v: number, unit: EnergyUnit) => v * ENERGY_FACTORS[unit]; // → J/mol
const entropy = (v: number, unit: EntropyUnit) => v * ENTROPY_FACTORS[unit]; // → J/(mol·K)

function molecularityOf(terms: { coef: number }[]): number {
  return terms.reduce((s, t) => s + t.coef, 0);
}

function rateToSI(v: number, m: number, unit: RateUnit, path: string): Result<number> {
  return rateConstantToSI(v, m, unit.concentration, unit.time, path);
}

function barrierToEngine(b: DocumentBarrier, m: number, path: string): Result<Barrier> {
  switch (b.form) {
    case "dG": {
      const out: Barrier = { form: "dG", dG: energy(b.dG, b.unit), Tref: b.T, standardState: b.standardState };
      if (b.dH !== undefined) out.dH = energy(b.dH, b.unit);
      return { ok: true, value: out };
    }
    case "dHdS":
      return { ok: true, value: { form: "dHdS", dH: energy(b.dH, b.unit), dS: entropy(b.dS, b.entropyUnit), standardState: b.standardState } };
    case "thermal": {
      return { ok: true, value: { form: "thermal", Ea: energy(b.Ea, b.unit), dS: entropy(b.dS, b.entropyUnit), dn: b.dn, standardState: b.standardState, Tref: b.T } };
    }
    case "arrhenius": {
      const A = rateToSI(b.A, m, b.rateUnit, `${path}.A`);
      if (!A.ok) return A;
      const out: Barrier = { form: "arrhenius", A: A.value, Ea: energy(b.Ea, b.unit) };
      if (b.n !== undefined) out.n = b.n;
      if (b.T !== undefined) out.Tref = b.T;
      return { ok: true, value: out };
    }
    case "measured": {
      const k = rateToSI(b.k, m, b.rateUnit, `${path}.k`);
      if (!k.ok) return k;
      const out: Barrier = { form: "measured", k: k.value, T: b.T };
      if (b.Ea !== undefined) {
        if (b.unit === undefined) return { ok: false, error: { code: "MISSING_UNIT", message: "The energy unit of Ea is required when Ea is given.", path: `${path}.unit` } };
        out.Ea = energy(b.Ea, b.unit);
      }
      return { ok: true, value: out };
    }
  }
}

function thermoToEngine(t: DocumentReactionThermo): ReactionThermo {
  if (t.form === "dG") {
    const out: ReactionThermo = { form: "dG", dG: energy(t.dG, t.unit), Tref: t.T, standardState: t.standardState };
    if (t.dH !== undefined) out.dH = energy(t.dH, t.unit);
    return out;
  }
  return { form: "dHdS", dH: energy(t.dH, t.unit), dS: entropy(t.dS, t.entropyUnit), standardState: t.standardState };
}

/**
 * One document step → the engine's StepKinetics (SI-molar units). `path` prefixes error
 * paths. Range checks of the values (barrier limits, molecularity) are the engine's: they
 * come from compileStep / compileMechanism.
 */
export function stepToEngine(step: DocumentStep, path = "step"): Result<StepKinetics> {
  const m = molecularityOf(step.reactants);
  const barrier = barrierToEngine(step.barrier, m, `${path}.barrier`);
  if (!barrier.ok) return barrier;
  const out: StepKinetics = {
    id: step.id,
    reactants: step.reactants.map((t): StoichTerm => ({ species: t.species, coef: t.coef })),
    products: step.products.map((t): StoichTerm => ({ species: t.species, coef: t.coef })),
    reversible: step.reversible,
    barrier: barrier.value,
  };
  if (step.reactionThermo) out.thermo = thermoToEngine(step.reactionThermo);
  if (step.kappa !== undefined) out.kappa = step.kappa;
  if (step.imaginaryFrequency) out.imagFreq = step.imaginaryFrequency.value;
  if (step.reportStandardState) out.targetStandardState = step.reportStandardState;
  return { ok: true, value: out };
}

function speciesToEngine(s: DocumentSpecies): Species {
  const out: Species = { id: s.id };
  if (s.label !== undefined) out.label = s.label;
  if (s.formula !== undefined) out.formula = s.formula;
  if (s.charge !== undefined) out.charge = s.charge;
  if (s.phase !== undefined) out.phase = s.phase;
  return out;
}

/** A validated document → engine species and steps (SI-molar) and the descriptive annotations. */
export function documentToEngine(doc: MechanismDocument): Result<EngineMechanism> {
  const species = doc.species.map(speciesToEngine);
  const steps: StepKinetics[] = [];
  const annotations: MechanismAnnotations = { about: doc.about, species: {}, steps: {} };
  for (const s of doc.species) if (s.notes !== undefined) annotations.species[s.id] = { notes: s.notes };
  for (let i = 0; i < doc.steps.length; i++) {
    const st = doc.steps[i];
    const r = stepToEngine(st, `steps[${i}]`);
    if (!r.ok) return r;
    steps.push(r.value);
    const a: StepAnnotations = {};
    if (st.label !== undefined) a.label = st.label;
    if (st.provenance !== undefined) a.provenance = st.provenance;
    if (st.tags !== undefined) a.tags = st.tags;
    if (st.validRange !== undefined) a.validRange = st.validRange;
    if (st.uncertainty !== undefined) a.uncertainty = energy(st.uncertainty.value, st.uncertainty.unit);
    if (Object.keys(a).length > 0) annotations.steps[st.id] = a;
  }
  return { ok: true, value: { species, steps, mechanism: { species, reactions: steps }, annotations } };
}

// ---------------------------------------------------------------- engine (SI) → document

/** Units a document is written in; defaults kJ/mol, J/(mol K), mol/L and s. */
export interface DocumentUnits {
  energy?: EnergyUnit;
  entropy?: EntropyUnit;
  rate?: RateUnit;
}

/** Rounds to 12 significant digits so SI ↔ unit conversions do not leave 85.20000000000001. */
function tidy(v: number): number {
  return v === 0 ? 0 : Number(v.toPrecision(12));
}

function barrierToDocument(b: Barrier, m: number, u: Required<DocumentUnits>, path: string): Result<DocumentBarrier> {
  const e = (v: number) => tidy(v / ENERGY_FACTORS[u.energy]);
  const s = (v: number) => tidy(v / ENTROPY_FACTORS[u.entropy]);
  const rate = (v: number, p: string): Result<number> => {
    const r = rateConstantFromSI(v, m, u.rate.concentration, u.rate.time, p);
    return r.ok ? { ok: true, value: tidy(r.value) } : r;
  };
  switch (b.form) {
    case "dG": {
      const out: DocumentBarrier = { form: "dG", dG: e(b.dG), unit: u.energy, T: b.Tref, standardState: b.standardState };
      if (b.dH !== undefined) out.dH = e(b.dH);
      return { ok: true, value: out };
    }
    case "dHdS":
      return { ok: true, value: { form: "dHdS", dH: e(b.dH), dS: s(b.dS), unit: u.energy, entropyUnit: u.entropy, standardState: b.standardState } };
    case "thermal": {
      return { ok: true, value: { form: "thermal", Ea: e(b.Ea), dS: s(b.dS), dn: b.dn, unit: u.energy, entropyUnit: u.entropy, standardState: b.standardState, T: b.Tref } };
    }
    case "arrhenius": {
      const A = rate(b.A, `${path}.A`);
      if (!A.ok) return A;
      const out: DocumentBarrier = { form: "arrhenius", A: A.value, rateUnit: { ...u.rate }, Ea: e(b.Ea), unit: u.energy };
      if (b.n !== undefined) out.n = b.n;
      if (b.Tref !== undefined) out.T = b.Tref;
      return { ok: true, value: out };
    }
    case "measured": {
      const k = rate(b.k, `${path}.k`);
      if (!k.ok) return k;
      const out: DocumentBarrier = { form: "measured", k: k.value, rateUnit: { ...u.rate }, T: b.T };
      if (b.Ea !== undefined) {
        out.Ea = e(b.Ea);
        out.unit = u.energy;
      }
      return { ok: true, value: out };
    }
    default:
      return { ok: false, error: { code: "UNKNOWN_FORM", message: `Unknown barrier form "${String((b as { form?: unknown }).form)}".`, path: `${path}.form` } };
  }
}

function thermoToDocument(t: ReactionThermo, u: Required<DocumentUnits>): DocumentReactionThermo {
  const e = (v: number) => tidy(v / ENERGY_FACTORS[u.energy]);
  if (t.form === "dG") {
    const out: DocumentReactionThermo = { form: "dG", dG: e(t.dG), unit: u.energy, T: t.Tref, standardState: t.standardState };
    if (t.dH !== undefined) out.dH = e(t.dH);
    return out;
  }
  return { form: "dHdS", dH: e(t.dH), dS: tidy(t.dS / ENTROPY_FACTORS[u.entropy]), unit: u.energy, entropyUnit: u.entropy, standardState: t.standardState };
}

/** One engine step (SI-molar) → a document step in the chosen units, with optional annotations. */
export function stepToDocument(step: StepKinetics, annotations: StepAnnotations = {}, units: DocumentUnits = {}, path = "step"): Result<DocumentStep> {
  const u: Required<DocumentUnits> = { energy: units.energy ?? "kJ/mol", entropy: units.entropy ?? "J/(mol K)", rate: units.rate ?? { concentration: "mol/L", time: "s" } };
  const barrier = barrierToDocument(step.barrier, molecularityOf(step.reactants), u, `${path}.barrier`);
  if (!barrier.ok) return barrier;
  const out: DocumentStep = {
    id: step.id,
    reactants: step.reactants.map((t) => ({ species: t.species, coef: t.coef })),
    products: step.products.map((t) => ({ species: t.species, coef: t.coef })),
    reversible: step.reversible,
    barrier: barrier.value,
  };
  if (annotations.label !== undefined) out.label = annotations.label;
  if (step.thermo) out.reactionThermo = thermoToDocument(step.thermo, u);
  if (step.kappa !== undefined) out.kappa = step.kappa;
  if (step.imagFreq !== undefined) out.imaginaryFrequency = { value: step.imagFreq, unit: "cm-1" };
  if (step.targetStandardState !== undefined) out.reportStandardState = step.targetStandardState;
  if (annotations.validRange !== undefined) out.validRange = { ...annotations.validRange };
  if (annotations.uncertainty !== undefined) out.uncertainty = { value: tidy(annotations.uncertainty / ENERGY_FACTORS[u.energy]), unit: u.energy };
  if (annotations.provenance !== undefined) out.provenance = { ...annotations.provenance };
  if (annotations.tags !== undefined) out.tags = [...annotations.tags];
  return { ok: true, value: out };
}

/**
 * Engine species and steps (SI-molar) → a version-1 document. The result is validated
 * against the schema, so what this returns always parses.
 */
export function engineToDocument(
  input: { species: Species[]; steps: StepKinetics[]; annotations?: Partial<MechanismAnnotations> },
  units: DocumentUnits = {},
): FormatResult<MechanismDocument> {
  const ann = input.annotations ?? {};
  const species: DocumentSpecies[] = input.species.map((s) => {
    const out: DocumentSpecies = { id: s.id };
    if (s.label !== undefined) out.label = s.label;
    if (s.formula !== undefined) out.formula = s.formula;
    if (s.charge !== undefined) out.charge = s.charge;
    if (s.phase !== undefined) out.phase = s.phase;
    const notes = ann.species?.[s.id]?.notes;
    if (notes !== undefined) out.notes = notes;
    return out;
  });
  const steps: DocumentStep[] = [];
  for (let i = 0; i < input.steps.length; i++) {
    const st = input.steps[i];
    const r = stepToDocument(st, ann.steps?.[st.id] ?? {}, units, `steps[${i}]`);
    if (!r.ok) return failure([{ code: r.error.code.toLowerCase(), path: r.error.path ?? `steps[${i}]`, message: r.error.message }]);
    steps.push(r.value);
  }
  const doc = { format: MECHANISM_FORMAT_ID, version: MECHANISM_FORMAT_VERSION, about: ann.about ?? { name: "Untitled mechanism" }, species, steps };
  return validateMechanismDocument(doc);
}

/** Serialises a document as indented JSON text with a final newline. */
export function mechanismToText(doc: MechanismDocument): string {
  return `${JSON.stringify(doc, null, 2)}\n`;
}
