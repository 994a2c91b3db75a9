/**
 * The New-ensemble form's translation into the request body: numbers typed as text, units kept,
 * errors keyed by the field that holds them (so the form can show each beside its input), and
 * server error paths mapped back to the same fields.
 */
import { describe, expect, it } from "vitest";
import { buildEnsemble, defaultAxis, defaultEnsembleDraft, ensembleDraftKey } from "../../app/components/ensembles/ensemble-draft";

const base = { mechanismId: 3, conditions: { temperature: { value: 25, unit: "°C" as const }, initial: { A: { value: 1, unit: "mol/L" as const } }, endTime: { value: 2, unit: "h" as const } }, solver: {} };

describe("ensemble form", () => {
  it("builds an uncertainty request with σ overrides, correlations and times in the chosen unit", () => {
    const d = defaultEnsembleDraft({ speciesIds: ["A", "B"], groups: ["DFT-x"], products: ["B"] });
    d.sigma = { s1: "2.5", s2: "" };
    d.sigmaT = "0.5";
    const r = buildEnsemble(d, base);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.spec.uncertainty).toMatchObject({ samples: 200, sampler: "latin-hypercube", sigma: { s1: { value: 2.5, unit: "kJ/mol" } }, correlation: { "DFT-x": 0.5 }, temperatureSigma: { value: 0.5, unit: "K" } });
    expect(r.spec.uncertainty!.sigma).not.toHaveProperty("s2");
    expect(r.spec.observables.times).toEqual([30, 60, 120].map((value) => ({ value, unit: "min" })));
    expect(r.spec.observables.products).toEqual(["B"]);
  });

  it("builds a two-parameter sweep", () => {
    const d = defaultEnsembleDraft({ speciesIds: ["A"], groups: [], products: [] });
    d.mode = "sweep";
    d.axes = [defaultAxis("temperature"), defaultAxis("barrier:s1")];
    const r = buildEnsemble(d, base);
    if (!r.ok) throw new Error(JSON.stringify(r.errors));
    expect(r.spec.sweep).toEqual([
      { parameter: "temperature", from: { value: 20, unit: "°C" }, to: { value: 60, unit: "°C" }, points: 5, grid: "linear" },
      { parameter: "barrier", step: "s1", from: { value: -5, unit: "kJ/mol" }, to: { value: 5, unit: "kJ/mol" }, points: 5, grid: "linear" },
    ]);
  });

  it("keys errors by field", () => {
    const d = defaultEnsembleDraft({ speciesIds: ["A", "B"], groups: ["g"], products: [] });
    d.samples = "many";
    d.correlation.g = "1.5";
    d.times = "10, soon";
    const r = buildEnsemble(d, base);
    expect(!r.ok && Object.keys(r.errors).sort()).toEqual(["samples", "times"]);
    d.samples = "9000";
    d.times = "10";
    const r2 = buildEnsemble(d, base);
    expect(!r2.ok && Object.keys(r2.errors).sort()).toEqual(["correlation.g", "samples"]);
    d.selFirst = "B";
    expect(buildEnsemble({ ...d, samples: "10", correlation: { g: "0.2" } }, base)).toMatchObject({ ok: false, errors: { selectivity: expect.any(String) } });
  });

  it("maps the server's paths back to fields", () => {
    expect(ensembleDraftKey(["uncertainty", "sigma", "s1", "value"])).toBe("sigma.s1");
    expect(ensembleDraftKey(["sweep", 1, "to", "value"])).toBe("axis1.to");
    expect(ensembleDraftKey("sweep[0].step".split("."))).toBe("axis0.parameter");
    expect(ensembleDraftKey("observables.times[0].value".split("."))).toBe("times");
    expect(ensembleDraftKey(["observables", "reactant"])).toBe("reactant");
  });
});
