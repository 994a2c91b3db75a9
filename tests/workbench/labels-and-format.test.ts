/**
 * One number format, one spelling of each unit, labels as written: the shared formatter, the
 * unit texts, the thermal form's reference-temperature warning, and no upper-casing of labels
 * in the styles (kJ/mol, κ, cm⁻¹, k stay as written). Conventions of the product; the 50 K span
 * is the product's own threshold.
 */
import { describe, expect, it } from "vitest";
import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { formatNumber, parseFormatted } from "../../app/components/format";
import { sig } from "../../app/components/library/format";
import { num } from "../../app/components/workbench/format";
import { tickLabel } from "../../app/components/plots/ticks";
import { standardStateText, unitText } from "../../app/components/units-text";
import { barrierRows, thermalReferenceWarning } from "../../app/components/barrier-text";
import { stepNumbers } from "../../app/components/workbench/step-rates";
import { plusMinus } from "../../app/components/workbench/activation-table";

describe("one number format", () => {
  it("writes plain decimals between 0.001 and 100 000 and powers of ten outside", () => {
    expect(formatNumber(0.001589, 4)).toBe("0.001589");
    expect(formatNumber(7.0923e-4, 4)).toBe("7.092×10⁻⁴");
    expect(formatNumber(123456, 4)).toBe("1.235×10⁵");
    expect(formatNumber(99999.7, 4)).toBe("1×10⁵"); // rounds up past the boundary: written as a power
    expect(formatNumber(-2.5e-12, 3)).toBe("-2.5×10⁻¹²");
    expect(formatNumber(0)).toBe("0");
    expect(formatNumber(null)).toBe("—");
    expect(formatNumber(NaN)).toBe("—");
  });

  it("is the format of the library, the workbench and the plot ticks alike", () => {
    for (const v of [3.2e-7, 0.5, 42, 6.1e8]) {
      expect(sig(v)).toBe(formatNumber(v));
      expect(num(v)).toBe(formatNumber(v));
    }
    expect(tickLabel(1e-4)).toBe("1×10⁻⁴");
    expect(tickLabel(0.25)).toBe("0.25");
    expect(plusMinus(1.234e9, 5.6e7)).toBe("1.234×10⁹ ± 5.6×10⁷");
  });

  it("reads its own output back", () => {
    expect(parseFormatted("7.092×10⁻⁴ L mol⁻¹ s⁻¹")).toBeCloseTo(7.092e-4, 12);
    expect(parseFormatted("0.001589 s⁻¹")).toBe(0.001589);
    expect(parseFormatted("1e-5")).toBe(1e-5);
    expect(parseFormatted("—")).toBeNaN();
  });
});

describe("one spelling of each unit", () => {
  it("writes the format's unit ids as a kineticist does", () => {
    expect(unitText("J/(mol K)")).toBe("J/(mol·K)");
    expect(unitText("cm-1")).toBe("cm⁻¹");
    expect(unitText("umol/L")).toBe("µmol/L");
    expect(unitText("kJ/mol")).toBe("kJ/mol");
    expect(standardStateText("1M")).toBe("1 mol/L");
    expect(standardStateText("1bar")).toBe("1 bar");
  });
});

describe("thermal form: the temperature its Ea and ΔS‡ refer to", () => {
  const thermal = { form: "thermal" as const, Ea: 80, dS: -20, dn: 0, unit: "kJ/mol" as const, entropyUnit: "J/(mol K)" as const, standardState: "1M" as const, T: 350 };

  it("states the reference temperature", () => {
    expect(barrierRows(thermal)).toContainEqual(["reference temperature of Ea and ΔS‡", "350 K"]);
  });

  it("warns more than 50 K from it, and not within", () => {
    expect(thermalReferenceWarning(thermal, 390)).toBeNull();
    expect(thermalReferenceWarning(thermal, 298.15)).toMatch(/refer to 350 K; at 298.15 K, 51.9 K away/);
    expect(thermalReferenceWarning({ ...thermal, form: "dHdS" } as never, 900)).toBeNull();
  });

  it("carries the warning into the workbench's rate table", () => {
    const doc = {
      format: "saddlebook.mechanism" as const,
      version: 1 as const,
      about: { name: "t" },
      species: [{ id: "A" }, { id: "B" }],
      steps: [{ id: "ab", reactants: [{ species: "A", coef: 1 }], products: [{ species: "B", coef: 1 }], reversible: false, barrier: thermal }],
    };
    expect(stepNumbers(doc, 400)[0].caution).toBeNull();
    expect(stepNumbers(doc, 450)[0].caution).toMatch(/extrapolation/);
  });
});

describe("labels as written", () => {
  it("no style upper-cases labels or table heads (units and symbols keep their case)", () => {
    const root = join(import.meta.dirname, "../../app");
    const files: string[] = [];
    const walk = (d: string) => {
      for (const e of readdirSync(d, { withFileTypes: true })) {
        if (e.isDirectory()) walk(join(d, e.name));
        else if (/\.(tsx|css)$/.test(e.name)) files.push(join(d, e.name));
      }
    };
    walk(root);
    const offenders = files.filter((f) => /\buppercase\b|text-transform:\s*uppercase/.test(readFileSync(f, "utf8")));
    expect(offenders).toEqual([]);
  });
});
