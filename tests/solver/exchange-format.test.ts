/**
 * The Saddlebook mechanism exchange format: schema, unit conversion to the engine's SI-molar
 * units, round trips, strict errors with paths and line numbers, and the committed JSON Schema.
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import fc from "fast-check";
import {
  jsonSyntaxErrorOffset,
  documentToEngine,
  engineToDocument,
  mechanismToText,
  parseMechanismText,
  validateMechanismDocument,
  type MechanismDocument,
} from "../../solver/exchange-format.ts";
import { compileMechanism } from "../../solver/model.ts";
import { rateConstant } from "../../solver/rates.ts";
import { mechanismSchemaText } from "../../scripts/gen-format-schema.ts";

const docsDir = new URL("../../docs/", import.meta.url);

/** The illustrative example in docs/mechanism-format.md (the first ```json block). */
function docsExampleText(): string {
  const md = readFileSync(new URL("mechanism-format.md", docsDir), "utf8");
  const m = /```json\n([\s\S]*?)\n```/.exec(md);
  if (!m) throw new Error("no JSON example in docs/mechanism-format.md");
  return m[1];
}

function minimalDoc(barrier: Record<string, unknown>, extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: "unit check" },
    species: [{ id: "A" }, { id: "B" }],
    steps: [
      {
        id: "s1",
        reactants: [{ species: "A", coef: 1 }],
        products: [{ species: "B", coef: 1 }],
        reversible: false,
        barrier,
        ...extra,
      },
    ],
  };
}

function engineStep(doc: Record<string, unknown>) {
  const v = validateMechanismDocument(doc);
  if (!v.ok) throw new Error(v.error.message);
  const e = documentToEngine(v.value);
  if (!e.ok) throw new Error(e.error.message);
  return e.value.steps[0];
}

