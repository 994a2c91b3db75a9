/**
 * Seeded stiff reaction networks for the simulation benchmark: mass-conserving,
 * thermodynamically consistent and locally connected, like real mechanisms.
 *
 * Generator (version 2):
 *  - Species S0 … S(N−1) lie on a line. Each carries an integer mass 1, 2 or 3 by the repeating
 *    pattern 1,1,1,2,2,3 (half of the species have mass 1, a third mass 2, a sixth mass 3), so
 *    every stretch of six neighbouring indices holds all three classes.
 *  - Steps are reversible isomerisations X ⇌ Y (equal mass) and associations X + Y ⇌ Z
 *    (m_X + m_Y = m_Z), so Σ m_i·c_i is conserved exactly.
 *  - Connectivity is local: a chain of isomerisations joins each species to the next one of its
 *    mass class (index distance ≤ 6); then N associations, each among species within ±WINDOW of
 *    a random centre; then ⌈N/50⌉ long-range associations among species anywhere in the line.
 *  - Thermodynamic consistency: each species gets a standard free energy (1 mol/L standard
 *    state, T = 298.15 K) G_i = −RT·ln(10)·s_i with s_i = 3·(m_i − 1) + U(−1.5, 1.5), and every
 *    step's equilibrium constant follows from it: log10 K_c = Σ s_products − Σ s_reactants
 *    ((mol/L)^(−Δn)). Hence k_r = k_f / K_c = k_f·exp(ΔG°/RT), and every cycle of steps satisfies
 *    Wegscheider's condition exactly (detailed balance; the network relaxes to one equilibrium).
 *  - Rate constants: log10 k_f is uniform over the range that keeps both k_f and k_r inside
 *    [1e-6, 1e9] (s⁻¹ or L mol⁻¹ s⁻¹), so the constants still span fifteen decades.
 *  - Initial state: mass-1 species at 0.2·U(0, 1) mol/L, the rest 0; t_end = 100 s.
 * The scipy comparison (bench/scipy_compare.py) integrates exactly the same network (networkToJson).
 * Units: concentrations mol/L, time s, free energies J/mol.
 */
import { R_GAS } from "../solver/constants.ts";
import type { MechanismInput, ReactionInput } from "../solver/model.ts";

/** Bumped whenever the generator changes, so cached reference solutions are not reused. */
export const NETWORK_GENERATOR_VERSION = 2;

/** Half-width (species indices) of the neighbourhood a local step draws its species from. */
const WINDOW = 6;
const T_REF = 298.15; // K
const LOG10_K_MIN = -6;
const LOG10_K_MAX = 9;

export interface StiffNetwork {
  mechanism: MechanismInput;
  kf: Float64Array;
  kr: Float64Array;
  c0: Float64Array;
  mass: Float64Array;
  /** Standard free energy of each species at 298.15 K, 1 mol/L standard state, J/mol. */
  G: Float64Array;
  tEnd: number;
  seed: number;
}

/** Seeded linear congruential generator (Numerical Recipes constants, common practice). */
export function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
}

const MASS_PATTERN = [1, 1, 1, 2, 2, 3];

export function stiffNetwork(N: number, seed = 1234): StiffNetwork {
  const rnd = lcg(seed);
  const mass = new Float64Array(N);
  const stab = new Float64Array(N); // s_i, log10 units
  const byMass: number[][] = [[], [], [], []];
  for (let i = 0; i < N; i++) {
    mass[i] = MASS_PATTERN[i % 6];
    byMass[mass[i]].push(i);
    stab[i] = 3 * (mass[i] - 1) + (rnd() * 3 - 1.5);
  }
  const G = new Float64Array(N);
  for (let i = 0; i < N; i++) G[i] = -R_GAS * T_REF * Math.LN10 * stab[i];

  const reactions: ReactionInput[] = [];
  const kf: number[] = [];
  const kr: number[] = [];
  const seen = new Set<string>();
  const add = (r: number[], p: number[]) => {
    if (r.length === p.length && [...r].sort().join() === [...p].sort().join()) return;
    const key = [...r].sort().join("+") + ">" + [...p].sort().join("+");
    const back = [...p].sort().join("+") + ">" + [...r].sort().join("+");
    if (seen.has(key) || seen.has(back)) return;
    seen.add(key);
    const terms = (xs: number[]) => {
      const m = new Map<number, number>();
      for (const x of xs) m.set(x, (m.get(x) ?? 0) + 1);
      return [...m].map(([s, coef]) => ({ species: `S${s}`, coef }));
    };
    reactions.push({ id: `R${reactions.length}`, reactants: terms(r), products: terms(p), reversible: true });
    let log10K = 0;
    for (const x of p) log10K += stab[x];
    for (const x of r) log10K -= stab[x];
    const lo = Math.max(LOG10_K_MIN, LOG10_K_MIN + log10K);
    const hi = Math.min(LOG10_K_MAX, LOG10_K_MAX + log10K);
    const lf = lo + (hi - lo) * rnd();
    kf.push(Math.pow(10, lf));
    kr.push(Math.pow(10, lf - log10K));
  };
  // species of mass m within [c − WINDOW, c + WINDOW] (all of them when c < 0: long range)
  const pickNear = (m: number, c: number) => {
    const list = byMass[m];
    if (c < 0) return list[Math.floor(rnd() * list.length)];
    const lo = Math.max(0, c - WINDOW), hi = Math.min(N - 1, c + WINDOW);
    const cand: number[] = [];
    for (let i = lo; i <= hi; i++) if (mass[i] === m) cand.push(i);
    if (cand.length === 0) return list[Math.min(list.length - 1, Math.floor((c / N) * list.length))];
    return cand[Math.floor(rnd() * cand.length)];
  };
  const associate = (c: number) => {
    if (rnd() < 0.6) add([pickNear(1, c), pickNear(1, c)], [pickNear(2, c)]);
    else add([pickNear(1, c), pickNear(2, c)], [pickNear(3, c)]);
  };
  // a chain of isomerisations keeps each mass class connected
  for (let m = 1; m <= 3; m++) for (let k = 1; k < byMass[m].length; k++) add([byMass[m][k - 1]], [byMass[m][k]]);
  for (let a = 0; a < N; a++) associate(Math.floor(rnd() * N));
  const nLong = Math.ceil(N / 50);
  for (let a = 0; a < nLong; a++) associate(-1);

  const c0 = new Float64Array(N);
  for (const i of byMass[1]) c0[i] = 0.2 * rnd();
  return {
    mechanism: { species: Array.from({ length: N }, (_, i) => ({ id: `S${i}` })), reactions },
    kf: Float64Array.from(kf),
    kr: Float64Array.from(kr),
    c0,
    mass,
    G,
    tEnd: 100,
    seed,
  };
}

/** JSON form for the scipy comparison script (indices are 0-based species numbers). */
export function networkToJson(net: StiffNetwork): string {
  const idx = (id: string) => Number(id.slice(1));
  return JSON.stringify({
    n: net.c0.length,
    tEnd: net.tEnd,
    c0: Array.from(net.c0),
    reactions: net.mechanism.reactions.map((r, k) => ({
      reactants: r.reactants.map((t) => [idx(t.species), t.coef]),
      products: r.products.map((t) => [idx(t.species), t.coef]),
      kf: net.kf[k],
      kr: net.kr[k],
    })),
  });
}
