/**
 * /data — measured concentration–time datasets: upload a CSV, map its columns (time, species,
 * units, temperature), see row-level errors with line numbers, and list what is stored.
 */
import { useMemo, useState } from "react";
import { Form, Link, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/data";
import { requireUser } from "~/auth/current-user.server";
import { assertCsrf } from "~/auth/csrf.server";
import { can } from "~/auth/policy.server";
import { CsrfInput } from "~/components/CsrfInput";
import { guessConcentrationUnit, isTemperatureColumn, readTemperature, type ConcentrationUnit } from "~/components/workbench/dataset-headers";
import { DatasetMetaSchema, MappingSchema, applyMapping, datasetTemperatureProblem, guessMapping, guessTimeUnit, parseCsv, type Mapping, type RowError } from "~/components/workbench/dataset-csv";
import { getDb } from "../../db/client.server";
import { mechanismReadable } from "../../db/access/mechanisms.server";
import { createDataset, listDatasets } from "../../db/access/datasets.server";
import { unitText } from "~/components/units-text";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Measured data · Saddlebook" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const list = await listDatasets(getDb(), user);
  return {
    canCreate: can(user, { do: "dataset.create" }),
    datasets: list.map((d) => ({
      id: d.id,
      name: d.name,
      owner: d.ownerId === user.id ? "you" : (d.ownerName ?? ""),
      temperatureK: d.temperatureK,
      species: Object.values(d.mapping.species),
      rowCount: d.rowCount,
      timeUnit: d.timeUnit,
      concentrationUnit: d.concentrationUnit,
      createdAt: d.createdAt.toISOString(),
    })),
  };
}

type ActionData = { message: string; errors: RowError[]; fields: Record<string, string> };

export async function action({ request }: Route.ActionArgs): Promise<ActionData | Response> {
  const user = await requireUser(request);
  const form = await request.formData();
  await assertCsrf(request, form);
  if (!can(user, { do: "dataset.create" })) return { message: "Your role does not allow uploading datasets (authors and above may).", errors: [], fields: {} };
  const text = String(form.get("csv") ?? "");
  const csv = parseCsv(text);
  if (!csv.ok) return { message: csv.message, errors: [], fields: { csv: csv.message } };
  const meta = DatasetMetaSchema.safeParse({
    name: form.get("name"),
    notes: form.get("notes") || undefined,
    temperature: form.get("temperature"),
    temperatureUnit: form.get("temperatureUnit"),
    timeUnit: form.get("timeUnit"),
    concentrationUnit: form.get("concentrationUnit"),
    mechanismId: form.get("mechanismId") || undefined,
  });
  if (!meta.success) {
    const fields: Record<string, string> = {};
    for (const iss of meta.error.issues) fields[String(iss.path[0])] ??= iss.message;
    return { message: Object.values(fields)[0], errors: [], fields };
  }
  let mappingRaw: unknown;
  try {
    mappingRaw = JSON.parse(String(form.get("mapping") ?? "{}"));
  } catch {
    return { message: "The column mapping could not be read; choose the columns again.", errors: [], fields: { mapping: "unreadable" } };
  }
  const mapping = MappingSchema.safeParse(mappingRaw);
  if (!mapping.success) return { message: mapping.error.issues[0].message, errors: [], fields: { mapping: mapping.error.issues[0].message } };
  const mapped = applyMapping(csv.value, mapping.data);
  if (!mapped.ok) return { message: mapped.message, errors: mapped.errors, fields: { csv: mapped.message } };
  const m = meta.data;
  const TK = m.temperatureUnit === "degC" ? m.temperature + 273.15 : m.temperature;
  const badT = datasetTemperatureProblem(TK);
  if (badT) return { message: badT.message, errors: [], fields: { temperature: badT.field } };
  if (m.mechanismId !== undefined && !(await mechanismReadable(getDb(), user, m.mechanismId))) {
    return { message: `There is no mechanism ${m.mechanismId} that you can see.`, errors: [], fields: { mechanismId: "no such mechanism" } };
  }
  const id = await createDataset(getDb(), {
    ownerId: user.id,
    name: m.name,
    notes: m.notes ?? null,
    mechanismId: m.mechanismId ?? null,
    temperatureK: TK,
    timeUnit: m.timeUnit,
    concentrationUnit: m.concentrationUnit,
    mapping: mapping.data,
    rows: mapped.value,
    sourceFilename: String(form.get("filename") ?? "") || null,
  });
  return redirect(`/data/${id}`);
}

