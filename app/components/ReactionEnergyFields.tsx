/**
 * The reaction free energy of a step as typed in the workbench and mechanism-editor forms:
 * ΔG°rxn with its energy unit, the temperature it refers to (K) and its standard state. Empty
 * means "not given" (the profile then shows the levels after the step as unknown); a stored
 * ΔH°/ΔS° thermochemistry, which these forms do not edit, is kept unless a ΔG°rxn is typed.
 * `thermoOfDraft` turns the draft into the exchange format's reactionThermo, or an error in
 * words (checked again by the format's zod schema on save).
 */
import type { DocumentReactionThermo } from "../../solver/exchange-format";
import { describeThermo } from "./barrier-text";

export const RXN_ENERGY_UNITS = ["kJ/mol", "kcal/mol", "eV", "J/mol"] as const;
type EnergyUnit = (typeof RXN_ENERGY_UNITS)[number];
type StandardState = "1M" | "1bar" | "1atm";

export interface ReactionEnergyDraft {
  dG: string;
  unit: EnergyUnit;
  T: string;
  standardState: StandardState;
}

export const freshReactionEnergy = (): ReactionEnergyDraft => ({ dG: "", unit: "kJ/mol", T: "298.15", standardState: "1M" });

/** The draft of a stored reaction thermochemistry (a ΔH°/ΔS° form leaves the draft empty and is kept). */
export function reactionEnergyDraftOf(t: DocumentReactionThermo | undefined): ReactionEnergyDraft {
  const d = freshReactionEnergy();
  if (!t) return d;
  d.standardState = t.standardState;
  if (RXN_ENERGY_UNITS.includes(t.unit as EnergyUnit)) d.unit = t.unit as EnergyUnit;
  if (t.form === "dG") Object.assign(d, { dG: String(t.dG), T: String(t.T), unit: t.unit });
  return d;
}

const parse = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".")));

/**
 * The reactionThermo of a draft: undefined when nothing is typed (then `kept`, a stored one this
 * form does not edit, if any); an error sentence when the typed values cannot be read.
 */
export function thermoOfDraft(d: ReactionEnergyDraft, kept?: DocumentReactionThermo): { thermo: DocumentReactionThermo | undefined; error: string | null } {
  if (d.dG.trim() === "") return { thermo: kept && kept.form === "dHdS" ? kept : undefined, error: null };
  const dG = parse(d.dG);
  const T = parse(d.T);
  if (!Number.isFinite(dG)) return { thermo: undefined, error: `ΔG°rxn "${d.dG}" is not a number.` };
  if (!(T > 0) || T > 10000) return { thermo: undefined, error: "The temperature of ΔG°rxn must be above 0 K and at most 10,000 K." };
  const keepDH = kept?.form === "dG" && kept.dH !== undefined && kept.unit === d.unit ? { dH: kept.dH } : {};
  return { thermo: { form: "dG", dG, unit: d.unit, T, standardState: d.standardState, ...keepDH }, error: null };
}

export function ReactionEnergyFields({ d, onChange, prefix, kept }: { d: ReactionEnergyDraft; onChange: (d: ReactionEnergyDraft) => void; prefix: string; kept?: DocumentReactionThermo }) {
  const set = <K extends keyof ReactionEnergyDraft>(k: K, v: ReactionEnergyDraft[K]) => onChange({ ...d, [k]: v });
  return (
    <div className="space-y-1" data-testid="reaction-energy-fields">
      <div className="grid grid-cols-4 gap-2">
        <label className="block">
          <span className="label">ΔG°rxn</span>
          <input className="field num" aria-label={`${prefix} reaction free energy`} inputMode="decimal" value={d.dG} onChange={(e) => set("dG", e.target.value)} placeholder={kept?.form === "dHdS" ? "kept (ΔH°, ΔS°)" : "not given"} />
        </label>
        <label className="block">
          <span className="label">unit</span>
          <select className="field" aria-label={`${prefix} reaction free energy unit`} value={d.unit} onChange={(e) => set("unit", e.target.value as EnergyUnit)}>
            {RXN_ENERGY_UNITS.map((u) => (
              <option key={u}>{u}</option>
            ))}
          </select>
        </label>
        <label className="block">
          <span className="label">at T (K)</span>
          <input className="field num" aria-label={`${prefix} reaction free energy T in K`} inputMode="decimal" value={d.T} onChange={(e) => set("T", e.target.value)} />
        </label>
        <label className="block">
          <span className="label">standard state</span>
          <select className="field" aria-label={`${prefix} reaction free energy standard state`} value={d.standardState} onChange={(e) => set("standardState", e.target.value as StandardState)}>
            <option value="1M">1 mol/L</option>
            <option value="1bar">1 bar</option>
            <option value="1atm">1 atm</option>
          </select>
        </label>
      </div>
      {kept && d.dG.trim() === "" && kept.form === "dHdS" && <p className="text-xs text-ink-600">Stored: {describeThermo(kept)} — kept unless you type a ΔG°rxn.</p>}
      {kept?.form === "dG" && kept.dH !== undefined && <p className="text-xs text-ink-600">The stored ΔH°rxn ({kept.dH} {kept.unit}) is kept while the unit stays {kept.unit}.</p>}
    </div>
  );
}
