/**
 * Demo library and mechanisms — an INVENTED, ILLUSTRATIVE scenario, not data from any
 * publication or laboratory: a fictional aminopyridine-catalysed acetylation of a series of
 * alcohols by acetic anhydride, with its uncatalysed background, hydrolysis, a ketene side
 * pathway and catalyst sequestration by acetic acid. Barriers are plausible magnitudes
 * chosen for the demo (ΔG‡ 50–110 kJ/mol), marked illustrative in provenance and tags; the
 * catalytic cycle's two steps carry invented reaction free energies (+12 and −45 kJ/mol) so the
 * workbench can show its free-energy profile and energetic span.
 * Formulas balance (checked by tests/library/demo-seed.test.ts).
 *
 * Demo users (db/seeds/demo-identities.ts): author@ owns most steps and two mechanisms,
 * author2@ owns one mechanism and forks author@'s cycle, curator@ approves the library and
 * forks author2@'s side-pathway mechanism.
 */
import type { Knex } from "knex";
import type { Actor } from "../../app/auth/policy.server";
import { speciesKey, type MechanismEntryInput, type StepInput } from "../../app/components/library/step-schema";
import { createSpecies } from "../access/species.server";
import { createStep, editStep, proposeStep, reviewStep, addStepComment } from "../access/steps.server";
import { createMechanism, forkMechanism, updateMechanism, getMechanism } from "../access/mechanisms.server";

const NOTE = "Illustrative demo value, invented for Saddlebook's example scenario; not a measured or published result.";
const CITATION = "Saddlebook illustrative demo set (invented; no publication)";

async function actorOf(db: Knex, email: string): Promise<Actor> {
  const u = await db("users").where({ email }).first("id", "role");
  const groups = await db("memberships").where({ user_id: u.id }).select("group_id", "group_role");
  return {
    id: u.id,
    role: u.role,
    groupIds: groups.map((g: { group_id: number }) => g.group_id),
    adminGroupIds: groups.filter((g: { group_role: string }) => g.group_role === "admin").map((g: { group_id: number }) => g.group_id),
  };
}

const ALCOHOLS: Array<{ key: string; label: string; formula: string; ester: string; esterFormula: string; shift: number }> = [
  { key: "MeOH", label: "methanol", formula: "CH4O", ester: "methyl acetate", esterFormula: "C3H6O2", shift: -3 },
  { key: "EtOH", label: "ethanol", formula: "C2H6O", ester: "ethyl acetate", esterFormula: "C4H8O2", shift: -1 },
  { key: "nBuOH", label: "1-butanol", formula: "C4H10O", ester: "1-butyl acetate", esterFormula: "C6H12O2", shift: 0 },
  { key: "allylOH", label: "allyl alcohol", formula: "C3H6O", ester: "allyl acetate", esterFormula: "C5H8O2", shift: 0.5 },
  { key: "BnOH", label: "benzyl alcohol", formula: "C7H8O", ester: "benzyl acetate", esterFormula: "C9H10O2", shift: 0 },
  { key: "PhEtOH", label: "2-phenylethanol", formula: "C8H10O", ester: "2-phenylethyl acetate", esterFormula: "C10H12O2", shift: 0.8 },
  { key: "iPrOH", label: "2-propanol", formula: "C3H8O", ester: "2-propyl acetate", esterFormula: "C5H10O2", shift: 4 },
  { key: "cHexOH", label: "cyclohexanol", formula: "C6H12O", ester: "cyclohexyl acetate", esterFormula: "C8H14O2", shift: 5 },
  { key: "tBuOH", label: "tert-butanol", formula: "C4H10O", ester: "tert-butyl acetate", esterFormula: "C6H12O2", shift: 11 },
  { key: "PhOH", label: "phenol", formula: "C6H6O", ester: "phenyl acetate", esterFormula: "C8H8O2", shift: 7 },
];

type Term = [string, number?];

