/**
 * Compile a mechanism (species + elementary steps) into a mass-action model:
 * sparse stoichiometry, right-hand side dc/dt, analytic sparse Jacobian, conservation laws
 * (left null space of the stoichiometric matrix) and an element-balance report.
 *
 * Units: concentrations c in mol/L; time in s; forward/reverse rate constants kf, kr in
 * (mol/L)^(1−m) s⁻¹ for a step of molecularity m (m = sum of coefficients on that side; 0 for
 * a zero-order source, whose k is in mol L⁻¹ s⁻¹; fractional when a coefficient is);
 * reaction rates v in mol L⁻¹ s⁻¹; dc/dt in mol L⁻¹ s⁻¹; Jacobian entries in s⁻¹.
 *
 * Rate-law convention (IUPAC Green Book, rate of reaction — common practice): an elementary
 * step Σ ν_i R_i → Σ μ_j P_j has rate v = kf·Π c_Ri^ν_i − kr·Π c_Pj^μ_j, and
 * dc_X/dt = Σ_steps (μ_X − ν_X)·v. So for 2A → P, d[A]/dt = −2·k·[A]², and 1/[A] = 1/[A]₀ + 2kt.
 *
 * Steps are taken as written: a step with no reactants is a zero-order source (v = kf), one with
 * no products a sink; a species on both sides (A + B → 2A) enters dc/dt with its net coefficient
 * and the rate law with its reactant order; coefficients may be fractional (0.5 A → P has
 * v = k·[A]^0.5, and 77.27 X as a product adds 77.27 per unit of reaction). Sources and sinks
 * exchange matter with the surroundings: they compile, with a warning, and cannot be reversible.
 * A fractional order is evaluated on max(c, 0), so a concentration undershooting zero within
 * the tolerance gives no NaN.
 *
 * The model does not know rate constants: callers supply arrays kf[r], kr[r] for the current
 * temperature (kr ignored for irreversible steps).
 */
import type { EngineError, Result, Species, StoichTerm } from "./types.ts";
import { MAX_COEF } from "./barrier-forms.ts";
import { checkElementBalance, type BalanceReport } from "./formula.ts";

export interface ReactionInput {
  id: string;
  reactants: StoichTerm[];
  products: StoichTerm[];
  reversible: boolean;
}

export interface MechanismInput {
  species: Species[];
  /** Elementary steps; a StepKinetics from types.ts fits this shape. */
  reactions: ReactionInput[];
}

export interface ElementBalanceEntry {
  reactionId: string;
  /** null when some species of the step has no formula. */
  report: BalanceReport | null;
}

export interface CompiledModel {
  readonly nSpecies: number;
  readonly nReactions: number;
  readonly speciesIds: string[];
  readonly reactionIds: string[];
  readonly speciesIndex: ReadonlyMap<string, number>;
  readonly reversible: Uint8Array;
  /** Stoichiometric matrix N (species × reactions), CSR by species row; N = products − reactants. */
  readonly stoich: { rowPtr: Int32Array; colIdx: Int32Array; values: Float64Array };
  /** Net rate of each step (mol L⁻¹ s⁻¹) into v. */
  rates(c: Float64Array, kf: Float64Array, kr: Float64Array, v: Float64Array): void;
  /** dc/dt (mol L⁻¹ s⁻¹) into dcdt. */
  rhs(c: Float64Array, kf: Float64Array, kr: Float64Array, dcdt: Float64Array): void;
  /** CSR pattern of ∂(dc/dt)/∂c, computed once; column indices ascending per row. */
  readonly jacobianPattern: { rowPtr: Int32Array; colIdx: Int32Array };
  /** Fill Jacobian values (s⁻¹) in pattern order. */
  jacobian(c: Float64Array, kf: Float64Array, kr: Float64Array, values: Float64Array): void;
  /** Basis of conservation laws w (wᵀN = 0), one Float64Array per law, length nSpecies. Computed on first use. */
  conservationLaws(): Float64Array[];
  /** Per-step element and charge balance from species formulas. */
  readonly elementBalance: ElementBalanceEntry[];
  /** Non-fatal findings (unbalanced steps, unparsable formulas). */
  readonly warnings: string[];
}

