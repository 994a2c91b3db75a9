/**
 * /mechanisms/:id/ensembles/new — start an ensemble of simulations of the mechanism's current
 * version: base conditions (the run form), then a sweep or the uncertainty of the barriers, and
 * the observables. On an error the page stays with everything typed; on success it moves to the
 * ensemble's page, which shows progress.
 */
import { useMemo, useState } from "react";
import { Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/ensembles.new";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { useLeaveGuard } from "~/components/LeaveGuard";
import { ConditionsForm, buildRequest, defaultDraft, draftKey, type ConditionsDraft } from "~/components/workbench/ConditionsForm";
import { EnsembleForm, type EnsembleFormMechanism } from "~/components/ensembles/EnsembleForm";
import { buildEnsemble, defaultEnsembleDraft, ensembleDraftKey, type EnsembleDraft } from "~/components/ensembles/ensemble-draft";
import { namesOf } from "~/components/names";
import { loadMechanismDocument } from "~/compute/mechanism-source.server";
import { EnsembleSpecSchema } from "~/ensembles/ensemble-spec";
import { methodGroups } from "~/ensembles/ensemble-plan";
import { startEnsemble } from "~/ensembles/ensemble-api.server";
import { ENERGY_FACTORS } from "../../solver/units";
import { getDb } from "../../db/client.server";

export function meta({ data }: Route.MetaArgs): Route.MetaDescriptors {
  return [{ title: `New ensemble${data?.mechanism ? ` · ${data.mechanism.name}` : ""} · Saddlebook` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const loaded = await loadMechanismDocument(getDb(), user, Number(params.id));
  if (!loaded.ok) throw new Response(loaded.message, { status: loaded.status === 422 ? 404 : loaded.status });
  const doc = loaded.document;
  const n = namesOf(doc);
  const groups = methodGroups(doc);
  const mechanism: EnsembleFormMechanism = {
    species: doc.species.map((s) => ({ id: s.id, name: n.species(s.id) })),
    steps: doc.steps.map((s) => ({ id: s.id, name: n.step(s.id), sigma: s.uncertainty ? Number(((s.uncertainty.value * ENERGY_FACTORS[s.uncertainty.unit]) / 1000).toPrecision(6)) : null, method: groups[s.id] })),
    groups: [...new Set(Object.values(groups).filter((g): g is string => g !== null))],
  };
  const produced = new Set(doc.steps.flatMap((s) => s.products.map((p) => p.species)));
  const consumed = new Set(doc.steps.flatMap((s) => s.reactants.map((p) => p.species)));
  return {
    mechanism: { id: Number(params.id), name: loaded.name, version: loaded.version },
    form: mechanism,
    products: doc.species.map((s) => s.id).filter((id) => produced.has(id) && !consumed.has(id)),
    allowed: can(user, { do: "run.create", object: { ownerId: user.id, visibility: "private" } }),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  let body: Record<string, unknown>;
  try {
    body = JSON.parse(String(form.get("request") ?? ""));
  } catch {
    return { message: "The form could not be read; reload the page.", fields: {} as Record<string, string> };
  }
  const fieldOf = (path: string[]) => (path[0] === "conditions" || path[0] === "solver" ? draftKey(path) : ensembleDraftKey(path));
  const parsed = EnsembleSpecSchema.safeParse({ ...body, mechanismId: Number(params.id) });
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const iss of parsed.error.issues) fields[fieldOf(iss.path.map(String))] ??= iss.message;
    return { message: Object.values(fields)[0] ?? "The request is not valid.", fields };
  }
  const started = await startEnsemble(getDb(), user, parsed.data);
  if (!started.ok) {
    const err = (await started.response.json()) as { error: { message: string; fields?: Record<string, string> } };
    const fields: Record<string, string> = {};
    for (const [k, v] of Object.entries(err.error.fields ?? {})) fields[fieldOf(k.split("."))] = v;
    return { message: err.error.message, fields };
  }
  return redirect(`/ensembles/${started.id}`);
}

export default function NewEnsemble({ loaderData, actionData }: Route.ComponentProps) {
  const { mechanism, form, products, allowed } = loaderData;
  const nav = useNavigation();
  const speciesIds = form.species.map((s) => s.id);
  const [conditions, setConditions] = useState<ConditionsDraft>(() => defaultDraft(speciesIds));
  const [draft, setDraft] = useState<EnsembleDraft>(() => defaultEnsembleDraft({ speciesIds, groups: form.groups, products }));
  const [dirty, setDirty] = useState(false);
  const [clientErrors, setClientErrors] = useState<Record<string, string>>({});
  const leave = useLeaveGuard(dirty);
  const labels = useMemo(() => Object.fromEntries(form.species.map((s) => [s.id, s.name])), [form.species]);
  const base = buildRequest(conditions);
  const built = base.ok ? buildEnsemble(draft, { mechanismId: mechanism.id, conditions: base.conditions, solver: base.solver }) : null;
  const errors = { ...(actionData?.fields ?? {}), ...clientErrors };

  return (
    <div className="space-y-4">
      <header>
        <p className="text-sm text-ink-600">
          <Link to={`/mechanisms/${mechanism.id}/workbench`} className="link">
            {mechanism.name}
          </Link>{" "}
          · version {mechanism.version}
        </p>
        <h1 className="text-2xl font-semibold tracking-tight">New ensemble</h1>
        <p className="text-sm text-ink-700">Many simulations of this mechanism: a sweep over conditions or barriers, or the spread of conversion, yields and selectivity that the barriers' uncertainties cause.</p>
      </header>
      {!allowed && <p className="rounded border border-brick-500 bg-brick-100 p-2 text-sm text-brick-700">Your role does not allow starting ensembles (authors and above may).</p>}
      <Form
        method="post"
        className="grid gap-4 lg:grid-cols-2"
        onChange={() => setDirty(true)}
        onSubmit={(e) => {
          if (!base.ok || !built?.ok) {
            e.preventDefault();
            setClientErrors(!base.ok ? base.errors : built && !built.ok ? built.errors : {});
            return;
          }
          setClientErrors({});
          leave.allowLeaving();
        }}
      >
        <CsrfInput />
        <input type="hidden" name="request" value={built?.ok ? JSON.stringify(built.spec) : ""} />
        <div className="panel space-y-3">
          <label className="block">
            <span className="label">Ensemble name</span>
            <input aria-label="Ensemble name" className="field" value={draft.name} maxLength={300} onChange={(e) => setDraft({ ...draft, name: e.target.value })} placeholder="e.g. DFT barrier uncertainty at 60 °C" />
          </label>
          <h2 className="font-semibold">Base conditions</h2>
          <ConditionsForm draft={conditions} onChange={(d) => (setConditions(d), setDirty(true))} errors={errors} labels={labels} />
        </div>
        <div className="panel space-y-3">
          <EnsembleForm draft={draft} onChange={(d) => (setDraft(d), setDirty(true))} errors={errors} mechanism={form} />
          {Object.keys(clientErrors).length > 0 && (
            <p role="alert" className="rounded border border-brick-500 bg-brick-100 p-2 text-sm text-brick-700">
              Check the form: {Object.values(clientErrors)[0]}
            </p>
          )}
          {actionData?.message && (
            <p role="alert" className="rounded border border-brick-500 bg-brick-100 p-2 text-sm text-brick-700" data-testid="ensemble-error">
              {actionData.message}
            </p>
          )}
          <button type="submit" className="btn-primary w-full justify-center" disabled={nav.state !== "idle" || !allowed}>
            {nav.state !== "idle" ? "Starting…" : "Start ensemble"}
          </button>
        </div>
      </Form>
      {leave.dialog}
    </div>
  );
}
