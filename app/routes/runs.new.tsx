/**
 * /runs/new — start a run from a mechanism file (Saddlebook exchange format): paste or upload
 * the document, set the conditions, run. The run executes in the worker pool; the page moves to
 * the run's own page, which shows progress.
 */
import { useMemo, useState } from "react";
import { Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/runs.new";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { CsrfInput } from "~/components/CsrfInput";
import { ConditionsForm, buildRequest, defaultDraft, draftKey, type ConditionsDraft } from "~/components/workbench/ConditionsForm";
import { RunCreateSchema, startRun } from "~/compute/run-api.server";
import { getDb } from "../../db/client.server";
import { namesOf, type NamedDocument } from "~/components/names";

export function meta(): Route.MetaDescriptors {
  return [{ title: "New run · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  const mechanismText = String(form.get("mechanism") ?? "");
  let mechanism: unknown;
  try {
    mechanism = JSON.parse(mechanismText);
  } catch {
    return { message: "The mechanism is not valid JSON.", fields: { mechanism: "not valid JSON" } };
  }
  let rest: Record<string, unknown>;
  try {
    rest = JSON.parse(String(form.get("request") ?? "{}"));
  } catch {
    return { message: "The conditions could not be read; reload the page.", fields: {} };
  }
  const parsed = RunCreateSchema.safeParse({ ...rest, mechanism, name: String(form.get("name") ?? "") || undefined });
  if (!parsed.success) {
    const fields: Record<string, string> = {};
    for (const iss of parsed.error.issues) {
      const path = iss.path.map(String);
      fields[path[0] === "mechanism" ? "mechanism" : draftKey(path)] ??= path[0] === "mechanism" ? `${path.join(".")}: ${iss.message}` : iss.message;
    }
    return { message: Object.values(fields)[0] ?? "The request is not valid.", fields };
  }
  const started = await startRun(getDb(), user, parsed.data);
  if (!started.ok) {
    const body = (await started.response.json()) as { error: { message: string; fields?: Record<string, string> } };
    const fields: Record<string, string> = {};
    for (const [k, v] of Object.entries(body.error.fields ?? {})) fields[k.startsWith("mechanism") ? "mechanism" : draftKey(k.split("."))] = v;
    return { message: body.error.message, fields };
  }
  return redirect(`/runs/${started.id}`);
}

function speciesOf(text: string): string[] | null {
  try {
    const doc = JSON.parse(text) as { species?: { id?: unknown }[] };
    if (!Array.isArray(doc.species)) return null;
    return doc.species.map((s) => String(s.id ?? "")).filter(Boolean);
  } catch {
    return null;
  }
}

export default function NewRun({ actionData }: Route.ComponentProps) {
  const nav = useNavigation();
  const [text, setText] = useState("");
  const species = useMemo(() => speciesOf(text), [text]);
  const labels = useMemo(() => {
    if (!species) return undefined;
    try {
      const n = namesOf(JSON.parse(text) as NamedDocument);
      return Object.fromEntries(species.map((id) => [id, n.speciesWithFormula(id)]));
    } catch {
      return undefined;
    }
  }, [species, text]);
  const [draft, setDraft] = useState<ConditionsDraft>(() => defaultDraft([]));
  const [clientErrors, setClientErrors] = useState<Record<string, string>>({});
  const errors = { ...(actionData?.fields ?? {}), ...clientErrors };

  // Keep one initial-concentration row per species of the pasted document.
  const key = species?.join("|") ?? "";
  const [lastKey, setLastKey] = useState("");
  if (species && key !== lastKey) {
    setLastKey(key);
    const d = defaultDraft(species);
    for (const id of species) if (draft.initial[id]) d.initial[id] = draft.initial[id];
    setDraft({ ...draft, initial: d.initial });
  }
  const built = buildRequest(draft);
  const requestJson = built.ok ? JSON.stringify({ conditions: built.conditions, solver: built.solver }) : "";

  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-semibold tracking-tight">New run from a mechanism file</h1>
      <Form
        method="post"
        className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_26rem]"
        onSubmit={(e) => {
          if (!built.ok) {
            e.preventDefault();
            setClientErrors(built.errors);
          } else setClientErrors({});
        }}
      >
        <CsrfInput />
        <input type="hidden" name="request" value={requestJson} />
        <div className="panel space-y-3">
          <label className="block">
            <span className="label">Run name</span>
            <input name="name" className="field" placeholder="e.g. 60 °C, 0.5 M substrate" maxLength={300} />
          </label>
          <label className="block">
            <span className="label">Mechanism (Saddlebook exchange format, JSON)</span>
            <textarea
              name="mechanism"
              rows={18}
              spellCheck={false}
              className={`field num text-xs ${errors.mechanism ? "field-error" : ""}`}
              value={text}
              onChange={(e) => setText(e.target.value)}
              aria-label="Mechanism document"
            />
          </label>
          {errors.mechanism && <p className="text-sm text-brick-700">{errors.mechanism}</p>}
          <label className="btn-quiet cursor-pointer">
            Upload a mechanism file…
            <input
              type="file"
              accept=".json,application/json"
              className="sr-only"
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) void f.text().then(setText);
              }}
            />
          </label>
          {text && !species && <p className="text-sm text-brick-700">The text is not a mechanism document yet (no species list found).</p>}
        </div>
        <div className="panel space-y-3">
          <h2 className="font-semibold">Conditions</h2>
          <ConditionsForm draft={draft} onChange={setDraft} errors={errors} labels={labels} />
          {Object.keys(clientErrors).length > 0 && (
            <p role="alert" className="rounded border border-brick-500 bg-brick-100 p-2 text-sm text-brick-700">
              Check the conditions: {Object.values(clientErrors)[0]}
            </p>
          )}
          {actionData?.message && (
            <p role="alert" className="rounded border border-brick-500 bg-brick-100 p-2 text-sm text-brick-700" data-testid="run-error">
              {actionData.message}
            </p>
          )}
          <button type="submit" className="btn-primary w-full justify-center" disabled={nav.state !== "idle" || !species}>
            {nav.state !== "idle" ? "Starting…" : "Run simulation"}
          </button>
        </div>
      </Form>
    </div>
  );
}
