/**
 * Applies a workbench graph edit through the mechanisms data layer: reads the current snapshot,
 * makes the change, and saves it with updateMechanismSteps (based on the version the user edited,
 * so a stale save is a ConflictError and nothing is written). Authorization: mechanism.write
 * through the policy module.
 */
import type { Knex } from "knex";
import { data } from "react-router";
import { assertCan, Forbidden, type Actor } from "~/auth/policy.server";
import { getMechanism, owned, updateMechanismSteps } from "../../db/access/mechanisms.server";
import { ConflictError, InputError, NotFoundError } from "../../db/access/library-errors";
import { entryAsInput } from "~/components/library/step-schema";
import { GraphEditFormSchema, firstIssue } from "~/components/workbench/graph-edit-schema";

export async function applyGraphEdit(db: Knex, actor: Actor, id: number, raw: unknown): Promise<{ version: number }> {
  const parsed = GraphEditFormSchema.safeParse(raw);
  if (!parsed.success) throw new InputError(firstIssue(parsed.error), {});
  const { edit, message, baseVersion } = parsed.data;
  const d = await getMechanism(db, actor, id);
  assertCan(actor, { do: "mechanism.write", object: owned(d.mechanism) }, "Only the owner can change this mechanism; fork it to make your own copy.");
  const steps = d.snapshot.steps.map(entryAsInput);
  const at = (key: string) => {
    const i = d.snapshot.steps.findIndex((e) => e.key === key);
    if (i < 0) throw new InputError(`The step "${key}" is not in the current version; reload the workbench.`, { key: "Unknown step." });
    return i;
  };
  if (edit.op === "add-library") steps.push({ kind: "library", stepVersionId: edit.stepVersionId });
  else if (edit.op === "add-local") steps.push({ kind: "local", step: edit.step });
  else if (edit.op === "set-step") {
    const i = at(edit.key);
    const e = d.snapshot.steps[i];
    const from = e.kind === "library" ? e.stepVersionId : e.fromStepVersionId;
    steps[i] = { kind: "local", key: e.key, step: { ...edit.step, id: e.key }, ...(from ? { fromStepVersionId: from } : {}) };
  } else {
    const i = at(edit.key);
    const offer = d.updates[edit.key];
    if (!offer) throw new InputError("That step has no newer approved version on offer; reload the workbench.", { key: "No update." });
    steps[i] = { kind: "library", key: edit.key, stepVersionId: offer.stepVersionId };
  }
  return updateMechanismSteps(db, actor, d, steps, baseVersion, message);
}

export type GraphEditFailure = { intent: "graph-edit"; ok: false; message: string; fields: Record<string, string>; conflict?: ConflictError["latest"] };

/** Data-layer errors → the workbench action's answer (the page keeps the user's input). */
export function graphEditFailure(e: unknown) {
  const f = (status: number, message: string, extra: Partial<GraphEditFailure> = {}) => data<GraphEditFailure>({ intent: "graph-edit", ok: false, message, fields: {}, ...extra }, { status });
  if (e instanceof InputError) return f(400, e.message, { fields: e.fields });
  if (e instanceof ConflictError) return f(409, e.message, { conflict: e.latest });
  if (e instanceof Forbidden) return f(403, e.message);
  if (e instanceof NotFoundError) return f(404, e.message);
  throw e;
}