describe("unit conversion into the engine", () => {
  it("1 kcal/mol = 4.184 kJ/mol (thermochemical calorie, exact by definition; NIST SP 811)", () => {
    const s = engineStep(minimalDoc({ form: "dG", dG: 20, unit: "kcal/mol", T: 298.15, standardState: "1M" }));
    expect(s.barrier).toEqual({ form: "dG", dG: 83680, Tref: 298.15, standardState: "1M" });
  });

  it("1 cal/(mol K) = 4.184 J/(mol K) (thermochemical calorie, definition)", () => {
    const s = engineStep(minimalDoc({ form: "dHdS", dH: 20, dS: -10, unit: "kcal/mol", entropyUnit: "cal/(mol K)", standardState: "1M" }));
    expect(s.barrier.form).toBe("dHdS");
    if (s.barrier.form !== "dHdS") return;
    expect(s.barrier.dH).toBeCloseTo(83680, 9);
    expect(s.barrier.dS).toBeCloseTo(-41.84, 12);
  });

  it("1 eV per particle = 96.48533212 kJ/mol (e·N_A = Faraday constant, CODATA 2018 exact)", () => {
    const s = engineStep(minimalDoc({ form: "dG", dG: 1, unit: "eV", T: 298.15, standardState: "1M" }));
    if (s.barrier.form !== "dG") throw new Error("form");
    expect(s.barrier.dG / 1000).toBeCloseTo(96.48533212, 8);
  });

  it("the thermal form must state T (the temperature at which Ea was determined): no default is assumed", () => {
    const r = validateMechanismDocument(minimalDoc({ form: "thermal", Ea: 90, dS: -5, dn: 0, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1bar" }));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.issues.some((i) => i.path === "steps[0].barrier.T")).toBe(true);
  });

  it("J/mol passes through unchanged and the thermal form keeps Δn‡ and T", () => {
    const s = engineStep(minimalDoc({ form: "thermal", Ea: 90000, dS: -5, dn: 0, unit: "J/mol", entropyUnit: "J/(mol K)", standardState: "1bar", T: 350 }));
    expect(s.barrier).toEqual({ form: "thermal", Ea: 90000, dS: -5, dn: 0, standardState: "1bar", Tref: 350 });
  });

  it("A in cm³ molecule⁻¹ s⁻¹ becomes L mol⁻¹ s⁻¹: 1e-10 → 6.02214076e10 (N_A, CODATA 2018; 1 L = 1000 cm³)", () => {
    const doc = minimalDoc({ form: "arrhenius", A: 1e-10, rateUnit: { concentration: "molecules/cm3", time: "s" }, Ea: 0, unit: "kJ/mol" });
    (doc.species as unknown[]).push({ id: "C" });
    const st = (doc.steps as Record<string, unknown>[])[0];
    st.reactants = [{ species: "A", coef: 1 }, { species: "C", coef: 1 }];
    const s = engineStep(doc);
    if (s.barrier.form !== "arrhenius") throw new Error("form");
    expect(s.barrier.A / 6.02214076e10).toBeCloseTo(1, 12);
  });

  it("a measured first-order k of 6 min⁻¹ is 0.1 s⁻¹", () => {
    const s = engineStep(minimalDoc({ form: "measured", k: 6, rateUnit: { concentration: "mol/L", time: "min" }, T: 300 }));
    if (s.barrier.form !== "measured") throw new Error("form");
    expect(s.barrier.k).toBeCloseTo(0.1, 14);
  });

  it("carries κ, the imaginary frequency and the reporting standard state", () => {
    const s = engineStep(
      minimalDoc(
        { form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" },
        { kappa: 0.5, imaginaryFrequency: { value: 1200, unit: "cm-1" }, reportStandardState: "1bar" },
      ),
    );
    expect(s.kappa).toBe(0.5);
    expect(s.imagFreq).toBe(1200);
    expect(s.targetStandardState).toBe("1bar");
  });
});

describe("the documented example", () => {
  it("parses, compiles as a mass-action model and gives finite rate constants", () => {
    const parsed = parseMechanismText(docsExampleText());
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    const eng = documentToEngine(parsed.value);
    expect(eng.ok).toBe(true);
    if (!eng.ok) return;
    expect(compileMechanism(eng.value.mechanism).ok).toBe(true);
    for (const st of eng.value.steps) {
      const k = rateConstant(st, 298.15);
      expect(k.ok && Number.isFinite(k.value.k) && k.value.k > 0).toBe(true);
    }
    expect(eng.value.annotations.steps.turnover.uncertainty).toBe(4000);
  });

  it("round trip: document → engine → document is identical", () => {
    const parsed = parseMechanismText(docsExampleText());
    if (!parsed.ok) throw new Error(parsed.error.message);
    const eng = documentToEngine(parsed.value);
    if (!eng.ok) throw new Error(eng.error.message);
    const back = engineToDocument(eng.value);
    expect(back.ok).toBe(true);
    if (!back.ok) return;
    expect(back.value).toEqual(parsed.value);
    // and through text
    const again = parseMechanismText(mechanismToText(back.value));
    expect(again.ok && again.value).toEqual(parsed.value);
  });

  it("round trip in kcal/mol and cal/(mol K) keeps the numbers the user wrote", () => {
    const doc = minimalDoc({ form: "dHdS", dH: 19.3, dS: -4.7, unit: "kcal/mol", entropyUnit: "cal/(mol K)", standardState: "1M" }) as MechanismDocument;
    const eng = documentToEngine(doc);
    if (!eng.ok) throw new Error(eng.error.message);
    const back = engineToDocument(eng.value, { energy: "kcal/mol", entropy: "cal/(mol K)" });
    expect(back.ok && back.value.steps[0].barrier).toEqual(doc.steps[0].barrier);
  });
});

describe("strict errors with paths and line numbers", () => {
  const good = docsExampleText();

  it("an unknown field is rejected with its path and line", () => {
    const text = good.replace('"dG": 52.3,', '"dG": 52.3, "dG2": 1,');
    const r = parseMechanismText(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const iss = r.error.issues.find((i) => i.code === "unknown_field");
    expect(iss?.path).toBe("steps[0].barrier.dG2");
    const line = text.split("\n").findIndex((l) => l.includes('"dG2"')) + 1;
    expect(iss?.line).toBe(line);
    expect(r.error.message).toContain("steps[0].barrier.dG2");
  });

  it("a wrong type names the field", () => {
    const r = parseMechanismText(good.replace('"dH": 78.5', '"dH": "78.5"'));
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.error.issues[0].path).toBe("steps[1].barrier.dH");
    expect(r.error.issues[0].line).toBeGreaterThan(1);
  });

  it("an unknown barrier form, an unknown unit and another format version are refused", () => {
    const form = parseMechanismText(good.replace('"form": "arrhenius"', '"form": "arrhenius-ish"'));
    expect(!form.ok && form.error.issues[0].path).toBe("steps[2].barrier.form");
    const unit = parseMechanismText(good.replace('"unit": "kJ/mol", "entropyUnit"', '"unit": "kJ", "entropyUnit"'));
    expect(!unit.ok && unit.error.issues[0].path).toBe("steps[1].barrier.unit");
    const version = parseMechanismText(good.replace('"version": 1', '"version": 2'));
    expect(!version.ok && version.error.issues[0].path).toBe("version");
    const fmt = parseMechanismText(good.replace('"saddlebook.mechanism"', '"other.mechanism"'));
    expect(!fmt.ok && fmt.error.issues[0].path).toBe("format");
  });

  it("cross-field checks: unknown species, duplicate ids, reversible without thermo", () => {
    const unknown = parseMechanismText(good.replace('{ "species": "X", "coef": 1 }', '{ "species": "Y", "coef": 1 }'));
    expect(!unknown.ok && unknown.error.issues[0]).toMatchObject({ code: "unknown_species", path: "steps[2].products[0].species" });
    const dup = parseMechanismText(good.replace('"id": "side"', '"id": "bind"'));
    expect(!dup.ok && dup.error.issues[0]).toMatchObject({ code: "duplicate_id", path: "steps[2].id" });
    const doc = minimalDoc({ form: "dG", dG: 80, unit: "kJ/mol", T: 298.15, standardState: "1M" });
    (doc.steps as Record<string, unknown>[])[0].reversible = true;
    const rev = validateMechanismDocument(doc);
    expect(!rev.ok && rev.error.issues[0]).toMatchObject({ code: "missing_thermo", path: "steps[0].reactionThermo" });
  });

  it("a JSON syntax error reports its line and column", () => {
    const text = '{\n  "format": "saddlebook.mechanism",\n  "version": 1\n  "about": {}\n}';
    const r = parseMechanismText(text);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    // the missing comma is noticed at the quote that opens "about": line 4, column 3
    expect(r.error.issues[0]).toMatchObject({ code: "json_syntax", line: 4, column: 3 });
    expect(r.error.message).toContain("line 4");
  });

  it("truncated JSON reports the end of the text", () => {
    const r = parseMechanismText('{\n  "format": "saddlebook.mechanism",\n');
    expect(!r.ok && r.error.issues[0].line).toBe(3);
  });
});

describe("JSON syntax error positions", () => {
  it("points at the offending character", () => {
    expect(jsonSyntaxErrorOffset('{"a": [1, 2,]}')).toBe(12);
    expect(jsonSyntaxErrorOffset('{"a": tru}')).toBe(6);
    expect(jsonSyntaxErrorOffset('{"a": 1} x')).toBe(9);
    expect(jsonSyntaxErrorOffset('{"a": "\\u12"}')).not.toBeNull();
    expect(jsonSyntaxErrorOffset('{"a": [1, 2.5e-3, "x\\n", null, false]}')).toBeNull();
  });

  it("agrees with the runtime's JSON.parse on valid and damaged texts (property check, fast-check)", () => {
    fc.assert(
      fc.property(fc.json(), fc.nat(), (text, cut) => {
        expect(jsonSyntaxErrorOffset(text)).toBeNull();
        const damaged = text.slice(0, cut % (text.length + 1)) + text.slice((cut % (text.length + 1)) + 1);
        let valid = true;
        try {
          JSON.parse(damaged);
        } catch {
          valid = false;
        }
        expect(jsonSyntaxErrorOffset(damaged) === null).toBe(valid);
      }),
      { numRuns: 500 },
    );
  });
});

describe("JSON Schema", () => {
  it("the committed docs/mechanism-format.schema.json equals the one generated from the zod schema", () => {
    const committed = readFileSync(new URL("mechanism-format.schema.json", docsDir), "utf8");
    expect(committed).toBe(mechanismSchemaText());
  });

  it("the JSON Schema, read back by zod's fromJSONSchema, accepts the example and rejects an unknown field", () => {
    const schema = z.fromJSONSchema(JSON.parse(readFileSync(new URL("mechanism-format.schema.json", docsDir), "utf8")));
    const example = JSON.parse(docsExampleText());
    expect(schema.safeParse(example).success).toBe(true);
    example.steps[0].barrier.extra = 1;
    expect(schema.safeParse(example).success).toBe(false);
  });
});
