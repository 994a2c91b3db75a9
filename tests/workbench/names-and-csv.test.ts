/**
 * Names instead of keys: the name key of a mechanism document, the reaction text, engine
 * messages with keys replaced by names, and the results CSV (names and units in the header, a
 * key from names to ids in the comment block). No external reference: these are the product's
 * own conventions, checked as written.
 */
import { describe, expect, it } from "vitest";
import { nameKeyOf, namer, namesOf, reactionText } from "../../app/components/names";
import { columnHeaders, resultsCsv } from "../../app/components/plots/results-csv";
import { mergeRows, rowsToCsv } from "../../app/components/plots/ResultsTable";
import { seriesCsv } from "../../app/compute/run-api.server";
import { freeEnergyProfile, stepNumbers } from "../../app/components/workbench/step-rates";
import { describeBarrier } from "../../app/components/barrier-text";

const doc = {
  format: "saddlebook.mechanism" as const,
  version: 1 as const,
  about: { name: "Ketene dimerisation (illustrative)" },
  species: [
    { id: "s12", label: "Ketene", formula: "C2H2O" },
    { id: "s13", label: "Diketene", formula: "C4H4O2" },
    { id: "s14", formula: "H2O" },
  ],
  steps: [
    {
      id: "L2",
      reactants: [{ species: "s12", coef: 2 }],
      products: [{ species: "s13", coef: 1 }],
      reversible: false,
      barrier: { form: "dG" as const, dG: 90, unit: "kJ/mol" as const, T: 298.15, standardState: "1M" as const },
    },
    {
      id: "L3",
      label: "Hydration",
      reactants: [{ species: "s12", coef: 1 }, { species: "s14", coef: 1 }],
      products: [{ species: "s13", coef: 1 }],
      reversible: true,
      barrier: { form: "dG" as const, dG: 80, unit: "kJ/mol" as const, T: 298.15, standardState: "1M" as const },
      reactionThermo: { form: "dG" as const, dG: -20, unit: "kJ/mol" as const, T: 298.15, standardState: "1M" as const },
    },
  ],
};

const KEY = /\b(s\d+|L\d+)\b/;

