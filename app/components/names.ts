/**
 * Names of species and steps for every screen and export: a mechanism document refers to its
 * species and steps by keys (e.g. "s12", "L2"), which mean nothing to a kineticist. A name key
 * (plain JSON, small enough to send to the browser) maps each key to the species' name and
 * formula and to the step's label, or its reaction written with species names when it has no
 * label. A species without a label is named by its id: in a document written by hand the id is
 * the name its author chose ("A", "ketene"). Pure: runs in the browser and on the server.
 */

/** Enough of a mechanism document (exchange format or run snapshot) to name its parts. */
export interface NamedDocument {
  species?: ReadonlyArray<{ id: string; label?: string | null; formula?: string | null }>;
  steps?: ReadonlyArray<{
    id: string;
    label?: string | null;
    reversible?: boolean;
    reactants: ReadonlyArray<{ species: string; coef: number }>;
    products: ReadonlyArray<{ species: string; coef: number }>;
  }>;
}

/** Key → name, as plain JSON (loader data). */
export interface NameKey {
  /** species key → [name, formula or ""] */
  species: Record<string, [string, string]>;
  /** step key → [name, reaction with species names] */
  steps: Record<string, [string, string]>;
}

/** Coefficient and name, "2 Ketene"; coefficients of 1 are left out. */
function term(coef: number, name: string): string {
  return coef === 1 ? name : `${coef} ${name}`;
}

/** "A + 2 B → C" (⇌ for a reversible step) with the names `nameOf` gives. */
export function reactionText(
  step: { reversible?: boolean; reactants: ReadonlyArray<{ species: string; coef: number }>; products: ReadonlyArray<{ species: string; coef: number }> },
  nameOf: (key: string) => string,
): string {
  const side = (ts: ReadonlyArray<{ species: string; coef: number }>) => (ts.length ? ts.map((t) => term(t.coef, nameOf(t.species))).join(" + ") : "∅");
  return `${side(step.reactants)} ${step.reversible ? "⇌" : "→"} ${side(step.products)}`;
}

export function nameKeyOf(doc: NamedDocument | null | undefined): NameKey {
  const species: NameKey["species"] = {};
  for (const s of doc?.species ?? []) species[s.id] = [s.label?.trim() || s.id, s.formula?.trim() ?? ""];
  const nameOf = (k: string) => species[k]?.[0] ?? k;
  const steps: NameKey["steps"] = {};
  for (const st of doc?.steps ?? []) {
    const reaction = reactionText(st, nameOf);
    steps[st.id] = [st.label?.trim() || reaction, reaction];
  }
  return { species, steps };
}

export interface Names {
  /** The species' name (its key only when the document does not know it). */
  species(key: string): string;
  /** "Name (formula)" when the formula adds something to the name. */
  speciesWithFormula(key: string): string;
  /** The step's label, or its reaction with species names. */
  step(key: string): string;
  /** The step's reaction with species names. */
  reaction(key: string): string;
  /** An engine message with quoted keys ("s12", 'L2') replaced by quoted names. */
  text(message: string): string;
  /** Every species as [key, name, formula], in document order. */
  speciesList(): Array<{ key: string; name: string; formula: string }>;
}

export function namer(key: NameKey | null | undefined): Names {
  const sp = key?.species ?? {};
  const st = key?.steps ?? {};
  const species = (k: string) => sp[k]?.[0] ?? k;
  return {
    species,
    speciesWithFormula: (k) => {
      const [name, formula] = sp[k] ?? [k, ""];
      return formula && formula !== name ? `${name} (${formula})` : name;
    },
    step: (k) => st[k]?.[0] ?? k,
    reaction: (k) => st[k]?.[1] ?? k,
    text: (message) =>
      message.replace(/(["'])([^"'\n]{1,200})\1/g, (whole, _q: string, k: string) => (sp[k] ? `“${sp[k][0]}”` : st[k] ? `“${st[k][0]}”` : whole)),
    speciesList: () => Object.entries(sp).map(([k, [name, formula]]) => ({ key: k, name, formula })),
  };
}

/** Shorthand: names of a document. */
export const namesOf = (doc: NamedDocument | null | undefined): Names => namer(nameKeyOf(doc));
