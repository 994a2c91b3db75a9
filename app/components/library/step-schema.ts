/**
 * Input schemas of the step library and mechanisms, shared by the browser (forms) and the
 * server (actions, REST API, data layer). Barrier values arrive in the user's units with
 * the units named (Saddlebook exchange format, solver/exchange-format.ts); the data layer
 * converts them to SI-molar units and keeps the units for display.
 *
 * Species in steps are referred to as "s<id>" (species table id).
 */
import { z } from "zod";
import {
  BarrierSchema,
  EnergyUnitSchema,
  EntropyUnitSchema,
  ProvenanceSchema,
  ReactionThermoSchema,
  StandardStateSchema,
  StepSchema,
} from "../../../solver/exchange-format";
import { LayoutSchema, SmallJsonObject } from "../workbench/layout-schema";
import { MAX_COEF } from "../../../solver/barrier-forms";

export const STEP_STATUSES = ["draft", "proposed", "approved", "deprecated"] as const;
export type StepStatus = (typeof STEP_STATUSES)[number];
export const SOURCE_TYPES = ["computed", "measured", "estimated", "literature"] as const;
export type SourceType = (typeof SOURCE_TYPES)[number];
export const VISIBILITIES = ["private", "group", "public"] as const;
export type Visibility = (typeof VISIBILITIES)[number];

/** Species key used inside step content: "s" + species id. */
export const speciesKey = (id: number): string => `s${id}`;
export const speciesIdOfKey = (key: string): number | null => {
  const m = /^s(\d+)$/.exec(key);
  return m ? Number(m[1]) : null;
};

const SpeciesRef = z.strictObject({
  speciesId: z.int().positive().meta({ description: "Id of a species in the library's species table." }),
  coef: z
    .number()
    .positive("A stoichiometric coefficient must be positive.")
    .max(MAX_COEF, `A stoichiometric coefficient must be at most ${MAX_COEF}.`)
    .meta({ description: "Stoichiometric coefficient; fractional values are allowed (a reactant's coefficient is its order in the rate law)." }),
});

/** The fields of a library step as entered (StepInputSchema adds the cross-field checks). */
const stepFields = z
  .strictObject({
    label: z.string().trim().max(500).optional().meta({ description: "Short display name of the step." }),
    reactants: z
      .array(SpeciesRef)
      .max(3, "At most three reactants (termolecular).")
      .meta({ description: "Reactants; none for a zero-order source. A species may also be a product (autocatalysis)." }),
    products: z.array(SpeciesRef).max(20).meta({ description: "Products; none for a sink." }),
    reversible: z.boolean().default(false),
    barrier: BarrierSchema,
    reactionThermo: ReactionThermoSchema.optional(),
    kappa: z.number().positive().max(1000).optional().meta({ description: "Transmission coefficient κ; default 1." }),
    imaginaryFrequency: z.number().positive().max(10000).optional().meta({ description: "|ν‡| in cm⁻¹, for the Wigner correction." }),
    reportStandardState: StandardStateSchema.optional(),
    validRange: z
      .strictObject({ Tmin: z.number().positive(), Tmax: z.number().positive() })
      .refine((r) => r.Tmin < r.Tmax, { message: "Tmin must be below Tmax.", path: ["Tmax"] })
      .optional()
      .meta({ description: "Validity range in K." }),
    uncertainty: z.strictObject({ value: z.number().nonnegative(), unit: EnergyUnitSchema }).optional(),
    provenance: ProvenanceSchema,
    tags: z.array(z.string().trim().min(1).max(100)).max(50).optional(),
    display: z
      .strictObject({
        energyUnit: EnergyUnitSchema.optional(),
        entropyUnit: EntropyUnitSchema.optional(),
        temperatureUnit: z.enum(["K", "C"]).optional(),
      })
      .optional()
      .meta({ description: "Units the step is shown in (values are stored in SI)." }),
    illustrative: z.boolean().optional(),
    message: z.string().trim().max(1000).optional().meta({ description: "What changed, for the version history." }),
  });

/**
 * A step needs a species on one side at least; a source or a sink cannot be reversible. Runs
 * also when other fields have problems (as long as both sides are lists), so the form shows
 * every problem at once.
 */
const sidesAreLists = {
  when: (p: { value: unknown }) => {
    const v = p.value as { reactants?: unknown; products?: unknown } | null;
    return !!v && Array.isArray(v.reactants) && Array.isArray(v.products);
  },
};
function checkSides(v: { reactants: unknown[]; products: unknown[]; reversible?: boolean }, ctx: z.RefinementCtx): void {
  if (v.reactants.length === 0 && v.products.length === 0) {
    ctx.addIssue({ code: "custom", path: ["reactants"], message: "A step needs at least one reactant or one product." });
  } else if (v.reversible && (v.reactants.length === 0 || v.products.length === 0)) {
    ctx.addIssue({ code: "custom", path: ["reversible"], message: "A source (no reactants) or a sink (no products) cannot be reversible; enter any return flow as a step of its own." });
  }
}

/** A new library step or a new version of one. */
export const StepInputSchema = stepFields
  .superRefine(checkSides, sidesAreLists)
  .meta({ id: "StepInput", description: "A library step as entered, values in the units named beside them." });
