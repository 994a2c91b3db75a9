/** Edit a library step: saves a new version based on the one shown (a stale base is refused). */
import { Link, useActionData } from "react-router";
import type { Route } from "./+types/steps.$id.edit";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { getDb } from "../../db/client.server";
import { getStep } from "../../db/access/steps.server";
import { editorAction, editorSpecies } from "~/components/library/editor-actions.server";
import { loaderFailure, routeId } from "~/components/library/route-helpers.server";
import { StepEditor } from "~/components/library/StepEditor";
import { formFromContent } from "~/components/library/step-form";
import { data } from "react-router";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Edit step · Saddlebook" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const id = routeId(params.id);
  const db = getDb();
  let d;
  try {
    d = await getStep(db, user, id);
  } catch (e) {
    loaderFailure(e);
  }
  if (!d.canEdit) throw data("You may edit only your own steps (curators edit any).", { status: 403 });
  const v = d.version;
  return {
    id,
    label: v.label,
    version: v.number,
    status: v.status,
    initial: formFromContent(v.content, { temperatureUnit: v.temperature_unit, entropyUnit: v.entropy_unit }),
    species: await editorSpecies(db),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  return editorAction(getDb(), user, form, routeId(params.id));
}

export default function EditStep({ loaderData: d }: Route.ComponentProps) {
  const result = useActionData<typeof action>();
  const serverErrors = result && "ok" in result && !result.ok ? result : null;
  return (
    <div className="space-y-3">
      <p className="text-sm text-ink-600">
        <Link to={`/steps/${d.id}`} className="hover:underline">
          {d.label}
        </Link>{" "}
        › edit
      </p>
      <h1 className="text-2xl font-semibold tracking-tight">Edit step (new version after v{d.version})</h1>
      <p className="text-sm text-ink-700">Saving never changes v{d.version}; it adds v{d.version + 1}. An author's edit of a library step goes back to draft for review.</p>
      <StepEditor species={d.species} initial={d.initial} serverErrors={serverErrors} submitLabel={`Save as v${d.version + 1}`} baseVersion={d.version} />
    </div>
  );
}
