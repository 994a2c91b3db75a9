import { describe, expect, it } from "vitest";
import { R_GAS } from "../../solver/constants.ts";
import { compileMechanism } from "../../solver/model.ts";
import { stiffNetwork } from "../../bench/stiff-network.ts";
import { simulate } from "../../solver/simulate.ts";

describe("benchmark network generator (bench/stiff-network.ts)", () => {
  const net = stiffNetwork(300, 77);
  const idx = (id: string) => Number(id.slice(1));

  it("every step conserves Σ m_i·c_i (mass balance)", () => {
    for (const r of net.mechanism.reactions) {
      let d = 0;
      for (const t of r.products) d += t.coef * net.mass[idx(t.species)];
      for (const t of r.reactants) d -= t.coef * net.mass[idx(t.species)];
      expect(d).toBe(0);
    }
    const m = compileMechanism(net.mechanism);
    expect(m.ok).toBe(true);
  });

  it("reverse constants follow detailed balance from species free energies: kr = kf·exp(ΔG°/RT) (Wegscheider 1902 holds around every cycle)", () => {
    const RT = R_GAS * 298.15;
    net.mechanism.reactions.forEach((r, k) => {
      let dG = 0;
      for (const t of r.products) dG += t.coef * net.G[idx(t.species)];
      for (const t of r.reactants) dG -= t.coef * net.G[idx(t.species)];
      const expected = net.kf[k] * Math.exp(dG / RT);
      expect(Math.abs(net.kr[k] - expected) / expected).toBeLessThan(1e-9);
    });
  });

  it("rate constants stay within 1e-6 … 1e9 and connectivity is mostly local", () => {
    let local = 0;
    net.mechanism.reactions.forEach((r, k) => {
      for (const v of [net.kf[k], net.kr[k]]) {
        expect(v).toBeGreaterThanOrEqual(1e-6 * (1 - 1e-12));
        expect(v).toBeLessThanOrEqual(1e9 * (1 + 1e-12));
      }
      const ids = [...r.reactants, ...r.products].map((t) => idx(t.species));
      if (Math.max(...ids) - Math.min(...ids) <= 12) local++;
    });
    expect(local / net.mechanism.reactions.length).toBeGreaterThan(0.95);
  });
});

describe("the automatic integrator choice on a 50-species network is no less accurate than RODAS4", () => {
  it("max relative error at t_end (against RODAS4 at rtol 1e-11, a self-convergence reference) ≤ RODAS4's at the same rtol", () => {
    const net = stiffNetwork(50, 1284);
    const m = compileMechanism(net.mechanism);
    if (!m.ok) throw new Error(m.error.message);
    const rc = Array.from({ length: m.value.nReactions }, (_, r) => ({ kf: () => net.kf[r], kr: () => net.kr[r] }));
    const run = (rtol: number, atol: number, stiffMethod: "auto" | "rosenbrock") => {
      const r = simulate(m.value, { rateConstants: rc, temperature: { kind: "isothermal", T: 298.15 }, initial: net.c0, tEnd: net.tEnd, grid: { kind: "times", times: [net.tEnd] }, rtol, atol, conservation: false, maxSteps: 1e6, stiffMethod });
      if (!r.ok) throw new Error(r.error.message);
      return r.value;
    };
    const ref = run(1e-11, 1e-20, "rosenbrock").conc.map((c) => c[c.length - 1]);
    const err = (y: number[]) => Math.max(...y.map((v, i) => (Math.abs(ref[i]) > 1e-12 ? Math.abs(v - ref[i]) / Math.abs(ref[i]) : 0)));
    for (const rtol of [1e-4, 1e-6]) {
      const auto = run(rtol, 1e-12, "auto");
      expect(auto.method).toBe("bdf");
      const rodas = run(rtol, 1e-12, "rosenbrock");
      expect(err(auto.conc.map((c) => c[c.length - 1]))).toBeLessThanOrEqual(err(rodas.conc.map((c) => c[c.length - 1])));
    }
  });
});
