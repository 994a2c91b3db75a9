/**
 * Ensembles end to end without the database: request → members (planEnsemble) → simulations
 * (runEnsembleChunk) → summary (summarizeEnsemble), checked against analytic results:
 * - A → B, first order, with ΔG‡ ~ N(μ, σ²): k = (k_BT/h)·exp(−ΔG‡/RT) is lognormal and the
 *   conversion X(t) = 1 − exp(−k t) rises with k, so its p-quantile is 1 − exp(−k t) at
 *   ΔG‡ = μ − z_p σ (Eyring equation, common practice; quantiles of a monotone function). The mean
 *   is E[X] = ∫ (1 − exp(−k(μ + σz) t)) φ(z) dz, integrated here by the trapezoidal rule.
 * - A sweep over T reproduces the Eyring k(T) = (k_BT/h)·exp(ΔS‡/R)·exp(−ΔH‡/RT) of each member.
 * - A barrier shift raises the transition state: k_fwd and k_rev both scale by exp(−δ/RT), so
 *   K_eq (and the equilibrium A ⇌ B) is unchanged (detailed balance, common practice).
 * Constants: CODATA 2018 (solver/constants.ts).
 */
import { describe, expect, it } from "vitest";
import { KB_OVER_H, R_GAS } from "../../solver/index";
import { normalQuantile } from "../../solver/ensemble";
import { planEnsemble, resolveEnsemble, summarizeEnsemble } from "../../app/ensembles/ensemble-plan";
import { runEnsembleChunk, type MemberOutcome } from "../../app/ensembles/ensemble-task";
import { documentOf, firstOrderStep, specOf } from "./fixtures";

function runAll(spec: ReturnType<typeof specOf>, doc: ReturnType<typeof documentOf>) {
  const members = planEnsemble(spec, doc);
  if (!members.ok) throw new Error(members.error.message);
  const outcomes = runEnsembleChunk({ snapshot: doc, spec, members: members.value }, {});
  return { members: members.value, outcomes };
}

describe("uncertainty of one barrier: the lognormal rate constant", () => {
  const T = 298.15, mu = 80_000, sigma = 2_000, t = 10;
  const doc = documentOf([firstOrderStep("s1", "A", "B", 80, { uncertainty: { value: 2, unit: "kJ/mol" }, label: "Ring closure" })]);
  const spec = specOf({ uncertainty: { samples: 400, sampler: "latin-hypercube", seed: 3, defaultSigma: { value: 9, unit: "kJ/mol" } } });
  const k = (dG: number) => KB_OVER_H * T * Math.exp(-dG / (R_GAS * T));

  it("takes σ from the step's stored uncertainty, and the summary matches the analytic distribution", () => {
    const { members, outcomes } = runAll(spec, doc);
    expect(outcomes.every((o) => o.ok)).toBe(true);
    const sd = Math.sqrt(members.reduce((s, m) => s + m.shifts.s1 ** 2, 0) / members.length);
    expect(sd / sigma).toBeCloseTo(1, 1); // the stored 2 kJ/mol, not the default 9
    const resolved = resolveEnsemble(spec, doc);
    if (!resolved.ok) throw new Error();
    const ti = resolved.value.chosen[0];
    expect(resolved.value.times[ti]).toBe(t);
    const s = summarizeEnsemble(spec, doc, outcomes.map((o) => ({ index: o.index, shifts: members[o.index].shifts, values: o.values! })), members.length);
    if (!s.ok) throw new Error(s.error.message);
    const conv = s.value.observables.find((o) => o.key === "conversion:A")!;
    const d = conv.series[ti]!;
    // each percentile, taken back to the barrier it implies, sits at μ − z_p σ
    for (const [p, xp] of [[0.05, d.p5], [0.25, d.p25], [0.5, d.p50], [0.75, d.p75], [0.95, d.p95]] as const) {
      const kEmp = -Math.log(1 - xp) / t;
      const dGEmp = -R_GAS * T * Math.log(kEmp / (KB_OVER_H * T));
      expect(Math.abs((mu - dGEmp) / sigma - normalQuantile(p))).toBeLessThan(0.05);
      expect(xp).toBeCloseTo(1 - Math.exp(-k(mu - normalQuantile(p) * sigma) * t), 2);
    }
    let mean = 0;
    const h = 16 / 4000;
    for (let i = 0; i <= 4000; i++) {
      const z = -8 + i * h;
      const w = (i === 0 || i === 4000 ? 0.5 : 1) * h * Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
      mean += w * (1 - Math.exp(-k(mu + sigma * z) * t));
    }
    expect(Math.abs(d.mean - mean)).toBeLessThan(0.005);
    // yield of B equals conversion of A here
    expect(s.value.observables.find((o) => o.key === "yield:B")!.series[ti]!.p50).toBeCloseTo(d.p50, 6);
    // the one uncertain barrier drives all of the spread, against conversion
    const sens = s.value.sensitivity.find((x) => x.observable === "conversion:A")!;
    expect(sens.ranking[0].parameter).toBe("s1");
    expect(sens.ranking[0].rankCorrelation).toBeCloseTo(-1, 6);
    expect(conv.histograms[0].bins.reduce((n, b) => n + b.count, 0)).toBe(400);
  });

  it("stops when asked and reports each member as it finishes", () => {
    const members = planEnsemble(spec, doc);
    if (!members.ok) throw new Error();
    const seen: MemberOutcome[] = [];
    const out = runEnsembleChunk({ snapshot: doc, spec, members: members.value.slice(0, 10) }, { shouldStop: () => seen.length >= 3, onMemberDone: (o) => seen.push(o) });
    expect(out.map((o) => o.index)).toEqual([0, 1, 2]);
    expect(seen).toEqual(out);
  });

  it("a broken snapshot fails each member with the reason, never throws", () => {
    const out = runEnsembleChunk({ snapshot: { nonsense: true }, spec, members: [{ index: 0, T: 300, initial: {}, shifts: {} }] }, {});
    expect(out[0].ok).toBe(false);
    expect(out[0].error).toMatch(/snapshot/);
  });
});

