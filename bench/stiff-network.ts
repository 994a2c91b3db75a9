/**
 * Seeded, mass-conserving stiff reaction networks for the simulation benchmark.
 * Species carry an integer mass 1, 2 or 3; steps are reversible isomerisations X ⇌ Y
 * (equal mass) and associations X + Y ⇌ Z (m_X + m_Y = m_Z), so Σ m_i·c_i is conserved.
 * Rate constants are log-uniform in [1e-6, 1e9] (s⁻¹ or L mol⁻¹ s⁻¹).
 * Units: concentrations mol/L, time s.
 */
import type { MechanismInput, ReactionInput } from "../solver/model.ts";

export interface StiffNetwork {
  mechanism: MechanismInput;
  kf: Float64Array;
  kr: Float64Array;
  c0: Float64Array;
  mass: Float64Array;
  tEnd: number;
}

/** Seeded linear congruential generator (Numerical Recipes constants, common practice). */
export function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
}

export function stiffNetwork(N: number, seed = 1234): StiffNetwork {
  const rnd = lcg(seed);
  const mass = new Float64Array(N);
  const byMass: number[][] = [[], [], [], []];
  for (let i = 0; i < N; i++) {
    mass[i] = i < N / 2 ? 1 : i < (5 * N) / 6 ? 2 : 3;
    byMass[mass[i]].push(i);
  }
  const pick = (arr: number[]) => arr[Math.floor(rnd() * arr.length)];
  const logk = () => Math.pow(10, -6 + 15 * rnd());
  const reactions: ReactionInput[] = [];
  const kf: number[] = [];
  const kr: number[] = [];
  const seen = new Set<string>();
  const add = (r: number[], p: number[]) => {
    const key = [...r].sort().join("+") + ">" + [...p].sort().join("+");
    if (seen.has(key)) return;
    seen.add(key);
    const terms = (xs: number[]) => {
      const m = new Map<number, number>();
      for (const x of xs) m.set(x, (m.get(x) ?? 0) + 1);
      return [...m].map(([s, coef]) => ({ species: `S${s}`, coef }));
    };
    reactions.push({ id: `R${reactions.length}`, reactants: terms(r), products: terms(p), reversible: true });
    kf.push(logk());
    kr.push(logk());
  };
  // a chain of isomerisations keeps each mass class connected
  for (let m = 1; m <= 3; m++) for (let k = 1; k < byMass[m].length; k++) add([byMass[m][k - 1]], [byMass[m][k]]);
  // associations
  const nAssoc = N;
  for (let a = 0; a < nAssoc; a++) {
    if (rnd() < 0.6) add([pick(byMass[1]), pick(byMass[1])], [pick(byMass[2])]);
    else add([pick(byMass[1]), pick(byMass[2])], [pick(byMass[3])]);
  }
  const c0 = new Float64Array(N);
  for (const i of byMass[1]) c0[i] = 0.2 * rnd();
  return {
    mechanism: { species: Array.from({ length: N }, (_, i) => ({ id: `S${i}` })), reactions },
    kf: Float64Array.from(kf),
    kr: Float64Array.from(kr),
    c0,
    mass,
    tEnd: 100,
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
