/** New library step (version 1, draft). */
import { Link, useActionData } from "react-router";
import type { Route } from "./+types/library.new";
import { requireUser } from "~/auth/current-user.server";
import { assertCan } from "~/auth/policy.server";
import { assertCsrf } from "~/auth/csrf.server";
import { getDb } from "../../db/client.server";
import { editorAction, editorSpecies } from "~/components/library/editor-actions.server";
import { loaderFailure } from "~/components/library/route-helpers.server";
import { StepEditor } from "~/components/library/StepEditor";
import { emptyForm, type StepFormState } from "~/components/library/step-form";

export function meta(): Route.MetaDescriptors {
  return [{ title: "New step · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  try {
    assertCan(user, { do: "step.create" }, "Viewers cannot add steps; ask an admin for the author role.");
  } catch (e) {
    loaderFailure(e);
  }
  return { species: await editorSpecies(getDb()), initial: prefilled(new URL(request.url).searchParams) };
}

/**
 * A new step can start from an activation-parameter analysis (/analysis): ΔH‡ (kJ/mol),
 * ΔS‡ (J/(mol·K)), the measured temperature range (K), the standard error of ΔH‡ as the
 * uncertainty, and a method note arrive as query parameters. Anything not a finite
 * number is ignored; the reaction itself is chosen here.
 */
function prefilled(q: URLSearchParams): StepFormState {
  const f = emptyForm();
  if (q.get("from") !== "activation-analysis") return f;
  const n = (key: string) => {
    const v = Number(q.get(key));
    return q.get(key) !== null && q.get(key) !== "" && Number.isFinite(v) ? String(v) : "";
  };
  const text = (key: string, max: number) => (q.get(key) ?? "").slice(0, max);
  return {
    ...f,
    form: "dHdS",
    eu: "kJ/mol",
    su: "J/(mol K)",
    tu: "K",
    dH: n("dH"),
    dS: n("dS"),
    tmin: n("tmin"),
    tmax: n("tmax"),
    unc: n("unc"),
    source: "measured",
    method: text("method", 200),
    notes: text("notes", 2000),
  };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  return editorAction(getDb(), user, form, null);
}

export default function NewStep({ loaderData }: Route.ComponentProps) {
  const result = useActionData<typeof action>();
  const serverErrors = result && "ok" in result && !result.ok ? result : null;
  return (
    <div className="space-y-3">
      <p className="text-sm text-ink-600">
        <Link to="/library" className="hover:underline">
          Library
        </Link>{" "}
        › new step
      </p>
      <h1 className="text-2xl font-semibold tracking-tight">New step</h1>
      <p className="text-sm text-ink-700">It starts as your draft; propose it when it is ready for the curators.</p>
      <StepEditor species={loaderData.species} initial={loaderData.initial} serverErrors={serverErrors} submitLabel="Save draft" />
    </div>
  );
}
