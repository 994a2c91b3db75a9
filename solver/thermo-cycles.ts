/**
 * Thermodynamic consistency of reversible steps around cycles (Wegscheider's condition,
 * Z. Phys. Chem. 39, 257 (1902)): for every combination x of reactions with zero net
 * stoichiometry (N·x = 0, N the species × step stoichiometric matrix), Π K_c,j^(x_j) = 1,
 * i.e. Σ x_j·ΔG°rxn,j = 0 once all ΔG° refer to one standard state.
 *
 * The independent cycles are an integer basis of the null space of N restricted to the
 * reversible steps, found by exact (BigInt) row reduction. The residual of a cycle is
 *     residual = −RT·Σ x_j·ln K_c,j   (J/mol),
 * which equals Σ x_j·ΔG°rxn,j for steps in one standard state and converts mixed standard
 * states correctly (the c° factors cancel because Σ x_j·Δν_j = 0). Since the residual is
 * linear in x, every cycle is consistent exactly when every basis cycle is.
 */
import { R_GAS } from "./constants.ts";
import { compileThermo, lnEquilibriumCompiled } from "./detailed-balance.ts";
import { checkFinite, checkTemperature, fail, ok } from "./input-checks.ts";
import type { Result, StepKinetics } from "./types.ts";

/** Default tolerance on |Σ x_j·ΔG°_j|, J/mol (0.1 kJ/mol). */
export const CYCLE_TOLERANCE_DEFAULT = 100;

export interface ThermoCycle {
  /** Ids of the steps in the cycle (nonzero coefficients only). */
  stepIds: string[];
  /** Integer multipliers of each step (negative: run in reverse), same order as stepIds. */
  coefficients: number[];
  /** Σ x_j·ΔG°rxn,j in one standard state, J/mol; 0 for a consistent cycle. */
  residual: number;
  /** |residual| ≤ tolerance */
  consistent: boolean;
}

function bgcd(a: bigint, b: bigint): bigint {
  if (a < 0n) a = -a;
  if (b < 0n) b = -b;
  while (b !== 0n) [a, b] = [b, a % b];
  return a;
}

/**
 * Integer basis of the null space of an integer matrix (rows × cols): vectors x with
 * M·x = 0. Each basis vector is primitive (gcd 1) with its first nonzero entry positive.
 */
export function integerNullSpace(M: number[][], cols: number): number[][] {
  const rows: bigint[][] = M.map((r) => r.map((v) => BigInt(v)));
  const pivots: number[] = []; // pivot column of row r
  let r = 0;
  for (let c = 0; c < cols && r < rows.length; c++) {
    let p = -1;
    for (let i = r; i < rows.length; i++) if (rows[i][c] !== 0n) { p = i; break; }
    if (p < 0) continue;
    [rows[r], rows[p]] = [rows[p], rows[r]];
    const pr = rows[r];
    for (let i = 0; i < rows.length; i++) {
      if (i === r || rows[i][c] === 0n) continue;
      const f = rows[i][c];
      const P = pr[c];
      const row = rows[i];
      let g = 0n;
      for (let j = 0; j < cols; j++) {
        row[j] = row[j] * P - pr[j] * f;
        g = bgcd(g, row[j]);
      }
      if (g > 1n) for (let j = 0; j < cols; j++) row[j] /= g;
    }
    pivots.push(c);
    r++;
  }
  const isPivot = new Set(pivots);
  const basis: number[][] = [];
  for (let f = 0; f < cols; f++) {
    if (isPivot.has(f)) continue;
    // x_f = L, x_p(i) = −R[i][f]·L/P_i with L the lcm of the pivots
    let L = 1n;
    for (let i = 0; i < pivots.length; i++) {
      const P = rows[i][pivots[i]] < 0n ? -rows[i][pivots[i]] : rows[i][pivots[i]];
      L = (L / bgcd(L, P)) * P;
    }
    const x: bigint[] = new Array(cols).fill(0n);
    x[f] = L;
    for (let i = 0; i < pivots.length; i++) x[pivots[i]] = (-rows[i][f] * L) / rows[i][pivots[i]];
    let g = 0n;
    for (const v of x) g = bgcd(g, v);
    const first = x.find((v) => v !== 0n) ?? 1n;
    const sign = first < 0n ? -1n : 1n;
    basis.push(x.map((v) => Number((v / g) * sign)));
  }
  return basis;
}

/**
 * Every independent cycle among the reversible steps, with its residual at T (K).
 * Irreversible steps are left out; a reversible step without thermochemistry is an error.
 * `tolerance` in J/mol (default 100 J/mol = 0.1 kJ/mol).
 */
export function findThermoCycles(steps: StepKinetics[], T: number, tolerance = CYCLE_TOLERANCE_DEFAULT): Result<ThermoCycle[]> {
  const badT = checkTemperature(T, "T");
  if (badT) return badT;
  const nf = checkFinite(tolerance, "The tolerance", "tolerance");
  if (nf) return nf;
  if (!Array.isArray(steps)) return fail("EMPTY_INPUT", "The steps must be a list.", "steps");
  const idx: number[] = [];
  const lnK: number[] = [];
  for (let i = 0; i < steps.length; i++) {
    if (!steps[i].reversible) continue;
    const th = compileThermo(steps[i], `steps[${i}]`);
    if (!th.ok) return th;
    idx.push(i);
    lnK.push(lnEquilibriumCompiled(th.value, T));
  }
  const speciesRow = new Map<string, number>();
  const M: number[][] = [];
  const n = idx.length;
  const add = (species: string, col: number, v: number) => {
    let row = speciesRow.get(species);
    if (row === undefined) {
      row = M.length;
      speciesRow.set(species, row);
      M.push(new Array(n).fill(0));
    }
    M[row][col] += v;
  };
  idx.forEach((i, col) => {
    for (const t of steps[i].reactants) add(t.species, col, -t.coef);
    for (const t of steps[i].products) add(t.species, col, t.coef);
  });
  const RT = R_GAS * T;
  const cycles: ThermoCycle[] = [];
  for (const x of integerNullSpace(M, n)) {
    const stepIds: string[] = [];
    const coefficients: number[] = [];
    let s = 0;
    for (let col = 0; col < n; col++) {
      if (x[col] === 0) continue;
      stepIds.push(steps[idx[col]].id);
      coefficients.push(x[col]);
      s += x[col] * lnK[col];
    }
    const residual = -RT * s;
    cycles.push({ stepIds, coefficients, residual, consistent: Math.abs(residual) <= tolerance });
  }
  return ok(cycles);
}

/**
 * The independent cycles of reversible steps whose Σ x_j·ΔG°rxn,j at T (K) differs from 0
 * by more than `tolerance` J/mol (default 0.1 kJ/mol): Wegscheider violations. Empty when
 * the mechanism is thermodynamically consistent.
 */
export function checkThermoCycles(steps: StepKinetics[], T: number, tolerance = CYCLE_TOLERANCE_DEFAULT): Result<ThermoCycle[]> {
  const all = findThermoCycles(steps, T, tolerance);
  if (!all.ok) return all;
  return ok(all.value.filter((c) => !c.consistent));
}
