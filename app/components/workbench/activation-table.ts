/**
 * k(T) tables for the activation-parameter page: parsing pasted or uploaded text into rows with
 * line-numbered errors, unit conversion to K and (mol/L)^(1−m)·s⁻¹, and the Eyring and Arrhenius
 * regressions from the engine. Shared by the page's action (server) and its live preview (client).
 *
 * Accepted text: one point per line, "T, k" or "T, k, σ(k)"; separators comma, semicolon, tab or
 * spaces; blank lines and lines starting with # are skipped; a first line that is not numeric is
 * taken as a column header.
 */
import { z } from "zod";
import { arrheniusRegression, eyringRegression, type ArrheniusResult, type EyringResult, type RatePoint } from "../../../solver/regression";
import { rateConstantToSI } from "../../../solver/units";
import { formatNumber } from "../format";

export const ZERO_CELSIUS = 273.15; // K, exact by definition of the Celsius scale

export const KineticsSettingsSchema = z.object({
  temperatureUnit: z.enum(["K", "degC"], { message: "Choose K or °C for the temperatures." }),
  molecularity: z.coerce.number().pipe(z.union([z.literal(1), z.literal(2), z.literal(3)], { message: "The molecularity must be 1, 2 or 3." })),
  concentrationUnit: z.enum(["mol/L", "mmol/L", "umol/L", "molecules/cm3"], { message: "Choose a concentration unit for k." }),
  timeUnit: z.enum(["s", "min", "h"], { message: "Choose a time unit for k." }),
  Tref: z.coerce.number({ message: "The reference temperature must be a number." }).refine(Number.isFinite, "The reference temperature must be a number."),
  TrefUnit: z.enum(["K", "degC"]),
  kappa: z.coerce.number({ message: "κ must be a number." }).positive("The transmission coefficient κ must be positive.").max(1e6, "κ must be at most 10⁶."),
});
export type KineticsSettings = z.infer<typeof KineticsSettingsSchema>;

export const DEFAULT_SETTINGS: KineticsSettings = {
  temperatureUnit: "K",
  molecularity: 1,
  concentrationUnit: "mol/L",
  timeUnit: "s",
  Tref: 298.15,
  TrefUnit: "K",
  kappa: 1,
};

const RowSchema = z.object({
  T: z.number({ message: "the temperature is not a number" }).refine(Number.isFinite, "the temperature is not a finite number"),
  k: z.number({ message: "the rate constant is not a number" }).refine(Number.isFinite, "the rate constant is not a finite number").refine((v) => v > 0, "the rate constant must be positive"),
  sigmaK: z.number({ message: "the uncertainty of k is not a number" }).refine((v) => Number.isFinite(v) && v > 0, "the uncertainty of k must be a positive number").optional(),
});

export interface RowError {
  /** 1-based line number in the pasted or uploaded text. */
  line: number;
  message: string;
}

export interface ParsedRow {
  line: number;
  /** As entered. */
  T: number;
  k: number;
  sigmaK?: number;
}

export interface ParsedTable {
  rows: ParsedRow[];
  errors: RowError[];
  header: string[] | null;
}

const NUMBER_RE = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

function splitLine(line: string): string[] {
  const t = line.trim();
  if (t.includes("\t")) return t.split("\t").map((s) => s.trim());
  if (t.includes(";")) return t.split(";").map((s) => s.trim());
  if (t.includes(",")) return t.split(",").map((s) => s.trim());
  return t.split(/\s+/);
}

function toNumber(s: string | undefined): number | undefined | typeof NaN {
  if (s === undefined || s === "") return undefined;
  const c = s.replace(/\u2212/g, "-").replace(/[×x]\s*10\^?([+-]?\d+)$/i, "e$1");
  return NUMBER_RE.test(c) ? Number(c) : NaN;
}

/** Text → rows as entered, with one error per bad line (1-based line numbers). */
export function parseKineticsText(text: string): ParsedTable {
  const rows: ParsedRow[] = [];
  const errors: RowError[] = [];
  let header: string[] | null = null;
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  let seenData = false;
  lines.forEach((raw, i) => {
    const line = i + 1;
    const t = raw.trim();
    if (t === "" || t.startsWith("#")) return;
    const cells = splitLine(t);
    const nums = cells.map(toNumber);
    if (!seenData && header === null && rows.length === 0 && errors.length === 0 && nums.every((v) => v === undefined || Number.isNaN(v))) {
      header = cells;
      return;
    }
    seenData = true;
    if (cells.length < 2) {
      errors.push({ line, message: `Line ${line}: expected a temperature and a rate constant, found ${cells.length} value.` });
      return;
    }
    if (cells.length > 3) {
      errors.push({ line, message: `Line ${line}: expected 2 or 3 columns (T, k, optional σ of k), found ${cells.length}.` });
      return;
    }
    const parsed = RowSchema.safeParse({ T: nums[0], k: nums[1], sigmaK: nums[2] });
    if (!parsed.success) {
      const first = parsed.error.issues[0];
      const raw = first.path[0] === "T" ? cells[0] : first.path[0] === "k" ? cells[1] : cells[2];
      errors.push({ line, message: `Line ${line}: ${first.message} ("${raw}").` });
      return;
    }
    rows.push({ line, ...parsed.data });
  });
  return { rows, errors, header };
}