export default function DataPage({ loaderData, actionData }: Route.ComponentProps) {
  const { datasets, canCreate } = loaderData;
  const a = actionData as ActionData | undefined;
  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold tracking-tight">Measured data</h1>
        <Link to="/analysis" className="btn-quiet ml-auto">
          k(T) table → activation parameters
        </Link>
      </div>
      {canCreate && <Upload actionData={a} />}
      <section className="panel overflow-x-auto">
        <h2 className="font-semibold">Datasets</h2>
        {datasets.length === 0 ? (
          <p className="mt-1 text-sm text-ink-600">No datasets uploaded yet.</p>
        ) : (
          <table className="mt-2 w-full text-sm" data-testid="dataset-list">
            <thead className="text-left text-xs text-ink-500">
              <tr>
                <th className="py-1 pr-2">Name</th>
                <th className="pr-2">Species</th>
                <th className="pr-2">T / K</th>
                <th className="pr-2">Rows</th>
                <th className="pr-2">Units</th>
                <th className="pr-2">Owner</th>
              </tr>
            </thead>
            <tbody>
              {datasets.map((d) => (
                <tr key={d.id} className="border-t border-ink-100">
                  <td className="py-1 pr-2">
                    <Link to={`/data/${d.id}`} className="font-medium underline decoration-ink-300 hover:decoration-copper-500">
                      {d.name}
                    </Link>
                  </td>
                  <td className="pr-2">{d.species.join(", ")}</td>
                  <td className="num pr-2">{Number(d.temperatureK.toPrecision(6))}</td>
                  <td className="num pr-2">{d.rowCount}</td>
                  <td className="pr-2">
                    {d.timeUnit}, {unitText(d.concentrationUnit)}
                  </td>
                  <td className="pr-2">{d.owner}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}

function Upload({ actionData: a }: { actionData?: ActionData }) {
  const nav = useNavigation();
  const [text, setText] = useState("");
  const [filename, setFilename] = useState("");
  const parsed = useMemo(() => (text.trim() ? parseCsv(text) : null), [text]);
  const header = parsed?.ok ? parsed.value.header : null;
  const [mapping, setMapping] = useState<Mapping | null>(null);
  const [timeUnit, setTimeUnit] = useState<"s" | "min" | "h">("min");
  const [lastHeader, setLastHeader] = useState("");
  const [temperature, setTemperature] = useState("25");
  const [temperatureUnit, setTemperatureUnit] = useState<"K" | "degC">("degC");
  const [concentrationUnit, setConcentrationUnit] = useState<ConcentrationUnit>("mol/L");
  const [readNote, setReadNote] = useState("");
  if (header && parsed?.ok && header.join("\u0000") !== lastHeader) {
    // Read what the file says about itself: time and concentration units from the headers, the
    // temperature from a comment line or a temperature column (which is then no species).
    setLastHeader(header.join("\u0000"));
    const g = guessMapping(header);
    for (const h of header) if (isTemperatureColumn(h)) delete g.species[h];
    setMapping(g);
    setTimeUnit(guessTimeUnit(g.time) ?? "min");
    const units = [...new Set(Object.keys(g.species).map(guessConcentrationUnit).filter((u): u is ConcentrationUnit => u !== null))];
    if (units.length === 1) setConcentrationUnit(units[0]);
    const T = readTemperature(text, header, parsed.value.rows);
    if (T.ok && T.value) {
      setTemperature(String(Number(T.value.K.toFixed(4))));
      setTemperatureUnit("K");
    }
    const notes = [units.length === 1 ? `concentrations in ${units[0] === "umol/L" ? "µmol/L" : units[0]} from the column headers` : units.length > 1 ? "the columns name different concentration units: store them as separate datasets" : "", T.ok ? (T.value ? `temperature ${T.value.K.toFixed(2)} K from the ${T.value.from}` : "") : T.message];
    setReadNote(notes.filter(Boolean).join("; "));
  }
  const err = (k: string) => a?.fields[k];

  return (
    <Form method="post" className="panel space-y-4" aria-label="Upload a dataset">
      <CsrfInput />
      <h2 className="font-semibold">Upload a concentration–time CSV</h2>
      <div className="grid gap-4 lg:grid-cols-2">
        <div className="space-y-2">
          <label className="btn-quiet cursor-pointer">
            Choose a CSV file…
            <input
              type="file"
              accept=".csv,.txt,.tsv,text/csv,text/plain"
              className="sr-only"
              data-testid="dataset-file"
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) void f.text().then((t) => (setText(t), setFilename(f.name)));
              }}
            />
          </label>
          <label className="block">
            <span className="label">or paste it here</span>
            <textarea name="csv" rows={8} spellCheck={false} className={`field num text-xs ${err("csv") ? "field-error" : ""}`} value={text} onChange={(e) => setText(e.target.value)} aria-label="CSV text" />
          </label>
          <input type="hidden" name="filename" value={filename} />
          {parsed && !parsed.ok && <p className="text-sm text-brick-700">{parsed.message}</p>}
          {readNote && (
            <p className="text-xs text-ink-600" role="status" data-testid="dataset-read-note">
              Read from the file: {readNote}. Check them before storing.
            </p>
          )}
          {parsed?.ok && (
            <p className="text-xs text-ink-500">
              {parsed.value.rows.length} data rows, {parsed.value.header.length} columns, separated by “{parsed.value.delimiter === "\t" ? "tab" : parsed.value.delimiter}”.
            </p>
          )}
        </div>
        <div className="space-y-3">
          {header && mapping ? (
            <fieldset className="space-y-2" aria-label="Column mapping">
              <input type="hidden" name="mapping" value={JSON.stringify(mapping)} />
              <div className="grid grid-cols-2 gap-2">
                <label className="block">
                  <span className="label">Time column</span>
                  <select
                    aria-label="Time column"
                    className="field"
                    value={mapping.time}
                    onChange={(e) => {
                      const species = { ...mapping.species };
                      delete species[e.target.value];
                      setMapping({ time: e.target.value, species });
                    }}
                  >
                    {header.map((h) => (
                      <option key={h}>{h}</option>
                    ))}
                  </select>
                </label>
                <label className="block">
                  <span className="label">Time unit</span>
                  <select aria-label="Time unit" name="timeUnit" className="field" value={timeUnit} onChange={(e) => setTimeUnit(e.target.value as typeof timeUnit)}>
                    <option>s</option>
                    <option>min</option>
                    <option>h</option>
                  </select>
                </label>
              </div>
              <span className="label">Columns → species</span>
              {header
                .filter((h) => h !== mapping.time)
                .map((h) => {
                  const on = h in mapping.species;
                  return (
                    <div key={h} className="grid grid-cols-[1.5rem_minmax(0,1fr)_minmax(0,1fr)] items-center gap-2 text-sm">
                      <input
                        type="checkbox"
                        aria-label={`Use column ${h}`}
                        checked={on}
                        onChange={() => {
                          const species = { ...mapping.species };
                          if (on) delete species[h];
                          else species[h] = h;
                          setMapping({ ...mapping, species });
                        }}
                      />
                      <span className="truncate">{h}</span>
                      <input
                        aria-label={`Species for column ${h}`}
                        className="field py-0.5"
                        disabled={!on}
                        value={mapping.species[h] ?? ""}
                        onChange={(e) => setMapping({ ...mapping, species: { ...mapping.species, [h]: e.target.value } })}
                        placeholder="species id in the mechanism"
                      />
                    </div>
                  );
                })}
              {err("mapping") && <p className="text-sm text-brick-700">{err("mapping")}</p>}
            </fieldset>
          ) : (
            <p className="text-sm text-ink-600">Choose or paste a file: the first line names the columns (e.g. “t / min, A, B”), one measurement per line.</p>
          )}
          <div className="grid grid-cols-2 gap-2">
            <label className="col-span-2 block">
              <span className="label">Name</span>
              <input name="name" className={`field ${err("name") ? "field-error" : ""}`} defaultValue={filename.replace(/\.[^.]+$/, "")} key={filename} maxLength={300} />
            </label>
            <label className="block">
              <span className="label">Temperature</span>
              <input name="temperature" className={`field num ${err("temperature") ? "field-error" : ""}`} value={temperature} onChange={(e) => setTemperature(e.target.value)} inputMode="decimal" />
            </label>
            <label className="block">
              <span className="label">unit</span>
              <select name="temperatureUnit" className="field" value={temperatureUnit} onChange={(e) => setTemperatureUnit(e.target.value as "K" | "degC")}>
                <option value="K">K</option>
                <option value="degC">°C</option>
              </select>
            </label>
            <label className="block">
              <span className="label">Concentration unit</span>
              <select name="concentrationUnit" className="field" value={concentrationUnit} onChange={(e) => setConcentrationUnit(e.target.value as ConcentrationUnit)}>
                <option value="mol/L">mol/L</option>
                <option value="mmol/L">mmol/L</option>
                <option value="umol/L">µmol/L</option>
              </select>
            </label>
            <label className="block">
              <span className="label">Notes (method, instrument)</span>
              <input name="notes" className="field" maxLength={10000} />
            </label>
          </div>
          {!header && <input type="hidden" name="timeUnit" value={timeUnit} />}
          <button type="submit" className="btn-primary" disabled={nav.state !== "idle" || !header}>
            Store dataset
          </button>
        </div>
      </div>
      {a && (
        <div role="alert" data-testid="dataset-errors" className="rounded-md border border-brick-500 bg-brick-100 p-3 text-sm text-brick-700">
          <p className="font-semibold">{a.message}</p>
          {a.errors.length > 1 && (
            <ul className="mt-1 list-disc pl-5">
              {a.errors.slice(0, 20).map((e) => (
                <li key={e.line}>{e.message}</li>
              ))}
              {a.errors.length > 20 && <li>… and {a.errors.length - 20} more lines.</li>}
            </ul>
          )}
        </div>
      )}
    </Form>
  );
}
