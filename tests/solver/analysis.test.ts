/**
 * Analysis of runs checked against analytic solutions:
 *  - half-life and time to conversion of first- and second-order decay (textbook integrated
 *    rate laws, e.g. Atkins' Physical Chemistry, "integrated rate laws" — common practice);
 *  - yields and selectivity of parallel first-order channels (branching ratio k_i/Σk, textbook);
 *  - barrier sensitivity of A(t) = A₀·e^(−kt) with k ∝ exp(−ΔG‡/RT) (Eyring, differentiated by hand);
 *  - degree of rate control for consecutive steps A → B → P against the derivative of the
 *    Bateman solution, and for a catalytic cycle at steady state against Campbell's
 *    definition and sum rule (C. T. Campbell, J. Catal. 204, 520 (2001); Stegelmann,
 *    Andreasen & Campbell, J. Am. Chem. Soc. 131, 8077 (2009)).
 */
import { describe, expect, it } from "vitest";
import { R_GAS } from "../../solver/constants.ts";
import { compileMechanism, type MechanismInput } from "../../solver/model.ts";
import { simulate, type SimulateOptions } from "../../solver/simulate.ts";
import { barrierSensitivities, degreeOfRateControl, halfLife, massBalanceReport, timesToConversion, yieldsAndSelectivity } from "../../solver/analysis.ts";
import type { Result } from "../../solver/types.ts";
import { k as kc, rx, sp } from "./mechanism-helpers.ts";

