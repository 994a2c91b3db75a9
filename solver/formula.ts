/**
 * Chemical formula parser and element-balance check for an elementary step.
 *
 * Saddlebook formula notation (documented here; unitless counts, charge in elementary charges):
 *  - Elements: a capital letter optionally followed by one lower-case letter, from the periodic
 *    table (H … Og), plus "D" (deuterium) and "T" (tritium) kept as their own symbols.
 *  - Counts: a positive integer after an element or a group, e.g. "H2O", "C6H5Br".
 *  - Groups: parentheses or square brackets, nestable, each closed by its own kind:
 *    "Ca(OH)2", "[Cu(NH3)4]".
 *  - Hydrates / adducts: parts joined by "." or "·" or "*", each optionally led by an integer
 *    multiplier: "CuSO4·5H2O", "CaCl2.2H2O".
 *  - Charge suffix, at the very end, in one of three spellings:
 *      "^2+" / "^3-" / "^+" / "^-"   (caret, optional magnitude, sign),
 *      "+" / "--" / "+++"            (a run of equal signs: magnitude = run length),
 *      "+2" / "-3"                   (sign then magnitude).
 *    So "NH4+", "SO4^2-", "SO4--", "Cu(NH3)4+2" and "[Cu(NH3)4]^2+" all parse.
 * Limits (so every stored count and charge is a modest integer): at most 200 characters, each
 * written count or multiplier at most 100 000, at most 1 000 000 atoms of one element per formula
 * unit, and a charge of at most 20 either way (the species charge field's range).
 * Errors are typed and carry the 0-based character position in `path` ("formula@7").
 */
import type { EngineError, Result } from "./types.ts";

export const FORMULA_MAX_LENGTH = 200;
export const FORMULA_MAX_COUNT = 100_000;
export const FORMULA_MAX_ATOMS = 1_000_000;
export const FORMULA_MAX_CHARGE = 20;

const SYMBOLS = (
  "H He Li Be B C N O F Ne Na Mg Al Si P S Cl Ar K Ca Sc Ti V Cr Mn Fe Co Ni Cu Zn Ga Ge As Se Br Kr " +
  "Rb Sr Y Zr Nb Mo Tc Ru Rh Pd Ag Cd In Sn Sb Te I Xe Cs Ba La Ce Pr Nd Pm Sm Eu Gd Tb Dy Ho Er Tm Yb Lu " +
  "Hf Ta W Re Os Ir Pt Au Hg Tl Pb Bi Po At Rn Fr Ra Ac Th Pa U Np Pu Am Cm Bk Cf Es Fm Md No Lr " +
  "Rf Db Sg Bh Hs Mt Ds Rg Cn Nh Fl Mc Lv Ts Og D T"
).split(" ");
const ELEMENTS = new Set(SYMBOLS);

export interface ParsedFormula {
  /** Element symbol → count (atoms per formula unit). */
  elements: Record<string, number>;
  /** Net charge in elementary charges. */
  charge: number;
}

function err(message: string, pos: number): { ok: false; error: EngineError } {
  return { ok: false, error: { code: "FORMULA_SYNTAX", message, path: `formula@${pos}` } };
}