describe("sweeps", () => {
  it("a sweep over T reproduces the Eyring k(T) of every member", () => {
    const dH = 75_000, dS = -20;
    const doc = documentOf([
      { id: "s1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: { form: "dHdS", dH: 75, dS: -20, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M" } },
    ]);
    const t = 0.01;
    const spec = specOf({
      mode: "sweep",
      conditions: { temperature: { value: 300, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 0.02, unit: "s" } },
      solver: { rtol: 1e-10, atol: 1e-16 },
      sweep: [{ parameter: "temperature", from: { value: 280, unit: "K" }, to: { value: 360, unit: "K" }, points: 5, grid: "linear" }],
      observables: { reactant: "A", products: [], times: [{ value: t, unit: "s" }] },
    });
    const { members, outcomes } = runAll(spec, doc);
    const r = resolveEnsemble(spec, doc);
    if (!r.ok) throw new Error();
    const ti = r.value.chosen[0];
    expect(members.map((m) => m.T)).toEqual([280, 300, 320, 340, 360]);
    outcomes.forEach((o, i) => {
      const T = members[i].T!;
      const kEyring = KB_OVER_H * T * Math.exp(dS / R_GAS) * Math.exp(-dH / (R_GAS * T));
      const kSim = -Math.log(1 - o.values![`conversion:A@${ti}`]) / t;
      expect(Math.abs(kSim / kEyring - 1)).toBeLessThan(1e-4);
    });
  });

  it("a barrier shift scales k by exp(−δ/RT) and leaves the equilibrium of a reversible step alone", () => {
    const T = 298.15;
    const doc = documentOf([
      firstOrderStep("s1", "A", "B", 75, { reversible: true, reactionThermo: { form: "dG", dG: -3, unit: "kJ/mol", T, standardState: "1M" } }),
    ]);
    const spec = specOf({
      mode: "sweep",
      conditions: { temperature: { value: T, unit: "K" }, initial: { A: { value: 1, unit: "mol/L" } }, endTime: { value: 1e6, unit: "s" } },
      sweep: [{ parameter: "barrier", step: "s1", from: { value: -2, unit: "kJ/mol" }, to: { value: 2, unit: "kJ/mol" }, points: 3, grid: "linear" }],
      observables: { reactant: "A", products: ["B"], times: [{ value: 1e-5, unit: "s" }, { value: 1e6, unit: "s" }] },
    });
    const { outcomes } = runAll(spec, doc);
    const r = resolveEnsemble(spec, doc);
    if (!r.ok) throw new Error();
    const [early, late] = r.value.chosen;
    const K = Math.exp(3000 / (R_GAS * T));
    const kEarly = (o: (typeof outcomes)[number]) => -Math.log(1 - o.values![`conversion:A@${early}`]);
    const early0 = kEarly(outcomes[1]);
    outcomes.forEach((o, i) => {
      const delta = [-2000, 0, 2000][i];
      // initial rate ∝ k_fwd: conversion at a short time scales by exp(−δ/RT)
      expect(kEarly(o) / early0).toBeCloseTo(Math.exp(-delta / (R_GAS * T)), 3);
      // equilibrium: B/A = K_eq whatever the shift
      expect(o.values![`yield:B@${late}`] / (1 - o.values![`yield:B@${late}`])).toBeCloseTo(K, 4);
    });
  });

  it("refuses species, steps and times the mechanism does not have, naming the field", () => {
    const doc = documentOf([firstOrderStep("s1", "A", "B", 80)]);
    const bad = (s: Parameters<typeof specOf>[0]) => {
      const r = planEnsemble(specOf(s), doc);
      return r.ok ? null : r.error.path;
    };
    expect(bad({ observables: { reactant: "Z", times: [{ value: 1, unit: "s" }] }, uncertainty: { samples: 5, sampler: "monte-carlo", seed: 1, defaultSigma: { value: 1, unit: "kJ/mol" } } })).toBe("observables.reactant");
    expect(bad({ observables: { reactant: "A", times: [{ value: 1, unit: "h" }] }, uncertainty: { samples: 5, sampler: "monte-carlo", seed: 1, defaultSigma: { value: 1, unit: "kJ/mol" } } })).toBe("observables.times[0].value");
    expect(bad({ mode: "sweep", sweep: [{ parameter: "barrier", step: "nope", from: { value: 0, unit: "kJ/mol" }, to: { value: 1, unit: "kJ/mol" }, points: 2, grid: "linear" }] })).toBe("sweep[0].step");
  });
});
