/**
 * Eyring and Arrhenius regression, and the statistics underneath.
 * Sources:
 *  - Γ(n) = (n−1)!, Γ(½) = √π (definition of the gamma function);
 *  - Student t quantiles t₀.₉₇₅(ν): 12.706 (ν=1), 4.303 (2), 2.571 (5), 2.228 (10), 2.086 (20),
 *    1.960 (∞) — standard statistical tables (e.g. NIST/SEMATECH e-Handbook of Statistical
 *    Methods, table 1.3.6.7.2; values from memory to the printed 3 decimals);
 *  - linearised Eyring and Arrhenius equations (textbook, common practice) and the relation
 *    Ea ≈ ΔH‡ + R·T over the measured range for a unimolecular step in solution (textbook);
 *  - ordinary least squares standard errors (textbook): checked here by recovering known
 *    ΔH‡/ΔS‡ from seeded synthetic noisy data within their standard errors, and by a Monte-Carlo
 *    check that the reported SE matches the scatter of the estimates.
 */
import { describe, expect, it } from "vitest";
import { KB_OVER_H, R_GAS } from "../../solver/constants.ts";
import { arrheniusRegression, eyringRegression, type RatePoint } from "../../solver/regression.ts";
import { fitLine, lnGamma, studentTQuantile } from "../../solver/statistics.ts";
import type { Result } from "../../solver/types.ts";

