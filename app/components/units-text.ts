/**
 * One spelling of each unit on every page: the exchange format's unit ids ("J/(mol K)", "cm-1",
 * "umol/L", "1M") as a kineticist writes them ("J/(mol·K)", "cm⁻¹", "µmol/L", "1 mol/L"). Pure.
 */
const UNIT_TEXT: Record<string, string> = {
  "J/(mol K)": "J/(mol·K)",
  "cal/(mol K)": "cal/(mol·K)",
  "cm-1": "cm⁻¹",
  umol: "µmol",
  "umol/L": "µmol/L",
  "molecules/cm3": "molecules/cm³",
  degC: "°C",
};

/** A unit id as shown on screens. */
export function unitText(unit: string): string {
  return UNIT_TEXT[unit] ?? unit;
}

const STANDARD_STATE_TEXT: Record<string, string> = { "1M": "1 mol/L", "1bar": "1 bar", "1atm": "1 atm" };

/** A standard-state id ("1M", "1bar", "1atm") as shown on screens. */
export function standardStateText(id: string): string {
  return STANDARD_STATE_TEXT[id] ?? id;
}