function bad(code: string, message: string, path?: string): { ok: false; error: EngineError } {
  return { ok: false, error: path ? { code, message, path } : { code, message } };
}

interface Side {
  sp: number[];
  ord: number[];
}

/** Compile a mechanism into a mass-action model, or return a typed error. */
export function compileMechanism(input: MechanismInput): Result<CompiledModel> {
  if (!input || !Array.isArray(input.species) || !Array.isArray(input.reactions)) return bad("BAD_INPUT", "A mechanism needs a species list and a step list.");
  if (input.species.length === 0 || input.reactions.length === 0) return bad("EMPTY_MECHANISM", "The mechanism has no species or no steps.");
  const speciesIndex = new Map<string, number>();
  input.species.forEach((s, i) => {
    if (!speciesIndex.has(s.id)) speciesIndex.set(s.id, i);
  });
  for (let i = 0; i < input.species.length; i++) {
    const id = input.species[i].id;
    if (typeof id !== "string" || id === "") return bad("BAD_SPECIES", `Species ${i} has no id.`, `species[${i}].id`);
    if (speciesIndex.get(id) !== i) return bad("DUPLICATE_SPECIES", `Species "${id}" is listed more than once.`, `species[${i}].id`);
  }
  const nS = input.species.length;
  const nR = input.reactions.length;
  const reactionIds: string[] = [];
  const seenR = new Set<string>();
  const fwd: Side[] = [];
  const rev: Side[] = [];
  const reversible = new Uint8Array(nR);
  const net: Map<number, number>[] = [];
  for (let r = 0; r < nR; r++) {
    const rx = input.reactions[r];
    const path = `reactions[${r}]`;
    if (seenR.has(rx.id)) return bad("DUPLICATE_STEP", `Step "${rx.id}" is listed more than once.`, `${path}.id`);
    seenR.add(rx.id);
    reactionIds.push(rx.id);
    reversible[r] = rx.reversible ? 1 : 0;
    const sides: [StoichTerm[], string][] = [
      [rx.reactants, "reactants"],
      [rx.products, "products"],
    ];
    const parsed: Side[] = [];
    for (const [terms, name] of sides) {
      if (!Array.isArray(terms)) return bad("BAD_INPUT", `The ${name} of step "${rx.id}" must be a list.`, `${path}.${name}`);
      const acc = new Map<number, number>();
      for (let j = 0; j < terms.length; j++) {
        const t = terms[j];
        const i = speciesIndex.get(t.species);
        if (i === undefined) return bad("UNKNOWN_SPECIES", `Step "${rx.id}" refers to species "${t.species}", which is not in the mechanism.`, `${path}.${name}[${j}].species`);
        if (typeof t.coef !== "number" || !Number.isFinite(t.coef) || t.coef <= 0 || t.coef > MAX_COEF) {
          return bad("BAD_COEFFICIENT", `Step "${rx.id}" has coefficient ${t.coef} for "${t.species}"; coefficients must be positive numbers up to ${MAX_COEF}.`, `${path}.${name}[${j}].coef`);
        }
        acc.set(i, (acc.get(i) ?? 0) + t.coef);
      }
      let m = 0;
      for (const v of acc.values()) m += v;
      if (m > 3 + 1e-12 && (name === "reactants" || rx.reversible)) return bad("MOLECULARITY", `Step "${rx.id}" has molecularity ${m} on its ${name} side; elementary steps allow at most 3.`, `${path}.${name}`);
      parsed.push({ sp: [...acc.keys()], ord: [...acc.values()] });
    }
    if (parsed[0].sp.length === 0 && parsed[1].sp.length === 0) return bad("EMPTY_SIDE", `Step "${rx.id}" has neither reactants nor products.`, path);
    if (rx.reversible && (parsed[0].sp.length === 0 || parsed[1].sp.length === 0)) {
      return bad(
        "OPEN_STEP_REVERSIBLE",
        `Step "${rx.id}" is a ${parsed[0].sp.length === 0 ? "source (no reactants)" : "sink (no products)"} and cannot be reversible; enter any return flow as a step of its own.`,
        `${path}.reversible`,
      );
    }
    fwd.push(parsed[0]);
    rev.push(parsed[1]);
    const nm = new Map<number, number>();
    parsed[0].sp.forEach((s, k) => nm.set(s, (nm.get(s) ?? 0) - parsed[0].ord[k]));
    parsed[1].sp.forEach((s, k) => nm.set(s, (nm.get(s) ?? 0) + parsed[1].ord[k]));
    // A species on both sides in equal amounts (a catalyst) has no net change; rounding of
    // fractional coefficients is cleared the same way.
    for (const [s, v] of [...nm]) if (Math.abs(v) <= 1e-12) nm.delete(s);
    net.push(nm);
  }

  // ---- net stoichiometry per step (flattened)
  const nPtr = new Int32Array(nR + 1);
  for (let r = 0; r < nR; r++) nPtr[r + 1] = nPtr[r] + net[r].size;
  const nSp = new Int32Array(nPtr[nR]);
  const nCoef = new Float64Array(nPtr[nR]);
  for (let r = 0; r < nR; r++) {
    let q = nPtr[r];
    for (const [s, v] of net[r]) ((nSp[q] = s), (nCoef[q] = v), q++);
  }
  // stoichiometric matrix in CSR by species
  const stRows: [number, number][][] = Array.from({ length: nS }, () => []);
  for (let r = 0; r < nR; r++) for (const [s, v] of net[r]) stRows[s].push([r, v]);
  const stPtr = new Int32Array(nS + 1);
  for (let i = 0; i < nS; i++) stPtr[i + 1] = stPtr[i] + stRows[i].length;
  const stCol = new Int32Array(stPtr[nS]);
  const stVal = new Float64Array(stPtr[nS]);
  for (let i = 0; i < nS; i++) stRows[i].forEach(([r, v], k) => ((stCol[stPtr[i] + k] = r), (stVal[stPtr[i] + k] = v)));

  // ---- evaluation tables, compiled once into flat typed arrays.
  // Each rate factor is listed once per unit of its order (2A → [A, A]), padded to exactly three
  // factors per side with the index nS, which points at a constant 1 in the work copy `cx` of the
  // concentrations (molecularity ≤ 3 is enforced for every side that enters a rate law; a source
  // has three padding factors). So a rate is kf·cx[a]·cx[b]·cx[c] with no inner loop.
  // Irreversible steps have isRev 0. A side with a fractional order gets one slot of its own
  // after the constant, cx[nS + 1 + g] = Π max(c, 0)^order, refreshed at the start of every
  // evaluation (`fillGeneral`); its Jacobian is added by `generalJacobian`.
  const f3 = new Int32Array(3 * nR).fill(nS);
  const b3 = new Int32Array(3 * nR).fill(nS);
  const isRev = new Uint8Array(nR);
  const gen: { r: number; sign: 1 | -1; sp: number[]; ord: number[] }[] = [];
  const place = (side: Side, S3: Int32Array, r: number, sign: 1 | -1) => {
    if (side.ord.every((o) => Number.isInteger(o))) {
      let q = 0;
      side.sp.forEach((sp, k) => {
        for (let o = 0; o < side.ord[k]; o++) S3[3 * r + q++] = sp;
      });
    } else {
      S3[3 * r] = nS + 1 + gen.length;
      gen.push({ r, sign, sp: side.sp, ord: side.ord });
    }
  };
  for (let r = 0; r < nR; r++) {
    place(fwd[r], f3, r, 1);
    if (reversible[r]) {
      isRev[r] = 1;
      place(rev[r], b3, r, -1);
    }
  }
  const nGen = gen.length;
  const cx = new Float64Array(nS + 1 + nGen);
  cx[nS] = 1;
  const fillGeneral = () => {
    for (let g = 0; g < nGen; g++) {
      const { sp, ord } = gen[g];
      let p = 1;
      for (let k = 0; k < sp.length; k++) p *= Math.pow(Math.max(cx[sp[k]], 0), ord[k]);
      cx[nS + 1 + g] = p;
    }
  };

  function rates(c: Float64Array, kf: Float64Array, kr: Float64Array, v: Float64Array): void {
    for (let i = 0; i < nS; i++) cx[i] = c[i];
    if (nGen > 0) fillGeneral();
    for (let r = 0; r < nR; r++) {
      const q = 3 * r;
      let a = kf[r] * cx[f3[q]] * cx[f3[q + 1]] * cx[f3[q + 2]];
      if (isRev[r] === 1) a -= kr[r] * cx[b3[q]] * cx[b3[q + 1]] * cx[b3[q + 2]];
      v[r] = a;
    }
  }
  function rhs(c: Float64Array, kf: Float64Array, kr: Float64Array, dcdt: Float64Array): void {
    // Locals for the tables (measurably faster than the closure's bindings in this hot loop).
    const x = cx, F = f3, B = b3, P = nPtr, S = nSp, K = nCoef, rev = isRev;
    for (let i = 0; i < nS; i++) ((x[i] = c[i]), (dcdt[i] = 0));
    if (nGen > 0) fillGeneral();
    let t = 0;
    for (let r = 0, q = 0; r < nR; r++, q += 3) {
      let a = kf[r] * x[F[q]] * x[F[q + 1]] * x[F[q + 2]];
      if (rev[r] === 1) a -= kr[r] * x[B[q]] * x[B[q + 1]] * x[B[q + 2]];
      for (const e = P[r + 1]; t < e; t++) dcdt[S[t]] += K[t] * a;
    }
  }

  // ---- Jacobian pattern: row i holds every species some step changing i depends on
  const slotSpecies: number[][] = [];
  for (let r = 0; r < nR; r++) {
    const set = new Set<number>(fwd[r].sp);
    if (reversible[r]) for (const s of rev[r].sp) set.add(s);
    slotSpecies.push([...set]);
  }
  const patRows: Set<number>[] = Array.from({ length: nS }, () => new Set());
  for (let r = 0; r < nR; r++) for (const [i] of net[r]) for (const s of slotSpecies[r]) patRows[i].add(s);
  const jPtr = new Int32Array(nS + 1);
  const rowLists = patRows.map((s) => [...s].sort((a, b) => a - b));
  for (let i = 0; i < nS; i++) jPtr[i + 1] = jPtr[i] + rowLists[i].length;
  const jCol = new Int32Array(jPtr[nS]);
  const posMap: Map<number, number>[] = [];
  for (let i = 0; i < nS; i++) {
    const m = new Map<number, number>();
    rowLists[i].forEach((s, k) => ((jCol[jPtr[i] + k] = s), m.set(s, jPtr[i] + k)));
    posMap.push(m);
  }
  // For every padded factor slot q (3 per side and step), ∂v/∂(factor q) = ±k·(product of the
  // other two slots); it enters row i of the Jacobian with the net coefficient of i. Padding
  // slots have no targets. Targets per slot: tPos/tCoef from tPtr[q].
  const targets = (S3: Int32Array, use: (r: number) => boolean) => {
    const ptr = new Int32Array(3 * nR + 1);
    const pos: number[] = [];
    const coef: number[] = [];
    for (let r = 0; r < nR; r++) {
      for (let j = 0; j < 3; j++) {
        const q = 3 * r + j;
        const sp = S3[q];
        if (use(r) && sp < nS) {
          for (let t = nPtr[r]; t < nPtr[r + 1]; t++) {
            pos.push(posMap[nSp[t]].get(sp)!);
            coef.push(nCoef[t]);
          }
        }
        ptr[q + 1] = pos.length;
      }
    }
    return { ptr, pos: Int32Array.from(pos), coef: Float64Array.from(coef) };
  };
  const FT = targets(f3, () => true);
  const BT = targets(b3, (r) => isRev[r] === 1);
  const ftPtr = FT.ptr, ftPos = FT.pos, ftCoef = FT.coef, btPtr = BT.ptr, btPos = BT.pos, btCoef = BT.coef;

  // Fractional-order sides: ∂v/∂c_j = ±k·ν_j·c_j^(ν_j−1)·Π_{i≠j} c_i^ν_i (on max(c, 0)); at
  // c_j = 0 with ν_j < 1 the derivative is unbounded and is taken as 0 (the step then contributes
  // no Jacobian entry for that species until it is present).
  const genTargets = gen.map(({ r, sp }) =>
    sp.map((s) => {
      const pos: number[] = [];
      const coef: number[] = [];
      for (let t = nPtr[r]; t < nPtr[r + 1]; t++) {
        pos.push(posMap[nSp[t]].get(s)!);
        coef.push(nCoef[t]);
      }
      return { pos, coef };
    }),
  );
  function generalJacobian(kf: Float64Array, kr: Float64Array, values: Float64Array): void {
    for (let g = 0; g < nGen; g++) {
      const { r, sign, sp, ord } = gen[g];
      const k = sign === 1 ? kf[r] : kr[r];
      for (let j = 0; j < sp.length; j++) {
        const cj = Math.max(cx[sp[j]], 0);
        if (cj === 0 && ord[j] < 1) continue;
        let d = k * ord[j] * (ord[j] === 1 ? 1 : Math.pow(cj, ord[j] - 1));
        for (let i = 0; i < sp.length; i++) if (i !== j) d *= Math.pow(Math.max(cx[sp[i]], 0), ord[i]);
        const tg = genTargets[g][j];
        for (let t = 0; t < tg.pos.length; t++) values[tg.pos[t]] += sign * tg.coef[t] * d;
      }
    }
  }

  function jacobian(c: Float64Array, kf: Float64Array, kr: Float64Array, values: Float64Array): void {
    // Locals for the tables: the loops below run once per step and Jacobian, so they are kept tight.
    const x = cx, F = f3, B = b3, rev = isRev;
    const fP = ftPtr, fPos = ftPos, fC = ftCoef, bP = btPtr, bPos = btPos, bC = btCoef;
    for (let i = 0; i < nS; i++) x[i] = c[i];
    if (nGen > 0) fillGeneral();
    values.fill(0);
    for (let r = 0, q = 0; r < nR; r++, q += 3) {
      // ∂(k·x0·x1·x2)/∂x_j = k·Π_{others}; repeated factors (2A) sum to 2k·c_A
      let x0 = x[F[q]], x1 = x[F[q + 1]], x2 = x[F[q + 2]];
      let k = kf[r];
      let d = k * x1 * x2;
      let t = fP[q];
      for (let e = fP[q + 1]; t < e; t++) values[fPos[t]] += fC[t] * d;
      d = k * x0 * x2;
      for (let e = fP[q + 2]; t < e; t++) values[fPos[t]] += fC[t] * d;
      d = k * x0 * x1;
      for (let e = fP[q + 3]; t < e; t++) values[fPos[t]] += fC[t] * d;
      if (rev[r] === 1) {
        x0 = x[B[q]];
        x1 = x[B[q + 1]];
        x2 = x[B[q + 2]];
        k = kr[r];
        d = k * x1 * x2;
        t = bP[q];
        for (let e = bP[q + 1]; t < e; t++) values[bPos[t]] -= bC[t] * d;
        d = k * x0 * x2;
        for (let e = bP[q + 2]; t < e; t++) values[bPos[t]] -= bC[t] * d;
        d = k * x0 * x1;
        for (let e = bP[q + 3]; t < e; t++) values[bPos[t]] -= bC[t] * d;
      }
    }
    if (nGen > 0) generalJacobian(kf, kr, values);
  }

  // ---- element balance
  const warnings: string[] = [];
  const elementBalance: ElementBalanceEntry[] = [];
  for (let r = 0; r < nR; r++) {
    const rx = input.reactions[r];
    // Mass balance: a source or sink is an open boundary, accepted as written and reported.
    if (fwd[r].sp.length === 0) warnings.push(`Step "${rx.id}" has no reactants: it is a zero-order source (matter enters at a constant rate).`);
    if (rev[r].sp.length === 0) warnings.push(`Step "${rx.id}" has no products: it is a sink (matter leaves the mechanism).`);
    const formulaOf = (t: StoichTerm) => input.species[speciesIndex.get(t.species)!].formula;
    const all = [...rx.reactants, ...rx.products];
    if (all.some((t) => !formulaOf(t))) {
      elementBalance.push({ reactionId: rx.id, report: null });
      continue;
    }
    const res = checkElementBalance(
      rx.reactants.map((t) => ({ formula: formulaOf(t)!, coef: t.coef })),
      rx.products.map((t) => ({ formula: formulaOf(t)!, coef: t.coef })),
    );
    if (!res.ok) {
      warnings.push(`Step "${rx.id}": a species formula could not be read (${res.error.message})`);
      elementBalance.push({ reactionId: rx.id, report: null });
    } else {
      elementBalance.push({ reactionId: rx.id, report: res.value });
      if (!res.value.balanced) {
        const parts = Object.entries(res.value.elementExcess).map(([e, v]) => `${e} ${v > 0 ? "+" : ""}${v}`);
        if (res.value.chargeExcess !== 0) parts.push(`charge ${res.value.chargeExcess > 0 ? "+" : ""}${res.value.chargeExcess}`);
        warnings.push(`Step "${rx.id}" is not balanced (products − reactants: ${parts.join(", ")}).`);
      }
    }
  }

  let laws: Float64Array[] | null = null;
  const conservationLaws = () => {
    if (!laws) laws = leftNullSpace(nS, nR, net);
    return laws;
  };

  return {
    ok: true,
    value: {
      nSpecies: nS,
      nReactions: nR,
      speciesIds: input.species.map((s) => s.id),
      reactionIds,
      speciesIndex,
      reversible,
      stoich: { rowPtr: stPtr, colIdx: stCol, values: stVal },
      rates,
      rhs,
      jacobianPattern: { rowPtr: jPtr, colIdx: jCol },
      jacobian,
      conservationLaws,
      elementBalance,
      warnings,
    },
  };
}