export async function seedDemoLibrary(db: Knex): Promise<void> {
  const author = await actorOf(db, "author@saddlebook.test");
  const author2 = await actorOf(db, "author2@saddlebook.test");
  const curator = await actorOf(db, "curator@saddlebook.test");

  // ---------------------------------------------------------------- species
  const sp = new Map<string, number>();
  const addSpecies = async (key: string, label: string, formula: string, notes?: string) => {
    const s = await createSpecies(db, author, { label, formula, phase: "solution", notes: notes ?? "Illustrative demo species." });
    sp.set(key, s.id);
  };
  await addSpecies("Ac2O", "acetic anhydride", "C4H6O3");
  await addSpecies("AcOH", "acetic acid", "C2H4O2");
  await addSpecies("H2O", "water", "H2O");
  await addSpecies("Cat", "Cat-7 (illustrative aminopyridine catalyst)", "C7H10N2", "Invented catalyst label for the demo scenario.");
  await addSpecies("IP", "Cat-7 acetyl ion pair", "C11H16N2O3", "Acylpyridinium acetate ion pair, counted as one neutral species (illustrative).");
  await addSpecies("CatH", "Cat-7·AcOH salt (inactive)", "C9H14N2O2");
  await addSpecies("ketene", "ketene", "C2H2O");
  await addSpecies("diketene", "diketene", "C4H4O2");
  for (const a of ALCOHOLS) {
    await addSpecies(a.key, a.label, a.formula);
    await addSpecies(`${a.key}-ester`, a.ester, a.esterFormula);
  }
  const terms = (ts: Term[]) => ts.map(([k, c]) => ({ speciesId: sp.get(k)!, coef: c ?? 1 }));

  const base = (over: Partial<StepInput> & Pick<StepInput, "reactants" | "products" | "barrier" | "provenance">): StepInput => ({
    reversible: false,
    illustrative: true,
    ...over,
    tags: [...(over.tags ?? []), "illustrative"],
    provenance: { ...over.provenance, citation: over.provenance.citation ?? CITATION, notes: over.provenance.notes ?? NOTE },
  });
  const dft = (solvent: string) => ({ source: "computed" as const, method: `illustrative DFT-style estimate, implicit ${solvent}`, solvent });

  // ---------------------------------------------------------------- steps
  const steps = new Map<string, number>();
  const add = async (name: string, input: StepInput, finalStatus: "approved" | "proposed" | "draft" = "approved") => {
    const r = await createStep(db, author, input);
    steps.set(name, r.stepId);
    if (finalStatus !== "draft") await proposeStep(db, author, r.stepId, "Ready for review (illustrative).");
    if (finalStatus === "approved") await reviewStep(db, curator, r.stepId, { action: "approve", comment: "Consistent with the rest of the illustrative set." });
    return r.stepId;
  };

  await add(
    "ip-form",
    base({
      label: "Catalyst acetylation (ion pair formation)",
      reactants: terms([["Cat"], ["Ac2O"]]),
      products: terms([["IP"]]),
      barrier: { form: "dG", dG: 58.5, unit: "kJ/mol", T: 298.15, standardState: "1M", dH: 41.0 },
      reactionThermo: { form: "dG", dG: 12.0, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      validRange: { Tmin: 273.15, Tmax: 343.15 },
      uncertainty: { value: 4, unit: "kJ/mol" },
      provenance: dft("acetonitrile"),
      tags: ["acylation", "catalysed", "cycle"],
      kappa: 1,
    }),
  );
  await add(
    "ip-form-kcal",
    base({
      label: "Catalyst acetylation, kcal/mol entry",
      reactants: terms([["Cat"], ["Ac2O"]]),
      products: terms([["IP"]]),
      barrier: { form: "dG", dG: 14.6, unit: "kcal/mol", T: 298.15, standardState: "1bar" },
      validRange: { Tmin: 280, Tmax: 330 },
      provenance: { ...dft("dichloromethane"), method: "illustrative DFT-style estimate (gas-phase standard state)" },
      tags: ["acylation", "catalysed", "standard-state"],
      display: { energyUnit: "kcal/mol" },
    }),
  );
  await add(
    "ip-hydrolysis",
    base({
      label: "Ion pair hydrolysis",
      reactants: terms([["IP"], ["H2O"]]),
      products: terms([["Cat"], ["AcOH", 2]]),
      barrier: { form: "dHdS", dH: 52.0, dS: -95, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M" },
      validRange: { Tmin: 278, Tmax: 353 },
      provenance: { source: "estimated", method: "illustrative analogy to acyl-transfer barriers" },
      tags: ["hydrolysis", "side-reaction", "water"],
    }),
  );
  await add(
    "ac2o-hydrolysis",
    base({
      label: "Anhydride hydrolysis (uncatalysed)",
      reactants: terms([["Ac2O"], ["H2O"]]),
      products: terms([["AcOH", 2]]),
      barrier: { form: "thermal", Ea: 66.0, dS: -140, dn: -1, unit: "kJ/mol", entropyUnit: "J/(mol K)", standardState: "1M", T: 298.15 },
      validRange: { Tmin: 288, Tmax: 338 },
      uncertainty: { value: 2.5, unit: "kJ/mol" },
      provenance: { source: "measured", method: "illustrative in-situ IR rate series (invented)", solvent: "acetonitrile/water" },
      tags: ["hydrolysis", "water", "background"],
    }),
  );
  await add(
    "ac2o-hydrolysis-arr",
    base({
      label: "Anhydride hydrolysis, Arrhenius fit",
      reactants: terms([["Ac2O"], ["H2O"]]),
      products: terms([["AcOH", 2]]),
      barrier: { form: "arrhenius", A: 2.4e6, rateUnit: { concentration: "mol/L", time: "s" }, Ea: 64.0, unit: "kJ/mol" },
      validRange: { Tmin: 293, Tmax: 333 },
      provenance: { source: "literature", method: "illustrative Arrhenius parameters", doi: "10.0000/illustrative.demo.1" },
      tags: ["hydrolysis", "water", "arrhenius"],
    }),
  );
  await add(
    "ketene-form",
    base({
      label: "Anhydride fragmentation to ketene",
      reactants: terms([["Ac2O"]]),
      products: terms([["ketene"], ["AcOH"]]),
      barrier: { form: "dG", dG: 108.0, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      validRange: { Tmin: 298, Tmax: 423 },
      imaginaryFrequency: 1450,
      provenance: dft("toluene"),
      tags: ["ketene", "side-reaction", "thermal"],
    }),
  );
  await add(
    "cat-salt",
    base({
      label: "Catalyst sequestration by acetic acid",
      reactants: terms([["Cat"], ["AcOH"]]),
      products: terms([["CatH"]]),
      reversible: true,
      reactionThermo: { form: "dG", dG: -8.0, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      barrier: { form: "dG", dG: 52.0, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      provenance: { source: "estimated", method: "illustrative proton-transfer estimate" },
      tags: ["catalyst-deactivation", "acid-base", "reversible"],
    }),
  );
  await add(
    "ip-form-measured",
    base({
      label: "Catalyst acetylation, measured k",
      reactants: terms([["Cat"], ["Ac2O"]]),
      products: terms([["IP"]]),
      barrier: { form: "measured", k: 0.85, rateUnit: { concentration: "mol/L", time: "s" }, T: 298.15, Ea: 43, unit: "kJ/mol" },
      validRange: { Tmin: 288, Tmax: 318 },
      provenance: { source: "measured", method: "illustrative stopped-flow UV-vis series (invented)", solvent: "acetonitrile" },
      tags: ["acylation", "catalysed", "kinetics-measured"],
    }),
    "proposed",
  );

  for (const a of ALCOHOLS) {
    const statusOf = a.key === "PhOH" ? "proposed" : a.key === "allylOH" ? "draft" : "approved";
    await add(
      `cat-${a.key}`,
      base({
        label: `Acyl transfer to ${a.label} (catalysed)`,
        reactants: terms([["IP"], [a.key]]),
        products: terms([[`${a.key}-ester`], ["Cat"], ["AcOH"]]),
        barrier: { form: "dG", dG: Number((66 + a.shift).toFixed(1)), unit: "kJ/mol", T: 298.15, standardState: "1M", dH: Number((44 + a.shift).toFixed(1)) },
        reactionThermo: { form: "dG", dG: -45.0, unit: "kJ/mol", T: 298.15, standardState: "1M" },
        validRange: { Tmin: 273.15, Tmax: 343.15 },
        uncertainty: { value: 5, unit: "kJ/mol" },
        provenance: dft("acetonitrile"),
        tags: ["acylation", "catalysed", "cycle", a.key],
      }),
      statusOf,
    );
    await add(
      `bg-${a.key}`,
      base({
        label: `Background acetylation of ${a.label}`,
        reactants: terms([["Ac2O"], [a.key]]),
        products: terms([[`${a.key}-ester`], ["AcOH"]]),
        barrier: { form: "dG", dG: Number((92 + a.shift).toFixed(1)), unit: "kJ/mol", T: 298.15, standardState: "1M" },
        validRange: { Tmin: 293.15, Tmax: 373.15 },
        provenance: { source: "estimated", method: "illustrative linear free-energy estimate" },
        tags: ["acylation", "background", a.key],
      }),
    );
    await add(
      `ket-${a.key}`,
      base({
        label: `Ketene trapping by ${a.label}`,
        reactants: terms([["ketene"], [a.key]]),
        products: terms([[`${a.key}-ester`]]),
        barrier: { form: "dG", dG: Number((55 + a.shift / 2).toFixed(1)), unit: "kJ/mol", T: 298.15, standardState: "1M" },
        validRange: { Tmin: 273.15, Tmax: 423.15 },
        provenance: dft("toluene"),
        tags: ["ketene", "side-reaction", a.key],
      }),
    );
  }

  // A step deprecated in favour of a better one, and a newer approved version of a pinned step.
  const old = await add(
    "bg-BnOH-old",
    base({
      label: "Background acetylation of benzyl alcohol (early estimate)",
      reactants: terms([["Ac2O"], ["BnOH"]]),
      products: terms([["BnOH-ester"], ["AcOH"]]),
      barrier: { form: "dG", dG: 99.0, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      provenance: { source: "estimated", method: "illustrative rough estimate" },
      tags: ["acylation", "background", "BnOH"],
    }),
  );
  await reviewStep(db, curator, old, { action: "deprecate", comment: "Superseded by the LFER estimate.", replacementStepId: steps.get("bg-BnOH")! });
  await addStepComment(db, curator, steps.get("cat-BnOH")!, { body: "Illustrative value; the fork by Teodor tries a lower barrier." });

  // ---------------------------------------------------------------- mechanisms
  const versionIdOf = async (name: string) => (await db("steps").where({ id: steps.get(name)! }).first("current_version_id")).current_version_id as number;
  const lib = async (name: string) => ({ kind: "library" as const, stepVersionId: await versionIdOf(name) });

  const cycle = await createMechanism(
    db,
    author,
    {
      name: "Illustrative acetylation cycle — benzyl alcohol",
      description: "Invented demo: Cat-7 catalysed acetylation of benzyl alcohol with its background, hydrolysis and catalyst sequestration.",
      visibility: "group",
      steps: [await lib("ip-form"), await lib("cat-BnOH"), await lib("bg-BnOH"), await lib("ip-hydrolysis"), await lib("ac2o-hydrolysis"), await lib("cat-salt")],
      // In the workbench's preset format ({name, draft}: the conditions form's fields as typed,
      // initial concentrations by the mechanism's species keys s<id>).
      conditionPresets: [
        {
          name: "bench, 25 °C",
          draft: {
            mode: "isothermal",
            T: "25",
            TUnit: "°C",
            initial: Object.fromEntries(
              ([["Ac2O", "1.2"], ["BnOH", "1.0"], ["Cat", "0.05"], ["H2O", "0.01"]] as const).map(([k, v]) => [speciesKey(sp.get(k)!), { value: v, unit: "mol/L" }]),
            ),
            endTime: "2",
            endUnit: "h",
          },
        },
      ],
      message: "First assembly of the illustrative cycle.",
    },
    { illustrative: true },
  );
  await createMechanism(
    db,
    author,
    {
      name: "Illustrative background acetylation — alcohol series",
      description: "Invented demo: uncatalysed acetylation of five alcohols, for comparing rates.",
      visibility: "public",
      steps: await Promise.all(["MeOH", "EtOH", "nBuOH", "iPrOH", "tBuOH"].map((k) => lib(`bg-${k}`))),
      message: "Five alcohols.",
    },
    { illustrative: true },
  );
  const ketene = await createMechanism(
    db,
    author2,
    {
      name: "Illustrative ketene side pathway",
      description: "Invented demo: ketene formation at elevated temperature and its trapping.",
      visibility: "group",
      steps: [
        await lib("ketene-form"),
        await lib("ket-BnOH"),
        await lib("ket-EtOH"),
        {
          kind: "local",
          key: "ketene-dimer",
          step: {
            id: "ketene-dimer",
            label: "Ketene dimerisation (local, illustrative)",
            reactants: [{ species: `s${sp.get("ketene")}`, coef: 2 }],
            products: [{ species: `s${sp.get("diketene")}`, coef: 1 }],
            reversible: false,
            barrier: { form: "dG", dG: 75, unit: "kJ/mol", T: 298.15, standardState: "1M" },
            provenance: { source: "estimated", method: "illustrative placeholder", notes: NOTE },
            tags: ["illustrative"],
          },
        },
      ],
      message: "Side pathway with a local dimerisation placeholder.",
    },
    { illustrative: true },
  );

  // A newer approved version of a step the cycle pins (the cycle is offered the update).
  const catBn = steps.get("cat-BnOH")!;
  const cur = (await db("steps").where({ id: catBn }).first("current_version_number")).current_version_number as number;
  const v = await db("step_versions").where({ step_id: catBn, number: cur }).first("content");
  const content = typeof v.content === "string" ? JSON.parse(v.content) : v.content;
  await editStep(db, curator, catBn, {
    ...base({
      label: "Acyl transfer to benzyl alcohol (catalysed)",
      reactants: terms([["IP"], ["BnOH"]]),
      products: terms([["BnOH-ester"], ["Cat"], ["AcOH"]]),
      barrier: { ...content.barrier, dG: 64.5 },
      validRange: { Tmin: 273.15, Tmax: 343.15 },
      uncertainty: { value: 3, unit: "kJ/mol" },
      provenance: { ...dft("acetonitrile"), method: "illustrative DFT-style estimate, implicit acetonitrile, refined conformer search" },
      tags: ["acylation", "catalysed", "cycle", "BnOH"],
    }),
    baseVersion: cur,
    message: "Refined conformer search lowers ΔG‡ by 1.5 kJ/mol (illustrative).",
  });

  // Forks by different people.
  const fork1 = await forkMechanism(db, author2, cycle.id, { name: "Cycle with faster acyl transfer (Teodor's fork)" });
  const f1 = await getMechanism(db, author2, fork1.id);
  const f1Steps: MechanismEntryInput[] = f1.snapshot.steps.map((e): MechanismEntryInput => {
    if (e.kind === "library" && e.stepId === catBn) {
      const doc = f1.resolved.steps.find((r) => r.key === e.key)!.doc;
      return { kind: "local" as const, key: e.key, fromStepVersionId: e.stepVersionId, step: { ...doc, label: "Acyl transfer to benzyl alcohol (local: lower barrier)", barrier: { ...doc.barrier, dG: 61.0 } as typeof doc.barrier } };
    }
    return e.kind === "library" ? { kind: "library" as const, key: e.key, stepVersionId: e.stepVersionId } : { kind: "local" as const, key: e.key, step: e.step };
  });
  f1Steps.push(await lib("ketene-form"));
  await updateMechanism(db, author2, fork1.id, {
    name: f1.mechanism.name,
    visibility: "group",
    species: f1.snapshot.species.map((s) => ({ key: s.key, speciesId: s.speciesId })),
    steps: f1Steps,
    baseVersion: f1.mechanism.current_version,
    message: "Lower acyl-transfer barrier (61 kJ/mol) and the ketene pathway.",
  });

  const fork2 = await forkMechanism(db, curator, ketene.id, { name: "Ketene pathway without dimerisation (curator's fork)" });
  const f2 = await getMechanism(db, curator, fork2.id);
  await updateMechanism(db, curator, fork2.id, {
    name: f2.mechanism.name,
    visibility: "group",
    species: f2.snapshot.species.map((s) => ({ key: s.key, speciesId: s.speciesId })),
    steps: f2.snapshot.steps
      .filter((e) => e.key !== "ketene-dimer")
      .map((e) => (e.kind === "library" ? { kind: "library" as const, key: e.key, stepVersionId: e.stepVersionId } : { kind: "local" as const, key: e.key, step: e.step })),
    baseVersion: f2.mechanism.current_version,
    message: "Dropped the dimerisation placeholder.",
  });
}
