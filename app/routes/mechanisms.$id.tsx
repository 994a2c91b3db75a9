/** A mechanism: its steps with k at a chosen T, pinned-step updates on offer, forks and lineage; the owner edits it here. */
import { useState } from "react";
import { Form, Link, useActionData, useNavigation, redirect } from "react-router";
import type { Route } from "./+types/mechanisms.$id";
import { getOptionalUser, requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { CsrfInput } from "~/components/CsrfInput";
import { getDb } from "../../db/client.server";
import { forkMechanism, getMechanism, getMechanismRow, owned, updateMechanism, updateMechanismSteps } from "../../db/access/mechanisms.server";
import { assertCan } from "~/auth/policy.server";
import { entryAsInput } from "~/components/library/step-schema";
import { rateAt } from "../../db/access/mechanism-diff";
import { actionFailure, loaderFailure, routeId } from "~/components/library/route-helpers.server";
import { notifyFork } from "~/api/library-mail.server";
import { MechanismEditor } from "~/components/mechanism-editor/MechanismEditor";
import { sig } from "~/components/library/format";
import { StatusBadge } from "~/components/library/StatusBadge";
import { InputError } from "../../db/access/library-errors";
import { reactionText } from "~/components/names";
import { speciesFromForm } from "~/components/library/editor-actions.server";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `${data?.name ?? "Mechanism"} · Saddlebook` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await getOptionalUser(request);
  const id = routeId(params.id);
  const url = new URL(request.url);
  const vParam = url.searchParams.get("version");
  const Traw = Number(url.searchParams.get("T") ?? "298.15");
  const T = Number.isFinite(Traw) && Traw > 0 ? Traw : 298.15;
  const db = getDb();
  let d;
  try {
    d = await getMechanism(db, user, id, vParam ? routeId(vParam) : undefined);
  } catch (e) {
    if (!user) throw redirect(`/sign-in?next=${encodeURIComponent(url.pathname + url.search)}`);
    loaderFailure(e);
  }
  const labelOf = new Map(d.resolved.species.map((s) => [s.key, s.label]));
  const nameOf = (key: string) => labelOf.get(key) ?? key;
  const steps = d.resolved.steps.map((s) => {
    const r = rateAt(s.doc, T);
    return {
      key: s.key,
      kind: s.kind,
      stepId: s.stepId ?? null,
      stepVersionId: s.stepVersionId ?? null,
      versionNumber: s.versionNumber ?? null,
      status: s.status ?? null,
      label: s.label,
      reaction: reactionText(s.doc, nameOf),
      k: r.k,
      kUnit: r.unit,
      doc: s.kind === "local" ? s.doc : null,
      update: d.updates[s.key] ?? null,
    };
  });
  const isCurrent = d.version.number === d.mechanism.current_version;
  const allSpecies = d.canWrite && isCurrent ? await db("species").select("id", "label", "formula").orderBy("label").limit(3000) : [];
  return {
    id,
    name: d.version.name,
    description: d.mechanism.description ?? "",
    owner: d.mechanism.owner_name,
    visibility: d.mechanism.visibility,
    illustrative: d.mechanism.illustrative,
    version: d.version,
    currentVersion: d.mechanism.current_version,
    isCurrent,
    T,
    steps,
    species: d.snapshot.species.map((s) => ({ key: s.key, speciesId: s.speciesId, label: s.label, formula: s.formula })),
    parent: d.parent,
    forks: d.forks,
    canWrite: d.canWrite && isCurrent,
    canFork: d.canFork,
    canGroup: !!user && user.groupIds.length > 0,
    allSpecies,
    signedIn: !!user,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const id = routeId(params.id);
  const db = getDb();
  const intent = String(form.get("intent") ?? "");
  try {
    if (intent === "fork") {
      const r = await forkMechanism(db, user, id, { ...(String(form.get("name") ?? "").trim() ? { name: String(form.get("name")).trim() } : {}) });
      await notifyFork(db, r.id).catch(() => {});
      return redirect(`/mechanisms/${r.id}/lineage`);
    }
    if (intent === "save") {
      let payload: unknown;
      try {
        payload = JSON.parse(String(form.get("payload") ?? ""));
      } catch {
        throw new InputError("The edit could not be read; reload and try again.");
      }
      const r = await updateMechanism(db, user, id, payload);
      return redirect(`/mechanisms/${id}?saved=${r.version}`);
    }
    if (intent === "species") {
      // New species from the editor: for those who may change this mechanism.
      assertCan(user, { do: "mechanism.write", object: owned(await getMechanismRow(db, user, id)) }, "Only the owner can add species from this mechanism's editor.");
      return await speciesFromForm(db, user, form);
    }
    if (intent === "use-update") {
      const d = await getMechanism(db, user, id);
      const key = String(form.get("key") ?? "");
      const offer = d.updates[key];
      if (!offer) throw new InputError("That update is no longer on offer; reload the page.");
      const steps = d.snapshot.steps.map((e) => entryAsInput(e.kind === "library" && e.key === key ? { ...e, stepVersionId: offer.stepVersionId } : e));
      const label = d.resolved.steps.find((s) => s.key === key)?.label ?? key;
      await updateMechanismSteps(db, user, d, steps, Number(form.get("baseVersion")), `Updated "${label}" to library version ${offer.number}.`);
      return redirect(`/mechanisms/${id}`);
    }
    return { ok: false as const, message: "Unknown action.", fields: {} };
  } catch (e) {
    return actionFailure(e);
  }
}

export default function MechanismPage({ loaderData: d }: Route.ComponentProps) {
  const result = useActionData<typeof action>();
  const busy = useNavigation().state === "submitting";
  const failure = result && "ok" in result && !result.ok ? result : null;
  // Long mechanisms show their first 100 steps until asked for all (keeps the first render quick).
  const [showAll, setShowAll] = useState(d.steps.length <= 150);
  const shown = showAll ? d.steps : d.steps.slice(0, 100);
  return (
    <div className="space-y-4">
      <p className="text-sm text-ink-600">
        <Link to="/mechanisms" className="hover:underline">
          Mechanisms
        </Link>{" "}
        › {d.name}
      </p>
      <div className="flex flex-wrap items-start gap-3">
        <div>
          <h1 className="text-2xl font-semibold tracking-tight">{d.name}</h1>
          <p className="mt-1 text-sm text-ink-700">
            {d.owner} · {d.visibility} · version {d.version.number} of {d.currentVersion} ({d.version.message}){d.illustrative ? " · illustrative demo" : ""}
          </p>
          {d.parent && (
            <p className="mt-1 text-sm">
              Fork of{" "}
              {d.parent.readable ? (
                <Link className="text-copper-700 underline" to={`/mechanisms/${d.parent.id}`}>
                  {d.parent.name}
                </Link>
              ) : (
                d.parent.name
              )}{" "}
              v{d.parent.version} ·{" "}
              <Link className="text-copper-700 underline" to={`/mechanisms/${d.id}/lineage`}>
                differences from the parent
              </Link>
            </p>
          )}
          {!d.isCurrent && <p className="mt-1 text-sm text-brick-700">You are looking at an older version; it cannot be edited.</p>}
        </div>
        <div className="ml-auto flex flex-wrap gap-2">
          <Link className="btn-primary" to={`/mechanisms/${d.id}/workbench`}>
            Workbench
          </Link>
          <Link className="btn-quiet" to={`/mechanisms/${d.id}/history`}>
            History
          </Link>
          <a className="btn-quiet" href={`/api/v1/mechanisms/${d.id}/export?version=${d.version.number}`} download>
            Download (Saddlebook format)
          </a>
          {d.canFork && (
            <Form method="post">
              <CsrfInput />
              <input type="hidden" name="intent" value="fork" />
              <button className="btn-primary" disabled={busy}>
                Fork into my space
              </button>
            </Form>
          )}
        </div>
      </div>
      {failure && !d.canWrite && (
        <p className="text-sm text-brick-700" role="alert">
          {failure.message}
        </p>
      )}
      {d.description && <p className="max-w-3xl text-sm text-ink-800">{d.description}</p>}

      <section className="panel overflow-x-auto">
        <Form method="get" className="flex items-center gap-2 text-sm">
          <label htmlFor="T">k at T =</label>
          <input id="T" name="T" className="field num w-24" defaultValue={String(d.T)} inputMode="decimal" />
          <span>K</span>
          {!d.isCurrent && <input type="hidden" name="version" value={d.version.number} />}
          <button className="btn-quiet">Show</button>
        </Form>
        <table className="mt-2 w-full text-sm" data-testid="mechanism-steps">
          <thead>
            <tr className="text-left text-xs text-ink-600">
              <th className="py-1">#</th>
              <th>Step</th>
              <th>Source</th>
              <th>k at {sig(d.T, 5)} K</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((s, i) => (
              <tr key={s.key} className="border-t border-ink-100 align-top">
                <td className="num py-1 text-ink-500">{i + 1}</td>
                <td>
                  {s.stepId ? (
                    <Link to={`/steps/${s.stepId}?v=${s.versionNumber}`} className="font-medium text-copper-700 hover:underline">
                      {s.label}
                    </Link>
                  ) : (
                    <span className="font-medium">{s.label}</span>
                  )}
                  <div className="text-xs text-ink-600">{s.reaction}</div>
                </td>
                <td className="text-xs">
                  {s.kind === "library" ? (
                    <>
                      library v{s.versionNumber} {s.status && <StatusBadge status={s.status} />}
                    </>
                  ) : (
                    "local"
                  )}
                  {s.update && (
                    <div className="mt-1 rounded bg-amber-note px-2 py-1">
                      Newer approved version v{s.update.number}.{" "}
                      {d.canWrite && (
                        <Form method="post" className="inline">
                          <CsrfInput />
                          <input type="hidden" name="intent" value="use-update" />
                          <input type="hidden" name="key" value={s.key} />
                          <input type="hidden" name="baseVersion" value={d.currentVersion} />
                          <button className="text-copper-700 underline">Use v{s.update.number}</button>
                        </Form>
                      )}
                    </div>
                  )}
                </td>
                <td className="num text-xs">
                  {sig(s.k)} {s.kUnit}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        {!showAll && (
          <button type="button" className="btn-quiet mt-2" onClick={() => setShowAll(true)}>
            Show all {d.steps.length} steps
          </button>
        )}
        <p className="mt-2 text-xs text-ink-600">
          Rate constants are model estimates. For heating, scale-up or accumulation of energetic intermediates, calorimetric measurement and the site's process-safety review decide; local regulations and licensed practice govern.
        </p>
      </section>

      {d.forks.length > 0 && (
        <section className="panel text-sm">
          <h2 className="font-semibold">Forks</h2>
          <ul className="mt-1">
            {d.forks.map((f) => (
              <li key={f.id}>
                <Link to={`/mechanisms/${f.id}/lineage`} className="text-copper-700 hover:underline">
                  {f.name}
                </Link>{" "}
                by {f.owner} (from v{f.forked_from_version})
              </li>
            ))}
          </ul>
        </section>
      )}

      {d.canWrite && (
        <section>
          <h2 className="mb-2 text-lg font-semibold">Edit</h2>
          <MechanismEditor
            key={d.currentVersion}
            name={d.name}
            description={d.description}
            visibility={d.visibility}
            species={d.species}
            entries={d.steps.map((s) => ({
              key: s.key,
              kind: s.kind,
              stepVersionId: s.stepVersionId ?? undefined,
              versionNumber: s.versionNumber ?? undefined,
              label: s.label,
              reaction: s.reaction,
              step: s.doc ?? undefined,
            }))}
            allSpecies={d.allSpecies}
            baseVersion={d.currentVersion}
            canGroup={d.canGroup}
            pageUrl={`/mechanisms/${d.id}`}
            error={failure ? { message: failure.message, conflict: "conflict" in failure ? (failure.conflict as { version: number; author: string | null; message: string; at: string } | undefined) : undefined } : null}
          />
        </section>
      )}
    </div>
  );
}