/**
 * Basis of {w : wᵀN = 0}: the null space of Nᵀ (reactions × species) by reduced row echelon
 * form with partial pivoting (textbook Gauss–Jordan; common practice). Rows are kept sparse
 * as Maps, which keeps big mass-action networks cheap. Each basis vector is scaled so its
 * smallest non-zero magnitude is 1 and near-integers are rounded.
 */
export function leftNullSpace(nS: number, nR: number, net: Map<number, number>[]): Float64Array[] {
  const rows: Map<number, number>[] = net.map((m) => new Map(m));
  const pivotCols: number[] = [];
  const pivotRowOf = new Int32Array(nS).fill(-1);
  const tol = 1e-10;
  let rank = 0;
  // column index → set of rows (among unprocessed) having a non-zero there
  for (let col = 0; col < nS && rank < nR; col++) {
    let best = -1;
    let bestAbs = tol;
    for (let r = rank; r < rows.length; r++) {
      const v = Math.abs(rows[r].get(col) ?? 0);
      if (v > bestAbs) {
        bestAbs = v;
        best = r;
      }
    }
    if (best < 0) continue;
    [rows[rank], rows[best]] = [rows[best], rows[rank]];
    const prow = rows[rank];
    const pv = prow.get(col)!;
    for (const [k, v] of prow) prow.set(k, v / pv);
    for (let r = 0; r < rows.length; r++) {
      if (r === rank) continue;
      const f = rows[r].get(col);
      if (f === undefined || f === 0) continue;
      const row = rows[r];
      for (const [k, v] of prow) {
        const nv = (row.get(k) ?? 0) - f * v;
        if (Math.abs(nv) < tol) row.delete(k);
        else row.set(k, nv);
      }
    }
    pivotCols.push(col);
    pivotRowOf[col] = rank;
    rank++;
  }
  const laws: Float64Array[] = [];
  for (let free = 0; free < nS; free++) {
    if (pivotRowOf[free] >= 0) continue;
    const w = new Float64Array(nS);
    w[free] = 1;
    for (const pc of pivotCols) w[pc] = -(rows[pivotRowOf[pc]].get(free) ?? 0);
    let minAbs = Infinity;
    for (let i = 0; i < nS; i++) if (Math.abs(w[i]) > tol && Math.abs(w[i]) < minAbs) minAbs = Math.abs(w[i]);
    for (let i = 0; i < nS; i++) {
      let v = w[i] / minAbs;
      if (Math.abs(v - Math.round(v)) < 1e-9) v = Math.round(v);
      w[i] = Math.abs(v) < tol ? 0 : v;
    }
    laws.push(w);
  }
  return laws;
}
