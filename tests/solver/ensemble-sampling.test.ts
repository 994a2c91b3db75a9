/**
 * Sampling and statistics of ensembles (solver/ensemble.ts), checked against definitions and
 * exact values:
 * - Latin hypercube: McKay, Beckman & Conover, Technometrics 21 (1979) 239 — each of the n
 *   equal-probability strata of every dimension holds exactly one sample.
 * - Standard normal quantiles z_0.95 = 1.6448536269514722, z_0.975 = 1.959963984540054,
 *   z_0.995 = 2.5758293035489004 (standard normal tables; values from memory, cross-checked here
 *   against Φ from mathjs' erf).
 * - Sample mean and sd of N(0,1) draws converge as 1/√n (central limit theorem).
 * - Correlated errors: shift_i = σ_i(√ρ z_g + √(1−ρ) z_i) gives corr(shift_1, shift_2) = ρ.
 * - Spearman's rank correlation cross-checked with simple-statistics' sampleRankCorrelation.
 */
import { describe, expect, it } from "vitest";
import { sampleRankCorrelation } from "simple-statistics";
import {
  distribution,
  histogram,
  latinHypercubeColumn,
  normalCdf,
  normalQuantile,
  planMembers,
  spearman,
  standardNormalSample,
  summarizeOutcomes,
  type EnsembleDesign,
} from "../../solver/ensemble";
import { seededUniform } from "../../solver/random";

describe("random numbers", () => {
  it("the seeded generator repeats itself for a seed and differs between seeds", () => {
    const a = seededUniform(42), b = seededUniform(42), c = seededUniform(43);
    const xs = Array.from({ length: 5 }, () => a());
    expect(Array.from({ length: 5 }, () => b())).toEqual(xs);
    expect(Array.from({ length: 5 }, () => c())).not.toEqual(xs);
    for (const x of xs) expect(x >= 0 && x < 1).toBe(true);
  });

  it("normal quantiles match the tabulated values and invert Φ", () => {
    expect(normalQuantile(0.95)).toBeCloseTo(1.6448536269514722, 10);
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 10);
    expect(normalQuantile(0.995)).toBeCloseTo(2.5758293035489004, 10);
    expect(normalQuantile(0.5)).toBeCloseTo(0, 12);
    for (const p of [1e-6, 0.01, 0.3, 0.7, 0.999999]) expect(normalCdf(normalQuantile(p))).toBeCloseTo(p, 12);
  });

  it("Latin-hypercube columns hold exactly one value in each stratum (McKay et al. 1979)", () => {
    const rand = seededUniform(7);
    for (const n of [1, 2, 10, 137]) {
      const u = latinHypercubeColumn(n, rand);
      const strata = Array.from(u, (x) => Math.floor(x * n)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: n }, (_, i) => i));
    }
    // and the normal sample built on it: one draw between consecutive quantiles, per column
    const n = 50;
    const z = standardNormalSample(n, 3, "latin-hypercube", seededUniform(1));
    for (let j = 0; j < 3; j++) {
      const strata = z.map((row) => Math.floor(normalCdf(row[j]) * n)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: n }, (_, i) => i));
    }
  });

  it("sample mean and sd of normal draws converge (within 4 standard errors)", () => {
    for (const sampler of ["monte-carlo", "latin-hypercube"] as const) {
      const n = 20000;
      const z = standardNormalSample(n, 1, sampler, seededUniform(2024)).map((r) => r[0]);
      const d = distribution(z)!;
      expect(Math.abs(d.mean)).toBeLessThan(4 / Math.sqrt(n));
      expect(Math.abs(d.sd - 1)).toBeLessThan(4 / Math.sqrt(2 * n));
      expect(d.p50).toBeCloseTo(0, 1);
      expect(d.p95).toBeCloseTo(1.6449, 1);
    }
  });
});