/** Parse a formula in Saddlebook notation into element counts and charge. */
export function parseFormula(formula: string): Result<ParsedFormula> {
  if (typeof formula !== "string" || formula.trim() === "") return err("The formula is empty.", 0);
  const s = formula.trim();
  if (s.length > FORMULA_MAX_LENGTH) return err(`The formula is longer than ${FORMULA_MAX_LENGTH} characters.`, FORMULA_MAX_LENGTH);
  // --- split off the charge suffix
  let body = s;
  let charge = 0;
  let m: RegExpMatchArray | null;
  if ((m = s.match(/\^(\d*)([+-])$/))) {
    const mag = m[1] === "" ? 1 : Number(m[1]);
    if (mag === 0) return err("A charge magnitude must be at least 1.", s.length - m[0].length);
    charge = m[2] === "+" ? mag : -mag;
    body = s.slice(0, s.length - m[0].length);
  } else if ((m = s.match(/([+-])(\d+)$/))) {
    const mag = Number(m[2]);
    if (mag === 0) return err("A charge magnitude must be at least 1.", s.length - m[0].length);
    charge = m[1] === "+" ? mag : -mag;
    body = s.slice(0, s.length - m[0].length);
  } else if ((m = s.match(/(\++|-+)$/))) {
    charge = m[1][0] === "+" ? m[1].length : -m[1].length;
    body = s.slice(0, s.length - m[0].length);
  }
  if (body === "") return err("The formula has a charge but no elements.", 0);
  if (Math.abs(charge) > FORMULA_MAX_CHARGE) return err(`A charge of ${charge} is beyond ±${FORMULA_MAX_CHARGE}.`, body.length);

  let pos = 0;
  const counts: Record<string, number> = {};

  function readInt(): number | null {
    const start = pos;
    while (pos < body.length && body[pos] >= "0" && body[pos] <= "9") pos++;
    if (pos === start) return null;
    // More digits than any allowed count: report it as too large (Number would lose the value).
    return pos - start > 7 ? Infinity : Number(body.slice(start, pos));
  }

  // parse a sequence of groups until a closing bracket or separator; returns counts or error
  function parseSeq(close: string | null): Result<Record<string, number>> {
    const acc: Record<string, number> = {};
    let any = false;
    while (pos < body.length) {
      const ch = body[pos];
      if (ch === ")" || ch === "]") {
        if (close === null) return err(`Unexpected "${ch}" with no matching opening bracket.`, pos);
        if (ch !== close) return err(`Expected "${close}" but found "${ch}".`, pos);
        break;
      }
      if (ch === "." || ch === "·" || ch === "*") {
        if (close !== null) return err("A hydrate separator cannot appear inside brackets.", pos);
        break;
      }
      let part: Record<string, number>;
      if (ch === "(" || ch === "[") {
        const open = pos;
        pos++;
        const inner = parseSeq(ch === "(" ? ")" : "]");
        if (!inner.ok) return inner;
        if (pos >= body.length) return err(`The bracket opened here is never closed.`, open);
        pos++; // closing bracket
        if (Object.keys(inner.value).length === 0) return err("Empty brackets.", open);
        part = inner.value;
      } else if (ch >= "A" && ch <= "Z") {
        let sym = ch;
        const start = pos;
        pos++;
        if (pos < body.length && body[pos] >= "a" && body[pos] <= "z") {
          sym += body[pos];
          pos++;
        }
        if (!ELEMENTS.has(sym)) return err(`"${sym}" is not an element symbol.`, start);
        part = { [sym]: 1 };
      } else {
        return err(`Unexpected character "${ch}".`, pos);
      }
      const cpos = pos;
      const c = readInt();
      if (c === 0) return err("A count must be at least 1.", cpos);
      if (c !== null && c > FORMULA_MAX_COUNT) return err(`A count must be at most ${FORMULA_MAX_COUNT}.`, cpos);
      const mult = c ?? 1;
      for (const [k, v] of Object.entries(part)) acc[k] = (acc[k] ?? 0) + v * mult;
      any = true;
    }
    if (!any && close === null) return err("Expected an element or a bracket.", pos);
    return { ok: true, value: acc };
  }

  while (pos < body.length) {
    const mpos = pos;
    const lead = readInt();
    if (lead === 0) return err("A multiplier must be at least 1.", mpos);
    if (lead !== null && lead > FORMULA_MAX_COUNT) return err(`A multiplier must be at most ${FORMULA_MAX_COUNT}.`, mpos);
    const seq = parseSeq(null);
    if (!seq.ok) return seq;
    for (const [k, v] of Object.entries(seq.value)) counts[k] = (counts[k] ?? 0) + v * (lead ?? 1);
    if (pos < body.length) {
      // separator
      pos++;
      if (pos >= body.length) return err("A hydrate separator must be followed by a formula.", pos - 1);
    }
  }
  for (const [el, n] of Object.entries(counts)) {
    if (n > FORMULA_MAX_ATOMS) return err(`The formula has ${n > 1e15 ? "far more than" : n} ${el} atoms; at most ${FORMULA_MAX_ATOMS} of one element are allowed.`, 0);
  }
  return { ok: true, value: { elements: counts, charge } };
}

export interface BalanceTerm {
  formula: string;
  coef: number; // stoichiometric coefficient, positive
}

export interface BalanceReport {
  balanced: boolean;
  /** Element → (products − reactants) atom count; only non-zero entries. */
  elementExcess: Record<string, number>;
  /** Products' total charge minus reactants' total charge. */
  chargeExcess: number;
}

/** Check element and charge balance of a step given its reactant and product formulas. */
export function checkElementBalance(reactants: BalanceTerm[], products: BalanceTerm[]): Result<BalanceReport> {
  const net: Record<string, number> = {};
  let charge = 0;
  const add = (terms: BalanceTerm[], sign: number, side: string): EngineError | null => {
    for (let i = 0; i < terms.length; i++) {
      const p = parseFormula(terms[i].formula);
      if (!p.ok) return { ...p.error, path: `${side}[${i}].${p.error.path ?? "formula"}` };
      for (const [k, v] of Object.entries(p.value.elements)) net[k] = (net[k] ?? 0) + sign * terms[i].coef * v;
      charge += sign * terms[i].coef * p.value.charge;
    }
    return null;
  };
  const e1 = add(reactants, -1, "reactants");
  if (e1) return { ok: false, error: e1 };
  const e2 = add(products, +1, "products");
  if (e2) return { ok: false, error: e2 };
  const excess: Record<string, number> = {};
  // Fractional coefficients leave rounding residues (1/3·3 − 1); below 1e-9 atoms is balanced.
  const clean = (v: number) => (Math.abs(v) < 1e-9 ? 0 : v);
  for (const [k, v] of Object.entries(net)) if (clean(v) !== 0) excess[k] = v;
  charge = clean(charge);
  return { ok: true, value: { balanced: Object.keys(excess).length === 0 && charge === 0, elementExcess: excess, chargeExcess: charge } };
}