describe("names of species and steps", () => {
  it("names species by label (id when there is none) and steps by label or reaction", () => {
    const n = namesOf(doc);
    expect(n.species("s12")).toBe("Ketene");
    expect(n.species("s14")).toBe("s14"); // no label: the id is the only name there is
    expect(n.speciesWithFormula("s13")).toBe("Diketene (C4H4O2)");
    expect(n.step("L2")).toBe("2 Ketene → Diketene");
    expect(n.step("L3")).toBe("Hydration");
    expect(n.reaction("L3")).toBe("Ketene + s14 ⇌ Diketene");
    expect(n.species("unknown")).toBe("unknown");
  });

  it("writes a missing side as ∅ (sources and sinks)", () => {
    expect(reactionText({ reactants: [], products: [{ species: "x", coef: 1 }] }, (k) => k.toUpperCase())).toBe("∅ → X");
  });

  it("replaces quoted keys in engine messages by quoted names, and nothing else", () => {
    const n = namesOf(doc);
    expect(n.text('Species "s12" does not reach 99 % conversion; step "L3" is stiff; "x" stays.')).toBe("Species “Ketene” does not reach 99 % conversion; step “Hydration” is stiff; \"x\" stays.");
  });

  it("survives a round trip through JSON (loader data)", () => {
    const key = JSON.parse(JSON.stringify(nameKeyOf(doc)));
    expect(namer(key).step("L2")).toBe("2 Ketene → Diketene");
    expect(namer(null).species("s1")).toBe("s1");
  });

  it("labels the workbench's rate table and free-energy profile by name", () => {
    const numbers = stepNumbers(doc, 298.15);
    expect(numbers.map((x) => x.label)).toEqual(["2 Ketene → Diketene", "Hydration"]);
    const profile = freeEnergyProfile(doc, numbers, ["L3"]);
    expect(profile.map((p) => p.label)).toEqual(["Ketene + s14", "TS Hydration", "Diketene"]);
  });

  it("describes a barrier in words and units, not field names", () => {
    const text = describeBarrier({ form: "dHdS", dH: 70, dS: -40, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1bar" });
    expect(text).toBe("ΔH‡ 70 kJ/mol, ΔS‡ -40 J/(mol·K), standard state 1 bar");
  });
});

describe("results CSV", () => {
  const series = {
    speciesIds: ["s12", "s13"],
    times: Float64Array.from([0, 1]),
    temperatures: Float64Array.from([298.15, 298.15]),
    conc: [Float64Array.from([0.2, 0.1]), Float64Array.from([0, 0.05])],
  };

  it("heads columns with names and units and keys them to ids and formulas (results API)", () => {
    const text = seriesCsv(series as never, nameKeyOf(doc), "Saddlebook run #7: ketene");
    const lines = text.trim().split("\n");
    const comments = lines.filter((l) => l.startsWith("#"));
    const data = lines.filter((l) => !l.startsWith("#"));
    expect(comments[0]).toBe("# Saddlebook run #7: ketene");
    expect(comments).toContain("# Ketene (mol/L) = Ketene (id s12, formula C2H2O)");
    expect(comments).toContain("# Diketene (mol/L) = Diketene (id s13, formula C4H4O2)");
    expect(data[0]).toBe("time (s),T (K),Ketene (mol/L),Diketene (mol/L)");
    expect(KEY.test(data[0])).toBe(false);
    expect(data.slice(1)).toEqual(["0,298.15,0.2,0", "1,298.15,0.1,0.05"]);
  });

  it("writes the table's download in the same layout, without T when there is none", () => {
    const ts = [
      { key: "a", label: "Ketene · run #1", id: "s12", formula: "C2H2O", times: [0, 2], values: [0.2, 0.1] },
      { key: "b", label: "Ketene · run #2", id: "s12", formula: "C2H2O", times: [0, 1], values: [0.2, null] },
    ];
    const csv = rowsToCsv(ts, mergeRows(ts), "Two runs", false).trim().split("\n");
    const data = csv.filter((l) => !l.startsWith("#"));
    expect(data[0]).toBe("time (s),Ketene · run #1 (mol/L),Ketene · run #2 (mol/L)");
    expect(data.slice(1)).toEqual(["0,0.2,0.2", "1,,", "2,0.1,"]);
  });

  it("makes repeated names unique and quotes names with commas", () => {
    expect(columnHeaders([{ name: "A", unit: "mol/L" }, { name: "A", unit: "mol/L" }])).toEqual(["A (mol/L)", "A [2] (mol/L)"]);
    const csv = resultsCsv({ title: "t", columns: [{ name: "2,4-DNP", unit: "mol/L" }], rows: [[0, 300, 1]] });
    expect(csv.split("\n").find((l) => l.startsWith("time"))).toBe('time (s),T (K),"2,4-DNP (mol/L)"');
  });
});

describe("changed fields between versions, in words", () => {
  it("names the field and shows the value as the screens do, species by name", async () => {
    const { fieldText, fieldValueText } = await import("../../app/components/field-text");
    expect(fieldText("barrier.dG")).toBe("ΔG‡");
    expect(fieldText("barrier.standardState")).toBe("standard state");
    expect(fieldText("reactants[1].species")).toBe("reactant 2");
    expect(fieldText("products[0].coef")).toBe("product 1 coefficient");
    expect(fieldText("provenance.doi")).toBe("provenance: DOI");
    const n = namesOf(doc);
    expect(fieldValueText("reactants[0].species", "s12", n.species)).toBe("Ketene");
    expect(fieldValueText("barrier.standardState", "1bar")).toBe("1 bar");
    expect(fieldValueText("barrier.entropyUnit", "J/(mol K)")).toBe("J/(mol·K)");
    expect(fieldValueText("barrier.dG", 1.5e-7)).toBe("1.5×10⁻⁷");
    expect(fieldValueText("barrier.dH", null)).toBe("—");
  });
});
