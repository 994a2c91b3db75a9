/** A mechanism's history: every version with author, time and message, the difference between any two, and restoring an earlier version as a new one. */
import { Form, Link, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/mechanisms.$id.history";
import { getOptionalUser, requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can } from "~/auth/policy.server";
import { getDb } from "../../db/client.server";
import { diffVersions, getMechanismRow, listMechanismVersions, owned, restoreMechanismVersion } from "../../db/access/mechanisms.server";
import { actionFailure, loaderFailure, routeId } from "~/components/library/route-helpers.server";
import { DiffView } from "~/components/library/DiffView";
import { RestoreVersionButton } from "~/components/library/RestoreVersionButton";

export function meta(): Route.MetaDescriptors {
  return [{ title: "History · Saddlebook" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await getOptionalUser(request);
  const id = routeId(params.id);
  const url = new URL(request.url);
  const db = getDb();
  try {
    const m = await getMechanismRow(db, user, id);
    const versions = await listMechanismVersions(db, user, id);
    const to = Number(url.searchParams.get("to") ?? m.current_version);
    const from = Number(url.searchParams.get("from") ?? Math.max(1, to - 1));
    const Traw = Number(url.searchParams.get("T") ?? "298.15");
    const T = Number.isFinite(Traw) && Traw > 0 ? Traw : 298.15;
    const diff = from !== to && versions.some((v) => v.number === from) && versions.some((v) => v.number === to) ? await diffVersions(db, user, id, from, to, T) : null;
    const canRestore = can(user, { do: "mechanism.write", object: owned(m) });
    return { id, name: m.name, versions, current: m.current_version, canRestore, from, to, T, diff };
  } catch (e) {
    loaderFailure(e);
  }
}

/** intent=restore: an earlier version back as a new one (policy "mechanism.write", checked in the data layer). */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const id = routeId(params.id);
  if (form.get("intent") !== "restore") return { ok: false as const, message: "Unknown action.", fields: {} };
  try {
    const r = await restoreMechanismVersion(getDb(), user, id, Number(form.get("version")), Number(form.get("baseVersion")) || undefined);
    return redirect(`/mechanisms/${id}?saved=${r.version}`);
  } catch (e) {
    return actionFailure(e);
  }
}

export default function History({ loaderData: d }: Route.ComponentProps) {
  const failure = useActionData<typeof action>();
  const busy = useNavigation().state !== "idle";
  return (
    <div className="space-y-4">
      <p className="text-sm text-ink-600">
        <Link to={`/mechanisms/${d.id}`} className="hover:underline">
          {d.name}
        </Link>{" "}
        › history
      </p>
      <h1 className="text-2xl font-semibold tracking-tight">History</h1>
      {failure && !failure.ok && (
        <p role="alert" className="rounded bg-brick-100 px-3 py-2 text-sm text-brick-700">
          {failure.message}
        </p>
      )}
      <table className="panel w-full text-sm">
        <thead>
          <tr className="text-left text-xs text-ink-600">
            <th className="py-1">Version</th>
            <th>Message</th>
            <th>Author</th>
            <th>Saved (UTC)</th>
            {d.canRestore && <th />}
          </tr>
        </thead>
        <tbody>
          {d.versions.map((v) => (
            <tr key={v.id} className="border-t border-ink-100">
              <td className="py-1">
                <Link className="text-copper-700 hover:underline" to={`/mechanisms/${d.id}?version=${v.number}`}>
                  v{v.number}
                </Link>
              </td>
              <td>{v.message}</td>
              <td>{v.author}</td>
              <td className="num text-xs">{new Date(v.created_at).toISOString().slice(0, 19).replace("T", " ")}</td>
              {d.canRestore && (
                <td className="text-right">
                  {v.number !== d.current && (
                    <RestoreVersionButton version={v.number} current={d.current} disabled={busy} label={`Restore v${v.number} as version ${d.current + 1}`} />
                  )}
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      <Form method="get" className="panel flex flex-wrap items-end gap-2 text-sm">
        {(["from", "to"] as const).map((k) => (
          <div key={k}>
            <label className="label" htmlFor={k}>
              {k === "from" ? "Compare" : "with"}
            </label>
            <select id={k} name={k} className="field" defaultValue={d[k]}>
              {d.versions.map((v) => (
                <option key={v.number} value={v.number}>
                  v{v.number}
                </option>
              ))}
            </select>
          </div>
        ))}
        <div>
          <label className="label" htmlFor="T">
            k at T (K)
          </label>
          <input id="T" name="T" className="field num w-24" defaultValue={d.T} />
        </div>
        <button className="btn-quiet">Show differences</button>
      </Form>
      <section className="panel">{d.diff ? <DiffView diff={d.diff} fromLabel={`v${d.from}`} toLabel={`v${d.to}`} /> : <p className="text-sm text-ink-600">Choose two different versions.</p>}</section>
    </div>
  );
}