function get<T>(r: Result<T>): T {
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message}`);
  return r.value;
}
const model = (m: MechanismInput) => get(compileMechanism(m));
const T = 298.15;
const opts = (o: Partial<SimulateOptions> & Pick<SimulateOptions, "rateConstants" | "initial" | "tEnd">): SimulateOptions => ({
  temperature: { kind: "isothermal", T },
  rtol: 1e-9,
  atol: 1e-15,
  ...o,
});

describe("times to conversion", () => {
  const first = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
  it("first order: t½ = ln 2/k and t(99 %) = ln 100/k", () => {
    const k = 0.37;
    const o = opts({ rateConstants: [{ kf: kc(k) }], initial: { A: 0.5 }, tEnd: 30 });
    expect(get(halfLife(first, o, "A"))! / (Math.LN2 / k)).toBeCloseTo(1, 7);
    const [t50, t99] = get(timesToConversion(first, o, "A", [0.5, 0.99]));
    expect(t50! / (Math.LN2 / k)).toBeCloseTo(1, 7);
    expect(t99! / (Math.log(100) / k)).toBeCloseTo(1, 7);
    // not reached by tEnd → null
    expect(get(timesToConversion(first, { ...o, tEnd: 1 }, "A", [0.99]))).toEqual([null]);
  });

  it("second order 2A → P (d[A]/dt = −2k[A]²): t½ = 1/(2k[A]₀)", () => {
    const m = model({ species: sp("A", "P"), reactions: [rx("d", [["A", 2]], [["P", 1]])] });
    const k = 4, A0 = 0.1;
    const o = opts({ rateConstants: [{ kf: kc(k) }], initial: { A: A0 }, tEnd: 10 });
    expect(get(halfLife(m, o, "A"))! / (1 / (2 * k * A0))).toBeCloseTo(1, 7);
  });

  it("with the non-stiff method the event is interpolated on the output grid", () => {
    const k = 0.37;
    const r = get(simulate(first, opts({ rateConstants: [{ kf: kc(k) }], initial: { A: 1 }, tEnd: 5, method: "nonstiff", grid: { kind: "linear", points: 2001 }, conversionEvents: [{ species: "A", conversion: 0.5 }] })));
    expect(r.events[0].located).toBe("output-grid");
    expect(Math.abs(r.events[0].time! - Math.LN2 / k)).toBeLessThan(1e-4);
  });

  it("bad event requests are typed errors", () => {
    const o = opts({ rateConstants: [{ kf: kc(1) }], initial: { A: 1 }, tEnd: 1 });
    const a = timesToConversion(first, o, "A", [1.2]);
    expect(!a.ok && a.error.code).toBe("BAD_EVENT");
    const b = timesToConversion(first, o, "Q", [0.5]);
    expect(!b.ok && b.error.code).toBe("UNKNOWN_SPECIES");
    const c = timesToConversion(first, o, "B", [0.5]);
    expect(!c.ok && c.error.code).toBe("BAD_EVENT");
  });
});

describe("yields and selectivity", () => {
  it("parallel first-order channels A → B, A → C: yield and selectivity = k_i/(k₁+k₂)", () => {
    const m = model({ species: sp("A", "B", "C"), reactions: [rx("1", [["A", 1]], [["B", 1]]), rx("2", [["A", 1]], [["C", 1]])] });
    const k1 = 3, k2 = 1;
    const r = get(simulate(m, opts({ rateConstants: [{ kf: kc(k1) }, { kf: kc(k2) }], initial: { A: 2 }, tEnd: 1, grid: { kind: "linear", points: 11 } })));
    const y = get(yieldsAndSelectivity(r, { reactant: "A", products: ["B", "C"] }));
    const X = 1 - Math.exp(-(k1 + k2) * 1);
    expect(y.conversion).toBeCloseTo(X, 8);
    expect(y.yields.B).toBeCloseTo((X * k1) / (k1 + k2), 8);
    expect(y.selectivity.B).toBeCloseTo(0.75, 8);
    expect(y.selectivity.C).toBeCloseTo(0.25, 8);
    expect(Math.abs(y.unaccounted)).toBeLessThan(1e-8);
    const bad = yieldsAndSelectivity(r, { reactant: "A", products: ["Z"] });
    expect(!bad.ok && bad.error.code).toBe("UNKNOWN_SPECIES");
  });
});

describe("barrier sensitivity and degree of rate control", () => {
  it("A → B: ∂[A](t)/∂ΔG‡ = [A]·k·t/(RT) and ∂ln[A]/∂ln k = −kt", () => {
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
    const k = 0.2, t = 3, A0 = 1;
    const s = get(barrierSensitivities(m, opts({ rateConstants: [{ kf: kc(k) }], initial: { A: A0 }, tEnd: 5 }), [{ kind: "concentration", species: "A", time: t }]));
    const A = A0 * Math.exp(-k * t);
    expect(s[0].value).toBeCloseTo(A, 8);
    // per kJ/mol: ×1000
    expect(s[0].perKJ["1"] / ((A * k * t * 1000) / (R_GAS * T))).toBeCloseTo(1, 5);
    expect(s[0].normalized["1"]).toBeCloseTo(-k * t, 5);
  });

  it("A → B → P: X_RC of the P formation rate matches the derivative of the Bateman solution", () => {
    const m = model({ species: sp("A", "B", "P"), reactions: [rx("1", [["A", 1]], [["B", 1]]), rx("2", [["B", 1]], [["P", 1]])] });
    const k1 = 0.5, k2 = 2, t = 1.5;
    const drc = get(degreeOfRateControl(m, opts({ rateConstants: [{ kf: kc(k1) }, { kf: kc(k2) }], initial: { A: 1 }, tEnd: 3 }), "P", t));
    const D = Math.exp(-k1 * t) - Math.exp(-k2 * t);
    const x1 = 1 + k1 / (k2 - k1) - (k1 * t * Math.exp(-k1 * t)) / D;
    const x2 = 1 - k2 / (k2 - k1) + (k2 * t * Math.exp(-k2 * t)) / D;
    expect(drc.degree["1"]).toBeCloseTo(x1, 5);
    expect(drc.degree["2"]).toBeCloseTo(x2, 5);
    expect(drc.rate).toBeCloseTo(((k2 * k1) / (k2 - k1)) * D, 8);
  });

  it("catalytic cycle at steady state: X_RC,i = share of each step's resistance, Σ X_RC = 1 (Campbell)", () => {
    // A + Cat → X (k1), X → P + Cat (k2), A in large excess: pseudo-first-order k1' = k1·[A].
    // Steady-state turnover r = k1'·k2·[Cat]tot/(k1' + k2) → X₁ = k2/(k1'+k2), X₂ = k1'/(k1'+k2).
    const m = model({
      species: sp("A", "Cat", "X", "P"),
      reactions: [rx("bind", [["A", 1], ["Cat", 1]], [["X", 1]]), rx("release", [["X", 1]], [["P", 1], ["Cat", 1]])],
    });
    const k1 = 10, k2 = 30;
    const drc = get(degreeOfRateControl(m, opts({ rateConstants: [{ kf: kc(k1) }, { kf: kc(k2) }], initial: { A: 1, Cat: 1e-6 }, tEnd: 0.5 }), "P", 0.5));
    expect(drc.degree.bind).toBeCloseTo(0.75, 3);
    expect(drc.degree.release).toBeCloseTo(0.25, 3);
    expect(drc.sum).toBeCloseTo(1, 3);
    expect(drc.rateDetermining).toBe("bind");
  });

  it("refuses unknown steps, bad shifts and undefined outcomes", () => {
    const m = model({ species: sp("A", "B"), reactions: [rx("1", [["A", 1]], [["B", 1]])] });
    const o = opts({ rateConstants: [{ kf: kc(1) }], initial: { A: 1 }, tEnd: 1 });
    const a = barrierSensitivities(m, o, [{ kind: "concentration", species: "A", time: 0.5 }], { steps: ["nope"] });
    expect(!a.ok && a.error.code).toBe("UNKNOWN_STEP");
    const b = barrierSensitivities(m, o, [{ kind: "concentration", species: "A", time: 0.5 }], { delta: -1 });
    expect(!b.ok && b.error.code).toBe("BAD_DELTA");
    const c = barrierSensitivities(m, o, [{ kind: "timeToConversion", species: "A", conversion: 0.999 }]);
    expect(!c.ok && c.error.code).toBe("OUTCOME_UNDEFINED");
    const d = barrierSensitivities(m, o, [{ kind: "concentration", species: "A", time: 5 }]);
    expect(!d.ok && d.error.code).toBe("BAD_OUTCOME");
  });
});

describe("mass balance", () => {
  it("element totals from formulas: a balanced step keeps them, an unbalanced one shows its drift", () => {
    // ethanol → acetaldehyde written without H2: H drops from 6 to 4 per molecule (2/6 at full conversion)
    const species = [
      { id: "EtOH", formula: "C2H6O" },
      { id: "MeCHO", formula: "C2H4O" },
      { id: "X" },
    ];
    const m = model({ species, reactions: [rx("ox", [["EtOH", 1]], [["MeCHO", 1]]), rx("x", [["X", 1]], [["X", 1]])] });
    const r = get(simulate(m, opts({ rateConstants: [{ kf: kc(5) }, { kf: kc(1) }], initial: { EtOH: 1 }, tEnd: 20 })));
    const rep = get(massBalanceReport(species, r));
    const el = Object.fromEntries(rep.elements.map((e) => [e.element, e]));
    expect(el.C.maxRelDrift).toBeLessThan(1e-9);
    expect(el.O.maxRelDrift).toBeLessThan(1e-9);
    expect(el.H.initial).toBeCloseTo(6, 12);
    expect(el.H.maxRelDrift).toBeCloseTo(2 / 6, 6);
    expect(rep.speciesWithoutFormula).toEqual(["X"]);
    expect(rep.maxDrift).toBeCloseTo(2 / 6, 6);
  });
});
