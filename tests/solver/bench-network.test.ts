import { describe, expect, it } from "vitest";
import { R_GAS } from "../../solver/constants.ts";
import { compileMechanism } from "../../solver/model.ts";
import { stiffNetwork } from "../../bench/stiff-network.ts";

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
