/** Mechanisms you can read; create a new one or import a Saddlebook mechanism file. */
import { Form, Link, redirect, useActionData, useNavigation } from "react-router";
import type { Route } from "./+types/mechanisms";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { getDb } from "../../db/client.server";
import { createMechanism, importMechanism, listMechanisms, IMPORT_LIMIT_BYTES } from "../../db/access/mechanisms.server";
import { actionFailure } from "~/components/library/route-helpers.server";
import { InputError } from "../../db/access/library-errors";
import { IllustrativeNote } from "~/components/library/StatusBadge";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Mechanisms · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const url = new URL(request.url);
  const mine = url.searchParams.get("mine") === "1";
  const q = url.searchParams.get("q") ?? "";
  const r = await listMechanisms(getDb(), user, { mine, q, limit: 200 });
  return { items: r.items, more: !!r.next, mine, q, userId: user.id, canCreate: can(user, { do: "mechanism.create" }), canGroup: user.groupIds.length > 0, limitMb: IMPORT_LIMIT_BYTES / 1048576 };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  try {
    if (form.get("intent") === "import") {
      const file = form.get("file");
      if (!(file instanceof File) || file.size === 0) throw new InputError("Choose a Saddlebook mechanism file (.json) to import.", { file: "Required." });
      if (file.size > IMPORT_LIMIT_BYTES) throw new InputError(`The file is larger than the import limit of 2 MB (${IMPORT_LIMIT_BYTES} bytes).`, { file: "Too large." });
      const r = await importMechanism(db, user, await file.text(), { visibility: "private" });
      return redirect(`/mechanisms/${r.id}`);
    }
    const r = await createMechanism(db, user, {
      name: String(form.get("name") ?? ""),
      description: String(form.get("description") ?? "") || undefined,
      visibility: String(form.get("visibility") ?? "private"),
      message: "Created.",
    });
    return redirect(`/mechanisms/${r.id}`);
  } catch (e) {
    return actionFailure(e);
  }
}

export default function Mechanisms({ loaderData: d }: Route.ComponentProps) {
  const result = useActionData<typeof action>();
  const busy = useNavigation().state === "submitting";
  const failure = result && "ok" in result && !result.ok ? result : null;
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-semibold tracking-tight">Mechanisms</h1>
      <IllustrativeNote />
      <Form method="get" className="flex flex-wrap items-center gap-2 text-sm">
        <input name="q" className="field max-w-xs" placeholder="Name contains…" defaultValue={d.q} aria-label="Filter by name" />
        <label className="flex items-center gap-1">
          <input type="checkbox" name="mine" value="1" defaultChecked={d.mine} /> Only mine
        </label>
        <button className="btn-quiet">Filter</button>
      </Form>
      <table className="panel w-full text-sm" data-testid="mechanism-list">
        <thead>
          <tr className="text-left text-xs text-ink-600">
            <th className="py-1">Name</th>
            <th>Owner</th>
            <th>Visibility</th>
            <th>Steps</th>
            <th>Version</th>
            <th>Updated</th>
          </tr>
        </thead>
        <tbody>
          {d.items.map((m) => (
            <tr key={m.id} className="border-t border-ink-100">
              <td className="py-1">
                <Link to={`/mechanisms/${m.id}`} className="font-medium text-copper-700 hover:underline">
                  {m.name}
                </Link>
                {m.forked_from_mechanism_id && <span className="ml-2 text-xs text-ink-500">fork</span>}
              </td>
              <td>{m.owner_name}</td>
              <td>{m.visibility}</td>
              <td className="num">{m.step_count}</td>
              <td className="num">v{m.current_version}</td>
              <td className="num text-xs">{new Date(m.updated_at).toISOString().slice(0, 10)}</td>
            </tr>
          ))}
          {d.items.length === 0 && (
            <tr>
              <td colSpan={6} className="py-4 text-center text-ink-600">
                No mechanisms to show.
              </td>
            </tr>
          )}
        </tbody>
      </table>
      {failure && (
        <p className="text-sm text-brick-700" role="alert">
          {failure.message}
          {Object.keys(failure.fields).length > 1 && (
            <ul className="mt-1 list-disc pl-5 text-xs">
              {Object.entries(failure.fields).slice(0, 20).map(([k, v]) => (
                <li key={k}>
                  <code>{k}</code>: {v}
                </li>
              ))}
            </ul>
          )}
        </p>
      )}
      {d.canCreate && (
        <div className="grid gap-4 md:grid-cols-2">
          <Form method="post" className="panel space-y-2">
            <h2 className="font-semibold">New mechanism</h2>
            <CsrfInput />
            <input type="hidden" name="intent" value="create" />
            <label className="label" htmlFor="new-name">
              Name
            </label>
            <input id="new-name" name="name" className="field" required maxLength={300} />
            <label className="label" htmlFor="new-desc">
              Description
            </label>
            <textarea id="new-desc" name="description" className="field" />
            <label className="label" htmlFor="new-vis">
              Visibility
            </label>
            <select id="new-vis" name="visibility" className="field">
              <option value="private">Private</option>
              {d.canGroup && <option value="group">Group</option>}
              <option value="public">Public</option>
            </select>
            <button className="btn-primary" disabled={busy}>
              Create
            </button>
          </Form>
          <Form method="post" encType="multipart/form-data" className="panel space-y-2">
            <h2 className="font-semibold">Import a Saddlebook mechanism file</h2>
            <CsrfInput />
            <input type="hidden" name="intent" value="import" />
            <input type="file" name="file" accept=".json,application/json" className="text-sm" aria-label="Mechanism file" />
            <p className="text-xs text-ink-600">
              At most {d.limitMb} MB. The file is checked against the format's JSON Schema; errors name the line and field, and nothing is stored unless all of it is valid. Format:{" "}
              <a className="underline" href="/api/v1/docs#schema-MechanismDocument">
                MechanismDocument
              </a>
              .
            </p>
            <button className="btn-quiet" disabled={busy}>
              Import
            </button>
          </Form>
        </div>
      )}
    </div>
  );
}