describe("members", () => {
  const twoSteps = (rho: number, sampler: "monte-carlo" | "latin-hypercube" = "monte-carlo"): EnsembleDesign => ({
    mode: "uncertainty",
    baseT: 300,
    uncertainty: {
      samples: 2000,
      sampler,
      seed: 11,
      steps: [
        { step: "s1", sigma: 4000, group: "DFT-x" },
        { step: "s2", sigma: 4000, group: "DFT-x" },
      ],
      rho: { "DFT-x": rho },
    },
  });

  it("steps of one method with ρ = 1 move together, with ρ = 0 independently", () => {
    const shifts = (rho: number) => {
      const m = planMembers(twoSteps(rho));
      if (!m.ok) throw new Error(m.error.message);
      return [m.value.map((x) => x.shifts.s1), m.value.map((x) => x.shifts.s2)];
    };
    const [a1, b1] = shifts(1);
    expect(spearman(a1, b1)).toBeCloseTo(1, 10);
    const [a0, b0] = shifts(0);
    expect(Math.abs(spearman(a0, b0))).toBeLessThan(4 / Math.sqrt(2000));
    // ρ = 0.5: Pearson correlation ≈ 0.5, each shift still has sd σ
    const [ah, bh] = shifts(0.5);
    const da = distribution(ah)!, db = distribution(bh)!;
    expect(Math.abs(da.sd - 4000) / 4000).toBeLessThan(0.06);
    const cov = ah.reduce((s, x, i) => s + (x - da.mean) * (bh[i] - db.mean), 0) / (ah.length - 1);
    expect(cov / (da.sd * db.sd)).toBeCloseTo(0.5, 1);
  });

  it("the same seed gives the same members; a step with σ = 0 is not shifted", () => {
    const d = twoSteps(0.3, "latin-hypercube");
    d.uncertainty!.steps.push({ step: "s3", sigma: 0, group: null });
    const a = planMembers(d), b = planMembers(d);
    expect(a).toEqual(b);
    if (!a.ok) throw new Error();
    expect(a.value[0].shifts.s3).toBeUndefined();
  });

  it("a two-parameter sweep is the grid of both axes, ends included", () => {
    const m = planMembers({
      mode: "sweep",
      baseT: 300,
      sweep: [
        { parameter: { kind: "temperature" }, from: 300, to: 340, points: 3, grid: "linear" },
        { parameter: { kind: "initial", species: "A" }, from: 0.01, to: 1, points: 3, grid: "log" },
      ],
    });
    if (!m.ok) throw new Error(m.error.message);
    expect(m.value.map((x) => x.T)).toEqual([300, 300, 300, 320, 320, 320, 340, 340, 340]);
    expect(m.value.slice(0, 3).map((x) => x.initial.A)).toEqual([0.01, expect.closeTo(0.1, 12), 1]);
  });

  it("refuses what cannot be planned, with the field", () => {
    const tooMany = planMembers({ mode: "sweep", baseT: 300, sweep: [{ parameter: { kind: "temperature" }, from: 300, to: 400, points: 100, grid: "linear" }, { parameter: { kind: "barrier", step: "s1" }, from: 0, to: 1, points: 51, grid: "linear" }] });
    expect(tooMany.ok).toBe(false);
    const logZero = planMembers({ mode: "sweep", baseT: 300, sweep: [{ parameter: { kind: "initial", species: "A" }, from: 0, to: 1, points: 3, grid: "log" }] });
    expect(!logZero.ok && logZero.error.path).toBe("sweep[0].from");
    const program = planMembers({ mode: "sweep", baseT: null, sweep: [{ parameter: { kind: "temperature" }, from: 300, to: 310, points: 3, grid: "linear" }] });
    expect(program.ok).toBe(false);
    const nothing = planMembers({ mode: "uncertainty", baseT: 300, uncertainty: { samples: 10, sampler: "monte-carlo", seed: 1, steps: [{ step: "s1", sigma: 0, group: null }], rho: {} } });
    expect(!nothing.ok && nothing.error.code).toBe("BAD_UNCERTAINTY");
  });
});

describe("statistics", () => {
  it("Spearman's rank correlation agrees with simple-statistics and handles ties", () => {
    const rand = seededUniform(5);
    const x = Array.from({ length: 200 }, () => rand());
    const y = x.map((v) => v * v + 0.3 * rand());
    expect(spearman(x, y)).toBeCloseTo(sampleRankCorrelation(x, y), 12);
    expect(spearman([1, 2, 2, 3], [1, 2, 2, 3])).toBeCloseTo(1, 12);
    expect(spearman([1, 1, 1], [1, 2, 3])).toBe(0);
  });

  it("histograms count every value once", () => {
    const h = histogram([0, 0.1, 0.5, 0.99, 1], 4);
    expect(h.map((b) => b.count)).toEqual([2, 0, 1, 2]);
    expect(histogram([2, 2])).toEqual([{ from: 2, to: 2, count: 2 }]);
  });

  it("sensitivity ranks the parameter that drives the spread first", () => {
    const rand = seededUniform(9);
    const results = Array.from({ length: 300 }, (_, index) => {
      const s1 = rand() - 0.5, s2 = rand() - 0.5;
      return { index, shifts: { s1, s2 }, values: { "x@0": -5 * s1 + 0.5 * s2 } };
    });
    const s = summarizeOutcomes({ times: [1], chosen: [0], observables: ["x"], total: 301, results, failed: 1, sensitivity: true });
    expect(s.sensitivity[0].ranking[0].parameter).toBe("s1");
    expect(s.sensitivity[0].ranking[0].rankCorrelation).toBeLessThan(-0.9);
    expect(s.members).toEqual({ total: 301, ok: 300, failed: 1 });
    expect(s.observables[0].series[0]!.n).toBe(300);
  });
});
