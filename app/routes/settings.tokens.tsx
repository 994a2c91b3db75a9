/** API tokens: create a named token (shown once), see when each was last used, revoke. */
import { data, Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/settings.tokens";
import { requireCan } from "~/auth/guard.server";
import { assertCsrf } from "~/auth/csrf.server";
import { clientAddress } from "~/auth/client-address.server";
import { CsrfInput } from "~/components/CsrfInput";
import { Field, Notice } from "~/auth/ui/AuthCard";
import { getDb } from "../../db/client.server";
import { createApiToken, listApiTokens, revokeApiToken } from "../../db/access/tokens.server";
import { audit } from "../../db/access/audit.server";

export function meta(): Route.MetaDescriptors {
  return [{ title: "API tokens · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireCan(request, { do: "token.manage" });
  return { tokens: await listApiTokens(getDb(), user.id), origin: new URL(request.url).origin };
}

const nameSchema = z.string().trim().min(1, "Give the token a name, e.g. the script or machine that uses it.").max(100, "Use at most 100 characters.");

export async function action({ request }: Route.ActionArgs) {
  const user = await requireCan(request, { do: "token.manage" });
  const form = await request.formData();
  await assertCsrf(request, form);
  const db = getDb();
  const ip = clientAddress(request);
  if (form.get("intent") === "create") {
    const name = nameSchema.safeParse(form.get("name") ?? "");
    if (!name.success) return data({ created: null, error: name.error.issues[0].message, name: String(form.get("name") ?? ""), revoked: null as string | null }, { status: 400 });
    const result = await db.transaction(async (trx) => {
      const t = await createApiToken(trx, user.id, name.data);
      await audit(trx, { userId: user.id, action: "token.create", objectType: "api_token", objectId: t.id, detail: { name: name.data }, ip });
      return t;
    });
    return { created: { name: name.data, token: result.token }, error: null, name: "", revoked: null };
  }
  if (form.get("intent") === "revoke") {
    const id = Number(form.get("id"));
    const ok = Number.isInteger(id) && (await revokeApiToken(db, user.id, id));
    if (!ok) return data({ created: null, error: "That token does not exist or is already revoked.", name: "", revoked: null }, { status: 404 });
    await audit(db, { userId: user.id, action: "token.revoke", objectType: "api_token", objectId: id, ip });
    return { created: null, error: null, name: "", revoked: "The token is revoked: requests that send it now get 401." };
  }
  return data({ created: null, error: "Unknown request.", name: "", revoked: null }, { status: 400 });
}

function when(iso: string | null): string {
  return iso ? new Date(iso).toISOString().replace("T", " ").slice(0, 16) + " UTC" : "never";
}

export default function Tokens({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <div className="mx-auto max-w-4xl space-y-6">
      <div>
        <Link className="text-sm text-copper-700 hover:underline" to="/settings">
          ← Settings
        </Link>
        <h1 className="text-2xl font-semibold tracking-tight">API tokens</h1>
        <p className="text-sm text-ink-600">
          Scripts call <code className="num">{loaderData.origin}/api/v1/…</code> with the header{" "}
          <code className="num">Authorization: Bearer &lt;token&gt;</code>. A token acts with your role; revoke it when a script or machine no longer needs it.
        </p>
      </div>
      {actionData?.created && (
        <div className="panel border-copper-500" role="status">
          <h2 className="font-semibold">Token “{actionData.created.name}” created</h2>
          <p className="text-sm text-ink-600">Copy it now: Saddlebook stores only a hash and cannot show it again.</p>
          <input readOnly aria-label="New token" className="field num mt-2" value={actionData.created.token} onFocus={(e) => e.currentTarget.select()} />
        </div>
      )}
      {actionData?.revoked && <Notice tone="ok">{actionData.revoked}</Notice>}
      <section className="panel">
        <h2 className="font-semibold">New token</h2>
        <Form method="post" className="mt-3 flex max-w-xl items-start gap-2">
          <CsrfInput />
          <div className="flex-1">
            <Field label="Name" name="name" defaultValue={actionData?.name} error={actionData?.error ?? undefined} />
          </div>
          <button className="btn-primary mt-5" name="intent" value="create" type="submit">
            Create token
          </button>
        </Form>
      </section>
      <section className="panel overflow-x-auto">
        <h2 className="font-semibold">Your tokens</h2>
        {loaderData.tokens.length === 0 ? (
          <p className="mt-2 text-sm text-ink-600">No tokens yet.</p>
        ) : (
          <table className="mt-2 w-full text-sm">
            <thead className="text-left text-xs text-ink-500">
              <tr>
                <th className="py-1">Name</th>
                <th>Starts with</th>
                <th>Created</th>
                <th>Last used</th>
                <th>State</th>
                <th />
              </tr>
            </thead>
            <tbody>
              {loaderData.tokens.map((t) => (
                <tr key={t.id} className="border-t border-ink-100">
                  <td className="py-1.5">{t.name}</td>
                  <td className="num">{t.prefix}…</td>
                  <td className="num">{when(t.createdAt)}</td>
                  <td className="num">{when(t.lastUsedAt)}</td>
                  <td>{t.revokedAt ? <span className="text-ink-500">revoked {when(t.revokedAt)}</span> : <span className="text-moss-700">active</span>}</td>
                  <td className="text-right">
                    {!t.revokedAt && (
                      <Form method="post">
                        <CsrfInput />
                        <input type="hidden" name="id" value={t.id} />
                        <button className="btn-quiet" name="intent" value="revoke" type="submit" aria-label={`Revoke ${t.name}`}>
                          Revoke
                        </button>
                      </Form>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
