/**
 * Edits made from the workbench graph (browser and server share this zod schema):
 * add a library step pinned to a version, add a local step, set a step's kinetics (a pinned
 * library step becomes a local edit that remembers the version it came from), or move a pinned
 * step to its newer approved version. Every edit is saved as a new mechanism version with a
 * message, based on the version the user saw (a stale base is refused with 409).
 */
import { z } from "zod";
import { StepSchema } from "../../../solver/exchange-format";

export const GraphEditSchema = z.discriminatedUnion("op", [
  z.strictObject({ op: z.literal("add-library"), stepVersionId: z.int().positive() }),
  z.strictObject({ op: z.literal("add-local"), step: StepSchema }),
  z.strictObject({ op: z.literal("set-step"), key: z.string().min(1).max(200), step: StepSchema }),
  z.strictObject({ op: z.literal("use-update"), key: z.string().min(1).max(200) }),
]);
export type GraphEdit = z.infer<typeof GraphEditSchema>;

export const GraphEditFormSchema = z.strictObject({
  edit: GraphEditSchema,
  message: z.string().trim().min(1, "Say what changed.").max(1000, "Keep the message under 1000 characters."),
  baseVersion: z.int().min(1),
});
export type GraphEditForm = z.infer<typeof GraphEditFormSchema>;

/** First issue as one sentence, with the field it concerns. */
export function firstIssue(error: z.ZodError): string {
  const i = error.issues[0];
  const path = i.path.join(".");
  return path ? `${path}: ${i.message}` : i.message;
}
