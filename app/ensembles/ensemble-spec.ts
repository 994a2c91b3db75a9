/**
 * What an ensemble asks for (the JSON body of POST /api/v1/ensembles, stored with the ensemble):
 * the mechanism, base conditions and solver settings (the stored-run schemas of
 * app/compute/run-request.ts), then either a sweep of one or two parameters or an uncertainty
 * propagation, and the observables (conversion, yields, selectivity) at chosen times.
 * Shared by the API, the form (client) and the workers; no server-only imports.
 */
import { z } from "zod";
import { EnergyUnitSchema } from "../../solver/exchange-format";
import { ENSEMBLE_MAX_MEMBERS } from "../../solver/ensemble";
import { CONC_UNITS, ConditionsSchema, SolverSettingsSchema, TEMPERATURE_UNITS, TIME_UNITS } from "../compute/run-request";

const Energy = z.strictObject({ value: z.number().finite(), unit: EnergyUnitSchema });
const NonNegEnergy = z.strictObject({ value: z.number().nonnegative("must be 0 or more"), unit: EnergyUnitSchema });
const Temperature = z.strictObject({ value: z.number().finite(), unit: z.enum(TEMPERATURE_UNITS) });
const Concentration = z.strictObject({ value: z.number().nonnegative("must be 0 or more"), unit: z.enum(CONC_UNITS) });
const Points = z.int().min(1).max(ENSEMBLE_MAX_MEMBERS);
const Grid = z.enum(["linear", "log"]);
const Id = z.string().min(1).max(200);

export const SweepAxisSchema = z.discriminatedUnion("parameter", [
  z.strictObject({ parameter: z.literal("temperature"), from: Temperature, to: Temperature, points: Points, grid: Grid }),
  z.strictObject({ parameter: z.literal("initial"), species: Id, from: Concentration, to: Concentration, points: Points, grid: Grid }),
  z.strictObject({ parameter: z.literal("barrier"), step: Id, from: Energy, to: Energy, points: Points, grid: Grid }),
]);
export type SweepAxisSpec = z.infer<typeof SweepAxisSchema>;

export const UncertaintySchema = z.strictObject({
  samples: z.int().min(2).max(ENSEMBLE_MAX_MEMBERS, `must be at most ${ENSEMBLE_MAX_MEMBERS}`),
  sampler: z.enum(["monte-carlo", "latin-hypercube"]),
  /** Same seed, same samples. */
  seed: z.int().min(0).max(4294967295),
  /** σ of a barrier for steps whose library entry has no uncertainty. */
  defaultSigma: NonNegEnergy,
  /** σ by step id, overriding the stored uncertainty. */
  sigma: z.record(Id, NonNegEnergy).optional(),
  /** Correlation ρ (0–1) of the errors of steps computed by one method (the step's provenance method). */
  correlation: z.record(z.string().max(1000), z.number().min(0, "must be 0 to 1").max(1, "must be 0 to 1")).optional(),
  /** σ of the temperature (isothermal conditions only). */
  temperatureSigma: z.strictObject({ value: z.number().nonnegative("must be 0 or more"), unit: z.literal("K") }).optional(),
});
export type UncertaintySpec = z.infer<typeof UncertaintySchema>;

export const ObservablesSchema = z.strictObject({
  /** Conversion of this reactant; yields refer to its initial concentration. */
  reactant: Id,
  /** Yields of these products. */
  products: z.array(Id).max(10).default([]),
  /** Selectivity first/(first + second). */
  selectivity: z.tuple([Id, Id]).optional(),
  /** Times at which histograms and sensitivities are reported. */
  times: z.array(z.strictObject({ value: z.number().positive("must be after 0"), unit: z.enum(TIME_UNITS) })).min(1).max(8),
});

export const EnsembleSpecSchema = z
  .strictObject({
    name: z.string().max(300).optional(),
    mechanismId: z.int().positive(),
    mechanismVersion: z.int().positive().optional(),
    conditions: ConditionsSchema,
    solver: SolverSettingsSchema.optional(),
    mode: z.enum(["sweep", "uncertainty"]),
    sweep: z.array(SweepAxisSchema).min(1).max(2).optional(),
    uncertainty: UncertaintySchema.optional(),
    observables: ObservablesSchema,
  })
  .superRefine((s, ctx) => {
    if (s.mode === "sweep" && !s.sweep) ctx.addIssue({ code: "custom", path: ["sweep"], message: "A sweep needs one or two parameters." });
    if (s.mode === "uncertainty" && !s.uncertainty) ctx.addIssue({ code: "custom", path: ["uncertainty"], message: "An uncertainty ensemble needs its sampling settings." });
    if (s.sweep && s.sweep.reduce((n, a) => n * a.points, 1) > ENSEMBLE_MAX_MEMBERS) {
      ctx.addIssue({ code: "custom", path: ["sweep"], message: `The sweep would have more than ${ENSEMBLE_MAX_MEMBERS} members.` });
    }
  });
export type EnsembleSpec = z.infer<typeof EnsembleSpecSchema>;
export type EnsembleSpecInput = z.input<typeof EnsembleSpecSchema>;
