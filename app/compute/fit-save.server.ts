/**
 * "Save as new step versions": each fitted barrier of a fit made on a stored mechanism becomes a
 * new version of its library step (the steps data layer's editStep, one transaction per step),
 * with the fitted barrier in the step's own form, the standard error as its uncertainty and
 * provenance "fitted to dataset …". Steps that are local to the mechanism, or whose library step
 * has moved on since the pinned version the fit used, are reported and left alone.
 */
import type { Knex } from "knex";
import type { Actor } from "~/auth/policy.server";
import { getVersionSnapshot } from "../../db/access/mechanisms.server";
import { editStep, getStepRow, getStepVersionById } from "../../db/access/steps.server";
import { ConflictError, InputError, NotFoundError } from "../../db/access/library-errors";
import type { FitRecord } from "../../db/access/fits.server";

export interface SaveOutcome {
  stepId: string;
  saved: boolean;
  message: string;
  libraryStepId?: number;
  version?: number;
}

const J_PER: Record<string, number> = { "kJ/mol": 1e3, "kcal/mol": 4184, "J/mol": 1, eV: 96485.33212, "cm-1": 11.96265656, hartree: 2625499.6395 };

export async function saveFitAsStepVersions(db: Knex, actor: Actor, fit: FitRecord, datasetName: string): Promise<SaveOutcome[]> {
  if (fit.mechanismId === null || fit.mechanismVersion === null) {
    return fit.fitted.map((p) => ({ stepId: p.stepId, saved: false, message: "The model run was not made from a stored mechanism, so there is no library step to version." }));
  }
  const { snapshot } = await getVersionSnapshot(db, fit.mechanismId, fit.mechanismVersion);
  const out: SaveOutcome[] = [];
  for (const p of fit.fitted) {
    const entry = snapshot.steps.find((e) => e.key === p.stepId);
    if (!entry || entry.kind !== "library") {
      out.push({ stepId: p.stepId, saved: false, message: "A local step of the mechanism: change its barrier in the mechanism editor." });
      continue;
    }
    try {
      const s = await getStepRow(db, entry.stepId);
      if (!s) throw new NotFoundError("No such step.");
      if (s.current_version_id !== entry.stepVersionId) {
        out.push({ stepId: p.stepId, saved: false, message: `The library step has a newer version (${s.current_version_number}) than the one fitted; fit again against it.` });
        continue;
      }
      const v = await getStepVersionById(db, entry.stepVersionId);
      if (!v) throw new NotFoundError("No such step version.");
      const terms = await db("step_version_terms").where({ step_version_id: v.id }).orderBy(["side", "position"]).select("side", "species_id", "coef");
      const c = v.content;
      const unit = "unit" in p.fittedStep.barrier && p.fittedStep.barrier.unit ? p.fittedStep.barrier.unit : "kJ/mol";
      const note = `Barrier fitted to dataset “${datasetName}” (Saddlebook fit #${fit.id}, least squares): shift ${(p.shift / 1000).toFixed(3)} ± ${(p.se / 1000).toFixed(3)} kJ/mol (SE).`;
      const input = {
        label: c.label ?? v.label ?? undefined,
        reactants: terms.filter((t) => t.side === "r").map((t) => ({ speciesId: t.species_id, coef: t.coef })),
        products: terms.filter((t) => t.side === "p").map((t) => ({ speciesId: t.species_id, coef: t.coef })),
        reversible: c.reversible,
        barrier: p.fittedStep.barrier,
        ...(c.reactionThermo ? { reactionThermo: c.reactionThermo } : {}),
        ...(c.kappa !== undefined ? { kappa: c.kappa } : {}),
        ...(c.imaginaryFrequency ? { imaginaryFrequency: c.imaginaryFrequency.value } : {}),
        ...(c.reportStandardState ? { reportStandardState: c.reportStandardState } : {}),
        ...(c.validRange ? { validRange: c.validRange } : {}),
        uncertainty: { value: Number((p.se / (J_PER[unit] ?? 1e3)).toPrecision(4)), unit },
        provenance: { ...(c.provenance ?? {}), source: "measured" as const, method: `Fitted to measured concentration–time data (dataset “${datasetName}”)`, notes: note },
        ...(c.tags ? { tags: c.tags } : {}),
        baseVersion: s.current_version_number,
        message: note,
      };
      const r = await editStep(db, actor, entry.stepId, input);
      out.push({ stepId: p.stepId, saved: true, message: `Saved as version ${r.version} of library step ${entry.stepId}.`, libraryStepId: entry.stepId, version: r.version });
    } catch (e) {
      if (e instanceof InputError || e instanceof ConflictError || e instanceof NotFoundError) out.push({ stepId: p.stepId, saved: false, message: e.message });
      else if (e instanceof Error && "signedIn" in e) out.push({ stepId: p.stepId, saved: false, message: e.message });
      else throw e;
    }
  }
  return out;
}
