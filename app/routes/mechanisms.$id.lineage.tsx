/** A fork against its parent: steps added, removed and changed, with old and new values and the effect on k at the chosen T. */
import { Form, Link } from "react-router";
import type { Route } from "./+types/mechanisms.$id.lineage";
import { getOptionalUser } from "~/auth/current-user.server";
import { getDb } from "../../db/client.server";
import { diffAgainstParent, getMechanismRow } from "../../db/access/mechanisms.server";
import { loaderFailure, routeId } from "~/components/library/route-helpers.server";
import { DiffView } from "~/components/library/DiffView";
import { data } from "react-router";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Fork differences · Saddlebook" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await getOptionalUser(request);
  const id = routeId(params.id);
  const url = new URL(request.url);
  const Traw = Number(url.searchParams.get("T") ?? "298.15");
  const T = Number.isFinite(Traw) && Traw > 0 ? Traw : 298.15;
  const db = getDb();
  let m;
  try {
    m = await getMechanismRow(db, user, id);
  } catch (e) {
    loaderFailure(e);
  }
  if (!m.forked_from_mechanism_id) throw data("This mechanism is not a fork, so it has no parent to compare with.", { status: 404 });
  try {
    const r = await diffAgainstParent(db, user, id, T);
    const parent = await getMechanismRow(db, user, r.parentId);
    return { id, name: m.name, owner: m.owner_name, parent: { id: parent.id, name: parent.name, owner: parent.owner_name, version: r.parentVersion }, T, diff: r.diff };
  } catch (e) {
    loaderFailure(e);
  }
}

export default function Lineage({ loaderData: d }: Route.ComponentProps) {
  return (
    <div className="space-y-4">
      <p className="text-sm text-ink-600">
        <Link to={`/mechanisms/${d.id}`} className="hover:underline">
          {d.name}
        </Link>{" "}
        › differences from the parent
      </p>
      <h1 className="text-2xl font-semibold tracking-tight">{d.name}</h1>
      <p className="text-sm text-ink-700">
        {d.owner}'s fork of{" "}
        <Link className="text-copper-700 underline" to={`/mechanisms/${d.parent.id}`}>
          {d.parent.name}
        </Link>{" "}
        ({d.parent.owner}), version {d.parent.version}.
      </p>
      <Form method="get" className="flex items-center gap-2 text-sm">
        <label htmlFor="T">Effect on k at T =</label>
        <input id="T" name="T" className="field num w-24" defaultValue={d.T} inputMode="decimal" />
        <span>K</span>
        <button className="btn-quiet">Show</button>
      </Form>
      <section className="panel">
        <DiffView diff={d.diff} fromLabel={`parent v${d.parent.version}`} toLabel="this fork" />
      </section>
    </div>
  );
}