function get<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message}`);
  return r.value;
}

/** Seeded normal deviates (Box–Muller on a small LCG; common practice). */
function normals(seed: number): () => number {
  let s = seed >>> 0;
  const u = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) + 0.5) / 4294967296;
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

const eyringK = (T: number, dH: number, dS: number) => KB_OVER_H * T * Math.exp(dS / R_GAS - dH / (R_GAS * T));
const temps = [283.15, 293.15, 303.15, 313.15, 323.15, 333.15, 343.15, 353.15];

describe("statistics", () => {
  it("ln Γ at integers and ½", () => {
    expect(Math.exp(lnGamma(5))).toBeCloseTo(24, 10);
    expect(Math.exp(lnGamma(10))).toBeCloseTo(362880, 5);
    expect(Math.exp(lnGamma(0.5))).toBeCloseTo(Math.sqrt(Math.PI), 12);
  });
  it("Student t quantiles match the printed table", () => {
    const table: [number, number][] = [
      [1, 12.706],
      [2, 4.303],
      [5, 2.571],
      [10, 2.228],
      [20, 2.086],
      [1e7, 1.96],
    ];
    for (const [nu, t] of table) expect(studentTQuantile(0.975, nu)).toBeCloseTo(t, 3);
    expect(studentTQuantile(0.025, 5)).toBeCloseTo(-2.571, 3);
  });
  it("a straight line through exact points has zero residual and R² = 1", () => {
    const f = fitLine([1, 2, 3, 4], [3, 5, 7, 9]);
    expect(f.slope).toBeCloseTo(2, 12);
    expect(f.intercept).toBeCloseTo(1, 12);
    expect(f.r2).toBeCloseTo(1, 12);
    expect(f.slopeSE).toBeCloseTo(0, 10);
  });
});

describe("Eyring and Arrhenius regression", () => {
  const dH = 75e3, dS = -40;

  it("recovers ΔH‡ and ΔS‡ exactly from noise-free data, and ΔG‡ = ΔH‡ − TΔS‡", () => {
    const pts = temps.map((T) => ({ T, k: eyringK(T, dH, dS) }));
    const r = get(eyringRegression(pts));
    expect(r.dH.value).toBeCloseTo(dH, 4);
    expect(r.dS.value).toBeCloseTo(dS, 7);
    expect(r.dG.value).toBeCloseTo(dH - 298.15 * dS, 4);
    expect(r.r2).toBeCloseTo(1, 12);
  });

  it("Arrhenius Ea ≈ ΔH‡ + R·T̄ and ln A ≈ ln(e·k_B·T̄/h) + ΔS‡/R for a unimolecular step (textbook)", () => {
    const pts = temps.map((T) => ({ T, k: eyringK(T, dH, dS) }));
    const a = get(arrheniusRegression(pts));
    const Tm = temps.length / temps.reduce((s, T) => s + 1 / T, 0); // harmonic mean
    expect((a.Ea.value - (dH + R_GAS * Tm)) / 1000).toBeCloseTo(0, 1);
    expect(a.lnA.value).toBeCloseTo(1 + Math.log(KB_OVER_H * Tm) + dS / R_GAS, 2);
  });

  it("recovers known ΔH‡/ΔS‡ from seeded data with 3 % noise within their standard errors", () => {
    const z = normals(42);
    const pts = temps.map((T) => ({ T, k: eyringK(T, dH, dS) * Math.exp(0.03 * z()) }));
    const r = get(eyringRegression(pts));
    expect(Math.abs(r.dH.value - dH)).toBeLessThan(2 * r.dH.se);
    expect(Math.abs(r.dS.value - dS)).toBeLessThan(2 * r.dS.se);
    expect(Math.abs(r.dH.value - dH)).toBeLessThan(r.dH.ci);
    expect(r.dH.se).toBeGreaterThan(100); // J/mol: noise must show
    expect(r.dH.se).toBeLessThan(3000);
    expect(r.r2).toBeGreaterThan(0.99);
    expect(r.residuals.length).toBe(temps.length);
  });

  it("the reported SE matches the scatter of estimates over many noisy data sets (Monte Carlo)", () => {
    const z = normals(7);
    const est: number[] = [];
    const ses: number[] = [];
    let within = 0;
    const M = 400;
    for (let m = 0; m < M; m++) {
      const pts = temps.map((T) => ({ T, k: eyringK(T, dH, dS) * Math.exp(0.05 * z()) }));
      const r = get(eyringRegression(pts));
      est.push(r.dH.value);
      ses.push(r.dH.se);
      if (Math.abs(r.dH.value - dH) <= r.dH.ci) within++;
    }
    const mean = est.reduce((s, v) => s + v, 0) / M;
    const sd = Math.sqrt(est.reduce((s, v) => s + (v - mean) ** 2, 0) / (M - 1));
    const rms = Math.sqrt(ses.reduce((s, v) => s + v * v, 0) / M);
    expect(Math.abs(mean - dH)).toBeLessThan((3 * sd) / Math.sqrt(M));
    expect(sd / rms).toBeGreaterThan(0.85);
    expect(sd / rms).toBeLessThan(1.15);
    // 95 % intervals cover the true value about 95 % of the time
    expect(within / M).toBeGreaterThan(0.92);
    expect(within / M).toBeLessThan(0.98);
  });

  it("weights from σ_k: absolute uncertainties are honoured", () => {
    const z = normals(3);
    const pts: RatePoint[] = temps.map((T, i) => {
      const rel = i < 4 ? 0.01 : 0.2;
      const k = eyringK(T, dH, dS) * Math.exp(rel * z());
      return { T, k, sigmaK: rel * k };
    });
    const r = get(eyringRegression(pts));
    expect(Math.abs(r.dH.value - dH)).toBeLessThan(3 * r.dH.se);
  });

  it("bad tables are typed errors", () => {
    const e = (pts: RatePoint[]) => {
      const r = eyringRegression(pts);
      return r.ok ? "ok" : r.error.code;
    };
    expect(e([])).toBe("EMPTY_INPUT");
    expect(e([{ T: 300, k: 1 }, { T: 310, k: 2 }])).toBe("TOO_FEW_POINTS");
    expect(e([{ T: 300, k: 1 }, { T: 300, k: 2 }, { T: 300, k: 3 }])).toBe("TEMPERATURES_NOT_DISTINCT");
    expect(e([{ T: 300, k: 1 }, { T: 310, k: -2 }, { T: 320, k: 3 }])).toBe("RATE_CONSTANT");
    expect(e([{ T: 300, k: 1 }, { T: Number.NaN, k: 2 }, { T: 320, k: 3 }])).toBe("NON_FINITE");
    expect(e([{ T: 300, k: 1 }, { T: -5, k: 2 }, { T: 320, k: 3 }])).toBe("TEMPERATURE");
  });
});