export interface ConvertedRow extends ParsedRow {
  /** K */
  TK: number;
  /** (mol/L)^(1−m)·s⁻¹ */
  kSI: number;
  sigmaKSI?: number;
}

export interface ActivationAnalysis {
  rows: ConvertedRow[];
  eyring: EyringResult;
  arrhenius: ArrheniusResult;
  /** K */
  Tref: number;
  kUnitSI: string;
  /** ΔG‡ (J/mol) with SE at each measured temperature. */
  dGAt: { T: number; value: number; se: number }[];
}

export type AnalysisOutcome = { ok: true; value: ActivationAnalysis } | { ok: false; errors: RowError[]; message: string };

const K_UNITS = ["s⁻¹", "L mol⁻¹ s⁻¹", "L² mol⁻² s⁻¹"];

/** Parsed rows + settings → converted points and both regressions, or line-numbered errors. */
export function analyseKinetics(table: ParsedTable, s: KineticsSettings): AnalysisOutcome {
  if (table.errors.length > 0) {
    const n = table.errors.length;
    return { ok: false, errors: table.errors, message: n === 1 ? table.errors[0].message : `${n} lines could not be read; the first is line ${table.errors[0].line}.` };
  }
  const errors: RowError[] = [];
  const rows: ConvertedRow[] = [];
  const withSigma = table.rows.filter((r) => r.sigmaK !== undefined).length;
  for (const r of table.rows) {
    const TK = s.temperatureUnit === "degC" ? r.T + ZERO_CELSIUS : r.T;
    if (!(TK > 0)) {
      errors.push({ line: r.line, message: `Line ${r.line}: the temperature ${r.T} ${s.temperatureUnit === "degC" ? "°C" : "K"} is at or below absolute zero.` });
      continue;
    }
    if (withSigma > 0 && r.sigmaK === undefined) {
      errors.push({ line: r.line, message: `Line ${r.line}: give an uncertainty of k on every line or on none.` });
      continue;
    }
    const k = rateConstantToSI(r.k, s.molecularity, s.concentrationUnit, s.timeUnit);
    if (!k.ok) {
      errors.push({ line: r.line, message: `Line ${r.line}: ${k.error.message}` });
      continue;
    }
    const out: ConvertedRow = { ...r, TK, kSI: k.value };
    if (r.sigmaK !== undefined) out.sigmaKSI = (r.sigmaK * k.value) / r.k;
    rows.push(out);
  }
  if (errors.length > 0) return { ok: false, errors, message: errors.length === 1 ? errors[0].message : `${errors.length} lines are not usable; the first is line ${errors[0].line}.` };
  if (rows.length < 3) return { ok: false, errors: [], message: `An Eyring or Arrhenius fit with standard errors needs at least 3 points; the table has ${rows.length}.` };
  const Tref = s.TrefUnit === "degC" ? s.Tref + ZERO_CELSIUS : s.Tref;
  if (!(Tref > 0)) return { ok: false, errors: [], message: "The reference temperature must be above absolute zero." };
  const points: RatePoint[] = rows.map((r) => (r.sigmaKSI !== undefined ? { T: r.TK, k: r.kSI, sigmaK: r.sigmaKSI } : { T: r.TK, k: r.kSI }));
  const ey = eyringRegression(points, { kappa: s.kappa, Tref });
  if (!ey.ok) return { ok: false, errors: [], message: ey.error.message };
  const ar = arrheniusRegression(points, { Tref });
  if (!ar.ok) return { ok: false, errors: [], message: ar.error.message };
  const e = ey.value;
  const dGAt = rows.map((r) => {
    const T = r.TK;
    const se = Math.sqrt(Math.max(0, e.dH.se ** 2 + T * T * e.dS.se ** 2 - 2 * T * e.covHS));
    return { T, value: e.dH.value - T * e.dS.value, se };
  });
  return { ok: true, value: { rows, eyring: e, arrhenius: ar.value, Tref, kUnitSI: K_UNITS[s.molecularity - 1], dGAt } };
}

/** Rounds to n significant digits as a plain number a form field reads back ("1.2e-5", not "1.2×10⁻⁵"); screens use ../format.ts. */
export function fieldValue(v: number, n = 4): string {
  if (!Number.isFinite(v)) return "—";
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e-3 && a < 1e6) return Number(v.toPrecision(n)).toString();
  return v.toExponential(n - 1).replace("e+", "e");
}

/** Value ± SE in the given scale (e.g. 1e-3 for kJ/mol from J/mol), SE to 2 significant digits and the value to the same decimal. */
export function plusMinus(value: number, se: number, scale = 1): string {
  const v = value * scale;
  const s = Math.abs(se * scale);
  if (!Number.isFinite(v) || !Number.isFinite(s)) return "—";
  if (s === 0) return `${formatNumber(v, 6)} ± 0`;
  const decimals = Math.max(0, 1 - Math.floor(Math.log10(s)));
  if (decimals > 8 || Math.abs(v) >= 1e7) return `${formatNumber(v, 4)} ± ${formatNumber(s, 2)}`;
  return `${v.toFixed(decimals)} ± ${s.toFixed(decimals)}`;
}