export type StepInput = z.input<typeof StepInputSchema>;
export type StepInputParsed = z.output<typeof StepInputSchema>;

export const StepEditSchema = stepFields
  .extend({
    baseVersion: z.int().positive().meta({ description: "Version number the edit was based on (409 when stale)." }),
  })
  .superRefine(checkSides, sidesAreLists)
  .meta({ id: "StepEdit" });

export const ReviewSchema = z
  .strictObject({
    action: z.enum(["approve", "request_changes", "deprecate"]),
    comment: z.string().trim().max(10000).optional(),
    replacementStepId: z.int().positive().optional(),
  })
  .refine((r) => r.action !== "request_changes" || (r.comment ?? "").length > 0, { message: "Say what should change.", path: ["comment"] })
  .meta({ id: "Review" });

export const CommentSchema = z.strictObject({ body: z.string().trim().min(1, "Write a comment first.").max(10000) }).meta({ id: "Comment" });

export const SpeciesInputSchema = z
  .strictObject({
    label: z.string().trim().min(1, "Give the species a label.").max(500),
    formula: z.string().trim().max(200).optional(),
    charge: z.int().min(-20).max(20).optional(),
    phase: z.enum(["solution", "gas", "solid", "liquid"]).optional(),
    notes: z.string().max(10000).optional(),
  })
  .meta({ id: "SpeciesInput" });
export type SpeciesInput = z.infer<typeof SpeciesInputSchema>;

/** One step of a mechanism: a library step pinned to a version, or a local step. */
export const MechanismEntryInputSchema = z.discriminatedUnion("kind", [
  z.strictObject({
    kind: z.literal("library"),
    key: z.string().min(1).max(200).optional(),
    stepVersionId: z.int().positive().meta({ description: "The library step version the entry is pinned to." }),
  }),
  z.strictObject({
    kind: z.literal("local"),
    key: z.string().min(1).max(200).optional(),
    step: StepSchema.meta({ description: "Exchange-format step; species ids are mechanism species keys." }),
    fromStepVersionId: z.int().positive().optional(),
  }),
]);
export type MechanismEntryInput = z.infer<typeof MechanismEntryInputSchema>;

/**
 * An entry of a mechanism written back into an update as it stands: the same library pin, or
 * the same local step with the library version it came from (editor entries and stored
 * snapshot entries alike).
 */
export function entryAsInput(e: {
  key: string;
  kind: "library" | "local";
  stepVersionId?: number;
  step?: Extract<MechanismEntryInput, { kind: "local" }>["step"];
  fromStepVersionId?: number;
}): MechanismEntryInput {
  return e.kind === "library"
    ? { kind: "library", key: e.key, stepVersionId: e.stepVersionId! }
    : { kind: "local", key: e.key, step: e.step!, ...(e.fromStepVersionId ? { fromStepVersionId: e.fromStepVersionId } : {}) };
}

export const MechanismSpeciesInputSchema = z.strictObject({
  key: z.string().min(1).max(200).optional().meta({ description: "Id used by the mechanism's local steps; default s<speciesId>." }),
  speciesId: z.int().positive(),
});

const mechanismFields = {
  name: z.string().trim().min(1, "Give the mechanism a name.").max(300),
  description: z.string().max(20000).optional(),
  visibility: z.enum(VISIBILITIES).default("private"),
  groupId: z.int().positive().nullable().optional(),
  species: z.array(MechanismSpeciesInputSchema).max(5000).default([]),
  steps: z.array(MechanismEntryInputSchema).max(20000).default([]),
  layout: LayoutSchema.nullable().optional(),
  conditionPresets: z.array(SmallJsonObject).max(100).nullable().optional(),
  message: z.string().trim().max(1000).optional(),
};

export const MechanismCreateSchema = z.strictObject(mechanismFields).meta({ id: "MechanismCreate" });
export type MechanismCreate = z.input<typeof MechanismCreateSchema>;

export const MechanismUpdateSchema = z
  .strictObject({
    ...mechanismFields,
    message: z.string().trim().min(1, "Say what changed.").max(1000),
    baseVersion: z.int().min(0).meta({ description: "The version the edit was based on; a stale one gets 409." }),
  })
  .meta({ id: "MechanismUpdate" });
export type MechanismUpdate = z.input<typeof MechanismUpdateSchema>;

export const ForkSchema = z
  .strictObject({
    name: z.string().trim().min(1).max(300).optional(),
    version: z.int().positive().optional().meta({ description: "Parent version to fork; default its current version." }),
  })
  .meta({ id: "Fork" });

/** Turns zod issues into a field → message map (first message per field). */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const iss of error.issues) {
    const path = iss.path.map((p) => (typeof p === "number" ? `[${p}]` : `.${String(p)}`)).join("").replace(/^\./, "") || "body";
    if (iss.code === "unrecognized_keys") {
      for (const k of iss.keys) out[path === "body" ? k : `${path}.${k}`] ??= `Unknown field "${k}".`;
    } else out[path] ??= iss.message;
  }
  return out;
}
