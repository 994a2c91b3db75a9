import { describe, expect, it } from "vitest";
import { compileMechanism } from "../../solver/model.ts";
import { simulate, type SimulateOptions } from "../../solver/simulate.ts";
import { integrateStiff } from "../../solver/rosenbrock.ts";
import { integrateNonStiff } from "../../solver/nonstiff.ts";

const m = (() => {
  const r = compileMechanism({
    species: [{ id: "A" }, { id: "B" }, { id: "C" }],
    reactions: [
      { id: "1", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false },
      { id: "2", reactants: [{ species: "B", coef: 2 }], products: [{ species: "C", coef: 1 }], reversible: true },
    ],
  });
  if (!r.ok) throw new Error(r.error.message);
  return r.value;
})();
const base: SimulateOptions = {
  rateConstants: [{ kf: () => 0.04 }, { kf: () => 3e7, kr: () => 1 }],
  temperature: { kind: "isothermal", T: 300 },
  initial: { A: 1 },
  tEnd: 1e5,
};

describe("simulate: bad input and budgets give typed errors", () => {
  const expectErr = (o: Partial<SimulateOptions>, code: string) => {
    const r = simulate(m, { ...base, ...o });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.code).toBe(code);
      expect(r.error.message).toMatch(/^[A-Z"].*\.$/);
    }
    return r;
  };
  it("rejects a zero or non-finite time span", () => {
    expectErr({ tEnd: 0 }, "TIME_SPAN");
    expectErr({ tEnd: NaN }, "NON_FINITE");
  });
  it("rejects negative and non-finite initial concentrations and unknown species", () => {
    expectErr({ initial: { A: -1 } }, "NEGATIVE_CONCENTRATION");
    expectErr({ initial: { A: Infinity } }, "NON_FINITE");
    expectErr({ initial: { Q: 1 } }, "UNKNOWN_SPECIES");
    expectErr({ initial: [1, 0] }, "BAD_INITIAL");
  });
  it("rejects bad rate constants and temperature programs", () => {
    expectErr({ rateConstants: [{ kf: () => NaN }, { kf: () => 1, kr: () => 1 }] }, "BAD_RATE_CONSTANT");
    expectErr({ rateConstants: [{ kf: () => -1 }, { kf: () => 1, kr: () => 1 }] }, "BAD_RATE_CONSTANT");
    expectErr({ rateConstants: [{ kf: () => 1 }, { kf: () => 1 }] }, "MISSING_REVERSE");
    expectErr({ temperature: { kind: "isothermal", T: -5 } }, "BAD_TEMPERATURE_PROGRAM");
    expectErr({ temperature: { kind: "holds", holds: [[1, 300]] } }, "BAD_TEMPERATURE_PROGRAM");
    expectErr({ atol: 0 }, "BAD_TOLERANCE");
    expectErr({ grid: { kind: "linear", points: 1 } }, "BAD_OUTPUT_GRID");
  });
  it("a step budget of 10 returns a typed budget failure with the partial result", () => {
    const r = expectErr({ maxSteps: 10 }, "BUDGET_STEPS");
    if (!r.ok) {
      expect((r.error as { reason?: string }).reason).toBe("budget-steps");
      expect((r.error as { partial?: { stats: { steps: number } } }).partial?.stats.steps).toBe(10);
    }
  });
  it("an already-aborted signal returns 'cancelled' from both integrators", () => {
    const ac = new AbortController();
    ac.abort();
    const r = expectErr({ signal: ac.signal }, "CANCELLED");
    if (!r.ok) expect((r.error as { reason?: string }).reason).toBe("cancelled");
    const r2 = expectErr({ signal: ac.signal, method: "nonstiff", tEnd: 1 }, "CANCELLED");
    expect(r2.ok).toBe(false);
  });
  it("a wall-time budget stops the run with a fake clock (no timing in tests)", () => {
    let clock = 0;
    const r = expectErr({ maxWallMs: 50, now: () => (clock += 10) }, "BUDGET_TIME");
    if (!r.ok) expect((r.error as { reason?: string }).reason).toBe("budget-time");
  });
  it("never returns concentrations below −atol", () => {
    const r = simulate(m, { ...base, rtol: 1e-3, atol: 1e-10, grid: { kind: "log", points: 100 } });
    expect(r.ok).toBe(true);
    if (r.ok) for (const c of r.value.conc) for (const v of c) expect(v).toBeGreaterThanOrEqual(-1e-10);
  });
  it("generic integrators reject bad problems", () => {
    const p = { n: 1, rhs: (_t: number, y: Float64Array, d: Float64Array) => void (d[0] = -y[0]) };
    const a = integrateStiff(p, 0, [1], 0);
    expect(!a.ok && a.error.code).toBe("TIME_SPAN");
    const b = integrateStiff(p, 0, [NaN], 1);
    expect(!b.ok && b.error.code).toBe("NON_FINITE");
    const c = integrateNonStiff(p, 0, [1, 2], 1);
    expect(!c.ok && c.error.code).toBe("BAD_INPUT");
    const d = integrateStiff({ n: 1, rhs: (_t, _y, dy) => void (dy[0] = NaN) }, 0, [1], 1);
    expect(!d.ok && d.error.reason).toBe("non-finite");
  });
});
