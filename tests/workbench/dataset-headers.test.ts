/**
 * Reading units, temperature and species from a concentration–time CSV's header and comment
 * lines (app/components/workbench/dataset-headers.ts). T/K = t/°C + 273.15 (definition of the
 * Celsius scale — common practice); M = mol/L (IUPAC Green Book usage — common practice).
 */
import { describe, expect, it } from "vitest";
import { guessConcentrationUnit, headerName, isTemperatureColumn, matchSpecies, readTemperature } from "../../app/components/workbench/dataset-headers";
import { parseCsv } from "../../app/components/workbench/dataset-csv";

describe("dataset headers", () => {
  it("reads the concentration unit of a column", () => {
    expect(guessConcentrationUnit("benzyl alcohol (mol/L)")).toBe("mol/L");
    expect(guessConcentrationUnit("A (mmol/L)")).toBe("mmol/L");
    expect(guessConcentrationUnit("B [µmol/L]")).toBe("umol/L");
    expect(guessConcentrationUnit("[C] / M")).toBe("mol/L");
    expect(guessConcentrationUnit("C, mM")).toBe("mmol/L");
    expect(guessConcentrationUnit("D (uM)")).toBe("umol/L");
    expect(guessConcentrationUnit("ester")).toBeNull();
    expect(guessConcentrationUnit("time (min)")).toBeNull();
  });

  it("strips the unit from a column's name", () => {
    expect(headerName("benzyl alcohol (mmol/L)")).toBe("benzyl alcohol");
    expect(headerName("[A] / M")).toBe("A");
    expect(headerName("water")).toBe("water");
  });

  it("matches columns to a mechanism's species by name or formula", () => {
    const species = [
      { id: "s4", label: "benzyl alcohol", formula: "C7H8O" },
      { id: "s5", label: "benzyl acetate", formula: "C9H10O2" },
      { id: "s1", label: "acetic anhydride", formula: "C4H6O3" },
    ];
    expect(matchSpecies("Benzyl Alcohol (mmol/L)", species)).toBe("s4");
    expect(matchSpecies("C9H10O2 / M", species)).toBe("s5");
    expect(matchSpecies("unknown peak", species)).toBeNull();
  });

  it("reads the temperature from a comment line or a constant temperature column", () => {
    const a = "# T = 25 °C\ntime (min),A (mol/L)\n0,1\n1,0.5\n";
    const pa = parseCsv(a);
    if (!pa.ok) throw new Error(pa.message);
    expect(readTemperature(a, pa.value.header, pa.value.rows)).toEqual({ ok: true, value: { K: 298.15, from: "comment line 1" } });
    const b = "t/s,T (K),A\n0,310.1,1\n10,310.3,0.9\n";
    const pb = parseCsv(b);
    if (!pb.ok) throw new Error(pb.message);
    const rb = readTemperature(b, pb.value.header, pb.value.rows);
    expect(rb.ok && rb.value!.K).toBeCloseTo(310.2, 10);
    expect(isTemperatureColumn("T (K)")).toBe(true);
    expect(isTemperatureColumn("time (min)")).toBe(false);
    const c = "t/s,T (°C),A\n0,25,1\n10,40,0.9\n";
    const pc = parseCsv(c);
    if (!pc.ok) throw new Error(pc.message);
    const rc = readTemperature(c, pc.value.header, pc.value.rows);
    expect(!rc.ok && rc.message).toMatch(/varies from 298.15 K to 313.15 K/);
    const d = "t/s,T (K),A\n0,abc,1\n";
    const pd = parseCsv(d);
    if (!pd.ok) throw new Error(pd.message);
    const rd = readTemperature(d, pd.value.header, pd.value.rows);
    expect(!rd.ok && rd.message).toMatch(/^Line 2: the temperature "abc"/);
    expect(readTemperature("t,A\n0,1\n", ["t", "A"], [{ line: 2, cells: ["0", "1"] }])).toEqual({ ok: true, value: null });
  });
});
