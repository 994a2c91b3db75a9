/** Shared loader/action parts of the step editor pages (new step, edit step). */
import { redirect } from "react-router";
import type { Knex } from "knex";
import type { Actor } from "~/auth/policy.server";
import { createSpecies } from "../../../db/access/species.server";
import { createStep, editStep } from "../../../db/access/steps.server";
import { InputError } from "../../../db/access/library-errors";
import { actionFailure } from "./route-helpers.server";

export async function editorSpecies(db: Knex): Promise<Array<{ id: number; label: string; formula: string | null }>> {
  return db("species").select("id", "label", "formula").orderBy("label").limit(3000);
}

/** intent=species from a form: label and optional formula → the new species and a sentence saying so (throws InputError when refused). */
export async function speciesFromForm(db: Knex, actor: Actor, form: FormData) {
  const formula = String(form.get("formula") ?? "").trim();
  const s = await createSpecies(db, actor, { label: String(form.get("label") ?? ""), ...(formula ? { formula } : {}) });
  return { ok: true as const, message: `Added ${s.label}${s.formula ? ` (${s.formula})` : ""}.`, fields: {}, species: { id: s.id, label: s.label, formula: s.formula ?? null } };
}

/** intent=species adds a species (fetcher); intent=save creates a step or a new version and redirects to it. */
export async function editorAction(db: Knex, actor: Actor, form: FormData, stepId: number | null) {
  try {
    if (form.get("intent") === "species") return await speciesFromForm(db, actor, form);
    const raw = String(form.get("payload") ?? "");
    let input: unknown;
    try {
      input = JSON.parse(raw);
    } catch {
      throw new InputError("The form could not be read; check the highlighted fields.", { body: "The barrier is incomplete." });
    }
    if (stepId === null) {
      const r = await createStep(db, actor, input);
      return redirect(`/steps/${r.stepId}`);
    }
    await editStep(db, actor, stepId, input);
    return redirect(`/steps/${stepId}`);
  } catch (e) {
    return actionFailure(e);
  }
}
