/**
 * The activation-parameter page's table handling: line-numbered errors, unit conversion and the
 * regressions. Synthetic k(T) from chosen ΔH‡ = 80 kJ/mol and ΔS‡ = −20 J/(mol K) via the Eyring
 * equation k = (k_B T/h)·exp(ΔS‡/R)·exp(−ΔH‡/RT) (CODATA 2018 constants) must give the same values
 * back; Ea = ΔH‡ + RT over a narrow range (the textbook relation for a unimolecular solution
 * step, e.g. Atkins, Physical Chemistry, "activated complex theory" — common practice).
 */
import { describe, expect, it } from "vitest";
import { analyseKinetics, DEFAULT_SETTINGS, parseKineticsText, plusMinus } from "../../app/components/workbench/activation-table";
import { action } from "../../app/routes/analysis";

const KB = 1.380649e-23, H = 6.62607015e-34, R = KB * 6.02214076e23; // CODATA 2018 exact

function eyringK(T: number, dH: number, dS: number) {
  return (KB * T / H) * Math.exp(dS / R) * Math.exp(-dH / (R * T));
}

function table(temps: number[], f: (T: number) => number, unitShift = 0) {
  return ["T, k", ...temps.map((T) => `${T - unitShift}, ${f(T).toExponential(8)}`)].join("\n");
}

describe("k(T) table parsing", () => {
  it("reads a header, comments and three separators; reports bad lines with their numbers", () => {
    const t = parseKineticsText("# note\nT\tk\n300\t1e-3\n310; 2e-3\n320 4e-3\n330, abc\n340, -1\n\n350");
    expect(t.header).toEqual(["T", "k"]);
    expect(t.rows.map((r) => r.line)).toEqual([3, 4, 5]);
    expect(t.errors.map((e) => e.line)).toEqual([6, 7, 9]);
    expect(t.errors[0].message).toMatch(/^Line 6: the rate constant is not a number \("abc"\)/);
    expect(t.errors[1].message).toMatch(/Line 7: the rate constant must be positive/);
    expect(t.errors[2].message).toMatch(/Line 9: expected a temperature and a rate constant/);
  });

  it("refuses a table with a bad row and names the line", () => {
    const out = analyseKinetics(parseKineticsText("300, 1e-3\n310, 2e-3\n320, x\n330, 5e-3"), DEFAULT_SETTINGS);
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.message).toMatch(/Line 3/);
  });

  it("refuses temperatures at or below absolute zero after the °C conversion", () => {
    const out = analyseKinetics(parseKineticsText("-300, 1e-3\n10, 2e-3\n20, 4e-3"), { ...DEFAULT_SETTINGS, temperatureUnit: "degC" });
    expect(out.ok).toBe(false);
    if (!out.ok) expect(out.errors[0].line).toBe(1);
  });
});

describe("Eyring and Arrhenius from exact synthetic data", () => {
  const dH = 80e3, dS = -20; // J/mol, J/(mol K)
  const temps = [290, 300, 310, 320, 330];

  it("recovers ΔH‡, ΔS‡ and ΔG‡(298.15 K) from k in s⁻¹ with T in K", () => {
    const out = analyseKinetics(parseKineticsText(table(temps, (T) => eyringK(T, dH, dS))), DEFAULT_SETTINGS);
    expect(out.ok).toBe(true);
    if (!out.ok) return;
    const e = out.value.eyring;
    expect(e.dH.value).toBeCloseTo(dH, 1);
    expect(e.dS.value).toBeCloseTo(dS, 4);
    expect(e.dG.value).toBeCloseTo(dH - 298.15 * dS, 1);
    // Ea ≈ ΔH‡ + R·T_mean for a unimolecular step (within the curvature of ln k vs 1/T).
    const Tm = 2 / (1 / 290 + 1 / 330);
    expect(Math.abs(out.value.arrhenius.Ea.value - (dH + R * Tm))).toBeLessThan(5);
  });

  it("gives the same parameters from °C and k in min⁻¹", () => {
    const text = ["T/°C, k/min⁻¹", ...temps.map((T) => `${(T - 273.15).toFixed(2)}, ${(eyringK(T, dH, dS) * 60).toExponential(8)}`)].join("\n");
    const out = analyseKinetics(parseKineticsText(text), { ...DEFAULT_SETTINGS, temperatureUnit: "degC", timeUnit: "min" });
    expect(out.ok).toBe(true);
    if (out.ok) {
      expect(out.value.eyring.dH.value).toBeCloseTo(dH, 0);
      expect(out.value.eyring.dS.value).toBeCloseTo(dS, 3);
    }
  });

  it("second order k in L mol⁻¹ s⁻¹ refers to the 1 mol/L standard state (c° = 1 mol/L, no factor)", () => {
    const out = analyseKinetics(parseKineticsText(table(temps, (T) => eyringK(T, dH, dS))), { ...DEFAULT_SETTINGS, molecularity: 2 });
    expect(out.ok && out.value.eyring.dS.value).toBeCloseTo(dS, 4);
    expect(out.ok && out.value.kUnitSI).toBe("L mol⁻¹ s⁻¹");
  });

  it("formats value ± standard error to the SE's second significant digit", () => {
    expect(plusMinus(80123.4, 456, 1e-3)).toBe("80.12 ± 0.46");
    expect(plusMinus(-20.04, 1.3)).toBe("-20.0 ± 1.3");
  });
});

describe("the /analysis action", () => {
  const post = async (fields: Record<string, string>) => {
    const fd = new FormData();
    for (const [k, v] of Object.entries({ temperatureUnit: "K", molecularity: "1", concentrationUnit: "mol/L", timeUnit: "s", Tref: "298.15", TrefUnit: "K", kappa: "1", ...fields })) fd.set(k, v);
    const request = new Request("http://localhost/analysis", { method: "POST", body: fd });
    return action({ request, params: {}, context: {} } as never);
  };

  it("returns the fit for a good table and keeps the text", async () => {
    const text = table([300, 310, 320, 330], (T) => eyringK(T, 90e3, 5));
    const r = await post({ table: text });
    expect(r.ok).toBe(true);
    expect(r.text.replace(/\r\n/g, "\n")).toBe(text); // multipart form bodies carry CRLF line ends
    if (r.ok) expect(r.analysis.eyring.dH.value).toBeCloseTo(90e3, 0);
  });

  it("keeps the input and names the line of a bad row", async () => {
    const r = await post({ table: "300, 1e-3\n310, 2e-3\n320, 3,4\n330, 1e-2\n340, ok" });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.text).toContain("340, ok");
      expect(r.errors.map((e) => e.line)).toEqual([5]);
    }
  });

  it("validates the settings with field errors", async () => {
    const r = await post({ table: "300, 1\n310, 2\n320, 3", kappa: "-1" });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.fields.kappa).toMatch(/positive/);
  });
});
