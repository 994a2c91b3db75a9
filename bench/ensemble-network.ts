/**
 * An ensemble over a seeded stiff network (bench/stiff-network.ts), for the queue benchmark and
 * the queue tests: the network as a mechanism document of the exchange format, and an
 * uncertainty request on it.
 *
 * Each step's k_f (s⁻¹ or L mol⁻¹ s⁻¹) becomes its ΔG‡ at 298.15 K by Eyring with a 1 mol/L
 * standard state, k = (k_B·T/h)·exp(−ΔG‡/RT) (common practice), and its equilibrium constant
 * K_c becomes ΔG°rxn = −RT·ln K_c in the same standard state, so the document's rate constants are
 * the network's. Members shift every barrier by a normal error of σ = 2 kJ/mol (Monte Carlo,
 * seeded). Observables: conversion of S0 and yield of S5 at 10 s and 100 s.
 */
import { H_PLANCK, K_B, R_GAS } from "../solver/constants.ts";
import { validateMechanismDocument, type MechanismDocument } from "../solver/exchange-format.ts";
import { EnsembleSpecSchema, type EnsembleSpec } from "../app/ensembles/ensemble-spec.ts";
import { stiffNetwork } from "./stiff-network.ts";

const T = 298.15; // K

export function networkDocument(N: number, seed: number): { document: MechanismDocument; initial: Record<string, number> } {
  const net = stiffNetwork(N, seed);
  const RT = R_GAS * T;
  const steps = net.mechanism.reactions.map((r, k) => {
    const dGa = -RT * Math.log((net.kf[k] * H_PLANCK) / (K_B * T)); // J/mol
    const dGr = -RT * Math.log(net.kf[k] / net.kr[k]); // ΔG°rxn, J/mol
    return {
      id: r.id,
      reactants: r.reactants.map((t) => ({ species: t.species, coef: t.coef })),
      products: r.products.map((t) => ({ species: t.species, coef: t.coef })),
      reversible: true,
      barrier: { form: "dG", dG: dGa / 1000, unit: "kJ/mol", T, standardState: "1M" },
      reactionThermo: { form: "dG", dG: dGr / 1000, unit: "kJ/mol", T, standardState: "1M" },
    };
  });
  const v = validateMechanismDocument({
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: `Seeded ${N}-species network`, illustrative: true },
    species: net.mechanism.species.map((s) => ({ id: s.id })),
    steps,
  });
  if (!v.ok) throw new Error(v.error.message);
  const initial: Record<string, number> = {};
  net.c0.forEach((c, i) => {
    if (c > 0) initial[`S${i}`] = c;
  });
  return { document: v.value, initial };
}

export function networkEnsembleSpec(initial: Record<string, number>, samples: number, opts: { seed?: number; rtol?: number } = {}): EnsembleSpec {
  return EnsembleSpecSchema.parse({
    mechanismId: 1,
    conditions: {
      temperature: { value: T, unit: "K" },
      initial: Object.fromEntries(Object.entries(initial).map(([id, c]) => [id, { value: c, unit: "mol/L" }])),
      endTime: { value: 100, unit: "s" },
    },
    solver: { rtol: opts.rtol ?? 1e-6, atol: 1e-12 },
    mode: "uncertainty",
    uncertainty: { samples, sampler: "monte-carlo", seed: opts.seed ?? 11, defaultSigma: { value: 2, unit: "kJ/mol" } },
    observables: { reactant: "S0", products: ["S5"], times: [{ value: 10, unit: "s" }, { value: 100, unit: "s" }] },
  });
}
