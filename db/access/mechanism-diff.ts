/**
 * Differences between two mechanisms (two versions, or a fork and its parent): species
 * added and removed, steps added, removed and changed, with every changed field's old and
 * new value (in the units stated in the step) and the effect on the forward rate constant
 * at a chosen temperature. Pure: runs in the browser and on the server.
 *
 * Steps are matched by their entry key, which a fork keeps from its parent.
 */
import { stepToEngine, type DocumentStep } from "../../solver/exchange-format";
import { rateConstant } from "../../solver/rates";

export interface ResolvedSpecies {
  key: string;
  speciesId: number | null;
  label: string;
  formula?: string | null;
  charge?: number | null;
  phase?: string | null;
}

export interface ResolvedEntry {
  key: string;
  kind: "library" | "local";
  stepId?: number;
  stepVersionId?: number;
  versionNumber?: number;
  status?: string;
  label: string;
  /** Species ids are the mechanism's species keys; id is the entry key. */
  doc: DocumentStep;
}

export interface ResolvedMechanism {
  name: string;
  species: ResolvedSpecies[];
  steps: ResolvedEntry[];
}

export type Scalar = string | number | boolean | null;

export interface FieldChange {
  path: string;
  old: Scalar;
  new: Scalar;
}

export interface RateAt {
  /** K */
  T: number;
  /** (mol/L)^(1−m)·s⁻¹, null when not computable */
  k: number | null;
  unit: string;
}

export interface StepSide {
  key: string;
  label: string;
  kind: "library" | "local";
  versionNumber?: number;
  rate: RateAt;
}

export interface StepChange {
  key: string;
  label: string;
  pin: { from: string; to: string } | null;
  fields: FieldChange[];
  rateOld: RateAt;
  rateNew: RateAt;
  /** k_new / k_old at T; null when either is missing. */
  ratio: number | null;
}

export interface MechanismDiff {
  T: number;
  nameChanged: { old: string; new: string } | null;
  species: { added: ResolvedSpecies[]; removed: ResolvedSpecies[] };
  steps: { added: StepSide[]; removed: StepSide[]; changed: StepChange[]; unchanged: number };
  /** Species key → name, over both sides (for showing changed fields by name). */
  speciesNames: Record<string, string>;
  reordered: boolean;
  identical: boolean;
}

/** Flattens a JSON value into path → scalar pairs ("barrier.dG" → 85). */
export function flatten(value: unknown, prefix = "", out: Map<string, Scalar> = new Map()): Map<string, Scalar> {
  if (value === null || value === undefined || typeof value !== "object") {
    out.set(prefix, (value ?? null) as Scalar);
    return out;
  }
  if (Array.isArray(value)) {
    if (value.length === 0) out.set(prefix, "[]");
    value.forEach((v, i) => flatten(v, `${prefix}[${i}]`, out));
    return out;
  }
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  return out;
}

export function rateAt(doc: DocumentStep, T: number): RateAt {
  const e = stepToEngine(doc);
  if (!e.ok) return { T, k: null, unit: "" };
  const r = rateConstant(e.value, T);
  return r.ok ? { T, k: r.value.k, unit: r.value.units } : { T, k: null, unit: "" };
}

const pinText = (e: ResolvedEntry) => (e.kind === "library" ? `library v${e.versionNumber ?? "?"}` : "local");

export function diffMechanisms(a: ResolvedMechanism, b: ResolvedMechanism, T = 298.15): MechanismDiff {
  const spA = new Map(a.species.map((s) => [s.key, s]));
  const spB = new Map(b.species.map((s) => [s.key, s]));
  const stA = new Map(a.steps.map((s) => [s.key, s]));
  const stB = new Map(b.steps.map((s) => [s.key, s]));
  const side = (e: ResolvedEntry): StepSide => ({ key: e.key, label: e.label, kind: e.kind, versionNumber: e.versionNumber, rate: rateAt(e.doc, T) });

  const changed: StepChange[] = [];
  let unchanged = 0;
  for (const [key, eb] of stB) {
    const ea = stA.get(key);
    if (!ea) continue;
    const fa = flatten({ ...ea.doc, id: undefined });
    const fb = flatten({ ...eb.doc, id: undefined });
    const fields: FieldChange[] = [];
    for (const p of new Set([...fa.keys(), ...fb.keys()])) {
      if (p === "id") continue;
      const o = fa.has(p) ? fa.get(p)! : null;
      const n = fb.has(p) ? fb.get(p)! : null;
      if (o !== n) fields.push({ path: p, old: o, new: n });
    }
    const pinChanged = ea.kind !== eb.kind || ea.stepVersionId !== eb.stepVersionId;
    if (fields.length === 0 && !pinChanged) {
      unchanged++;
      continue;
    }
    const rateOld = rateAt(ea.doc, T);
    const rateNew = rateAt(eb.doc, T);
    changed.push({
      key,
      label: eb.label,
      pin: pinChanged ? { from: pinText(ea), to: pinText(eb) } : null,
      fields,
      rateOld,
      rateNew,
      ratio: rateOld.k && rateNew.k !== null ? rateNew.k / rateOld.k : null,
    });
  }
  const added = b.steps.filter((s) => !stA.has(s.key)).map(side);
  const removed = a.steps.filter((s) => !stB.has(s.key)).map(side);
  const commonA = a.steps.filter((s) => stB.has(s.key)).map((s) => s.key);
  const commonB = b.steps.filter((s) => stA.has(s.key)).map((s) => s.key);
  const reordered = commonA.join("\u0000") !== commonB.join("\u0000");
  const speciesAdded = b.species.filter((s) => !spA.has(s.key));
  const speciesRemoved = a.species.filter((s) => !spB.has(s.key));
  const nameChanged = a.name !== b.name ? { old: a.name, new: b.name } : null;
  return {
    T,
    nameChanged,
    species: { added: speciesAdded, removed: speciesRemoved },
    steps: { added, removed, changed, unchanged },
    speciesNames: Object.fromEntries([...a.species, ...b.species].map((s) => [s.key, s.label])),
    reordered,
    identical: !nameChanged && !reordered && added.length + removed.length + changed.length + speciesAdded.length + speciesRemoved.length === 0,
  };
}
