/**
 * /analysis — activation parameters from measured k(T): paste or upload a table, get the Eyring
 * plot (ln(k/T) against 1/T) and the Arrhenius plot with fitted lines, ΔH‡, ΔS‡, ΔG‡(T), Ea and A
 * with standard errors (engine regression, solver/regression.ts).
 */
import { useRef, useState } from "react";
import { Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/analysis";
import {
  DEFAULT_SETTINGS,
  KineticsSettingsSchema,
  ZERO_CELSIUS,
  analyseKinetics,
  parseKineticsText,
  fieldValue,
  plusMinus,
  type ActivationAnalysis,
  type KineticsSettings,
  type RowError,
} from "~/components/workbench/activation-table";
import { LineFitPlot } from "~/components/plots/LineFitPlot";
import { downloadSvg, downloadSvgAsPng } from "~/components/plots/svg-export";
import { CsrfInput } from "~/components/CsrfInput";
import { formatNumber } from "~/components/format";
import { LN_KB_OVER_H, R_GAS } from "../../solver/constants";

export function meta(): Route.MetaDescriptors {
  return [{ title: "Activation parameters · Saddlebook" }];
}

/** Largest accepted table: 1 MB of text or 10 000 points. */
const MAX_TEXT = 1_000_000;
const MAX_ROWS = 10_000;

const EXAMPLE = `# T (K), k (s⁻¹) — illustrative numbers
T_K, k_per_s
298.15, 1.10e-4
308.15, 3.45e-4
318.15, 1.02e-3
328.15, 2.83e-3
338.15, 7.41e-3`;

type ActionData =
  | { ok: true; text: string; settings: KineticsSettings; analysis: ActivationAnalysis }
  | { ok: false; text: string; settings: Record<string, string>; message: string; errors: RowError[]; fields: Record<string, string> };

export async function action({ request }: Route.ActionArgs): Promise<ActionData> {
  const form = await request.formData();
  const raw: Record<string, string> = {};
  for (const k of ["temperatureUnit", "molecularity", "concentrationUnit", "timeUnit", "Tref", "TrefUnit", "kappa"]) raw[k] = String(form.get(k) ?? "");
  let text = String(form.get("table") ?? "");
  const file = form.get("file");
  if (file && typeof file === "object" && "text" in file && file.size > 0) {
    if (file.size > MAX_TEXT) return { ok: false, text, settings: raw, message: `The file is larger than ${MAX_TEXT / 1e6} MB.`, errors: [], fields: { file: "too large" } };
    text = await file.text();
  }
  const settings = KineticsSettingsSchema.safeParse(raw);
  if (!settings.success) {
    const fields: Record<string, string> = {};
    for (const iss of settings.error.issues) fields[String(iss.path[0])] ??= iss.message;
    return { ok: false, text, settings: raw, message: Object.values(fields)[0], errors: [], fields };
  }
  if (text.length > MAX_TEXT) return { ok: false, text: "", settings: raw, message: `The table is larger than ${MAX_TEXT / 1e6} MB.`, errors: [], fields: { table: "too large" } };
  if (text.trim() === "") return { ok: false, text, settings: raw, message: "Paste or upload a k(T) table first.", errors: [], fields: { table: "empty" } };
  const table = parseKineticsText(text);
  if (table.rows.length > MAX_ROWS) return { ok: false, text, settings: raw, message: `The table has more than ${MAX_ROWS} points.`, errors: [], fields: { table: "too many rows" } };
  const out = analyseKinetics(table, settings.data);
  if (!out.ok) return { ok: false, text, settings: raw, message: out.message, errors: out.errors, fields: { table: out.message } };
  return { ok: true, text, settings: settings.data, analysis: out.value };
}

const kJ = 1e-3;

function Select({ name, value, options, label }: { name: string; value: string; options: [string, string][]; label: string }) {
  return (
    <label className="block">
      <span className="label">{label}</span>
      <select name={name} defaultValue={value} className="field">
        {options.map(([v, l]) => (
          <option key={v} value={v}>
            {l}
          </option>
        ))}
      </select>
    </label>
  );
}

export default function AnalysisPage({ actionData }: Route.ComponentProps) {
  const nav = useNavigation();
  const busy = nav.state !== "idle";
  const data = actionData as ActionData | undefined;
  const s = (data?.settings ?? DEFAULT_SETTINGS) as Record<string, string | number>;
  const [text, setText] = useState(data?.text ?? "");
  const [fileNote, setFileNote] = useState<string | null>(null);
  const eyRef = useRef<SVGSVGElement>(null);
  const arRef = useRef<SVGSVGElement>(null);
  const textKey = data ? `t${data.text.length}-${data.ok}` : "t0";

  function onFile(e: React.ChangeEvent<HTMLInputElement>) {
    const f = e.target.files?.[0];
    if (!f) return;
    if (f.size > MAX_TEXT) {
      setFileNote(`${f.name} is larger than 1 MB.`);
      return;
    }
    f.text().then((t) => {
      setText(t);
      setFileNote(`Read ${f.name} (${f.size} bytes) into the table.`);
      e.target.value = "";
    });
  }

  return (
    <div className="space-y-5">
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">Activation parameters</h1>
        <p className="mt-1 max-w-3xl text-sm text-ink-600">
          Rate constants measured at several temperatures → Eyring and Arrhenius regressions with standard errors. One point per line:
          <span className="num"> T, k</span> or <span className="num">T, k, σ(k)</span> (σ gives weights 1/σ(ln k)²).
        </p>
      </header>

      <Form method="post" encType="multipart/form-data" className="panel grid gap-4 lg:grid-cols-[minmax(0,1fr)_20rem]" aria-label="k(T) table">
        <CsrfInput />
        <div>
          <label htmlFor="table" className="label">
            k(T) table
          </label>
          <textarea
            key={textKey}
            id="table"
            name="table"
            rows={11}
            spellCheck={false}
            value={text}
            onChange={(e) => setText(e.target.value)}
            className={`field num ${data && !data.ok && data.fields.table ? "field-error" : ""}`}
            placeholder={EXAMPLE}
            aria-describedby="table-help"
          />
          <div id="table-help" className="mt-2 flex flex-wrap items-center gap-3 text-xs text-ink-600">
            <label className="btn-quiet cursor-pointer">
              Upload CSV or text…
              <input type="file" name="file" accept=".csv,.txt,.tsv,text/csv,text/plain" className="sr-only" onChange={onFile} data-testid="kt-file" />
            </label>
            <button type="button" className="btn-quiet" onClick={() => setText(EXAMPLE)}>
              Fill in an illustrative example
            </button>
            {fileNote && <span role="status">{fileNote}</span>}
          </div>
        </div>
        <div className="grid grid-cols-2 content-start gap-3">
          <Select name="temperatureUnit" label="T unit" value={String(s.temperatureUnit)} options={[["K", "K"], ["degC", "°C"]]} />
          <Select name="molecularity" label="Molecularity" value={String(s.molecularity)} options={[["1", "1 (unimolecular)"], ["2", "2 (bimolecular)"], ["3", "3 (termolecular)"]]} />
          <Select
            name="concentrationUnit"
            label="k: concentration"
            value={String(s.concentrationUnit)}
            options={[["mol/L", "mol/L"], ["mmol/L", "mmol/L"], ["umol/L", "µmol/L"], ["molecules/cm3", "molecules/cm³"]]}
          />
          <Select name="timeUnit" label="k: time" value={String(s.timeUnit)} options={[["s", "s"], ["min", "min"], ["h", "h"]]} />
          <label className="block">
            <span className="label">reference temperature of ΔG‡</span>
            <input name="Tref" defaultValue={String(s.Tref)} inputMode="decimal" className={`field num ${data && !data.ok && data.fields.Tref ? "field-error" : ""}`} />
          </label>
          <Select name="TrefUnit" label="unit" value={String(s.TrefUnit)} options={[["K", "K"], ["degC", "°C"]]} />
          <label className="col-span-2 block">
            <span className="label">Transmission coefficient κ</span>
            <input name="kappa" defaultValue={String(s.kappa)} inputMode="decimal" className={`field num ${data && !data.ok && data.fields.kappa ? "field-error" : ""}`} />
          </label>
          <button type="submit" className="btn-primary col-span-2 justify-center" disabled={busy}>
            {busy ? "Fitting…" : "Fit Eyring and Arrhenius"}
          </button>
        </div>
      </Form>

      {data && !data.ok && (
        <div role="alert" className="rounded-md border border-brick-500 bg-brick-100 p-3 text-sm text-brick-700" data-testid="analysis-error">
          <p className="font-semibold">{data.message}</p>
          {data.errors.length > 1 && (
            <ul className="mt-1 list-disc pl-5">
              {data.errors.slice(0, 20).map((e) => (
                <li key={e.line}>{e.message}</li>
              ))}
              {data.errors.length > 20 && <li>… and {data.errors.length - 20} more.</li>}
            </ul>
          )}
        </div>
      )}

      {data?.ok && <Results a={data.analysis} settings={data.settings} eyRef={eyRef} arRef={arRef} />}
    </div>
  );
}

/** The step editor, prefilled with the Eyring parameters, their range and provenance. */
function libraryStepLink(a: ActivationAnalysis, settings: KineticsSettings): string {
  const e = a.eyring;
  const Ts = a.rows.map((p) => p.TK);
  const q = new URLSearchParams({
    from: "activation-analysis",
    dH: fieldValue(e.dH.value * kJ, 6),
    dS: fieldValue(e.dS.value, 6),
    tmin: fieldValue(Math.min(...Ts), 6),
    tmax: fieldValue(Math.max(...Ts), 6),
    unc: fieldValue(e.dH.se * kJ, 3),
    method: `Eyring regression of ${a.rows.length} k(T) points`,
    notes: `ΔH‡ = ${plusMinus(e.dH.value, e.dH.se, kJ)} kJ/mol, ΔS‡ = ${plusMinus(e.dS.value, e.dS.se)} J/(mol·K) (± standard error), r² = ${e.r2.toFixed(5)}, molecularity ${settings.molecularity}, κ = ${settings.kappa}, ${Math.min(...Ts).toFixed(2)}–${Math.max(...Ts).toFixed(2)} K.`,
  });
  return `/library/new?${q.toString()}`;
}

function Results({ a, settings, eyRef, arRef }: { a: ActivationAnalysis; settings: KineticsSettings; eyRef: React.RefObject<SVGSVGElement | null>; arRef: React.RefObject<SVGSVGElement | null> }) {
  const e = a.eyring;
  const r = a.arrhenius;
  const conf = Math.round(e.confidence * 100);
  const x = a.rows.map((p) => 1 / p.TK);
  const TrefC = a.Tref - ZERO_CELSIUS;
  return (
    <section className="space-y-4" aria-label="Results">
      <div className="grid gap-4 md:grid-cols-2">
        <div className="panel" data-testid="eyring-panel">
          <h2 className="font-semibold">Eyring</h2>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt>ΔH‡</dt>
            <dd className="num" data-testid="dH">{plusMinus(e.dH.value, e.dH.se, kJ)} kJ/mol</dd>
            <dt>ΔS‡</dt>
            <dd className="num" data-testid="dS">{plusMinus(e.dS.value, e.dS.se)} J/(mol·K)</dd>
            <dt>ΔG‡({formatNumber(a.Tref, 5)} K)</dt>
            <dd className="num" data-testid="dG">{plusMinus(e.dG.value, e.dG.se, kJ)} kJ/mol</dd>
            <dt>r²</dt>
            <dd className="num">{e.r2.toFixed(5)}</dd>
          </dl>
          <p className="mt-2 text-xs text-ink-500">
            ± standard error; {conf} % intervals: ΔH‡ ± {formatNumber(e.dH.ci * kJ, 2)} kJ/mol, ΔS‡ ± {formatNumber(e.dS.ci, 2)} J/(mol·K) (Student t, {e.dof} degrees of freedom).
            Standard state {settings.molecularity > 1 ? "1 mol/L (k in mol/L units)" : "— (unimolecular: none needed)"}; κ = {settings.kappa}.
            ΔG‡ at {formatNumber(a.Tref, 5)} K = {formatNumber(TrefC, 5)} °C.
          </p>
          <Link className="btn-quiet mt-3" to={libraryStepLink(a, settings)} data-testid="save-as-step">
            Save as a library step…
          </Link>
        </div>
        <div className="panel" data-testid="arrhenius-panel">
          <h2 className="font-semibold">Arrhenius</h2>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            <dt>Ea</dt>
            <dd className="num" data-testid="Ea">{plusMinus(r.Ea.value, r.Ea.se, kJ)} kJ/mol</dd>
            <dt>A</dt>
            <dd className="num" data-testid="A">
              {formatNumber(r.A, 4)} {a.kUnitSI}
            </dd>
            <dt>ln A</dt>
            <dd className="num">{plusMinus(r.lnA.value, r.lnA.se)}</dd>
            <dt>r²</dt>
            <dd className="num">{r.r2.toFixed(5)}</dd>
          </dl>
          <p className="mt-2 text-xs text-ink-500">
            ± standard error; {conf} % interval of Ea ± {formatNumber(r.Ea.ci * kJ, 2)} kJ/mol. A is in {a.kUnitSI}; its uncertainty is multiplicative, ×/÷ e^{formatNumber(r.lnA.se, 2)}.
          </p>
        </div>
      </div>
      <div className="grid gap-4 md:grid-cols-2">
        <div className="panel">
          <LineFitPlot
            ref={eyRef}
            testId="eyring-plot"
            title="Eyring plot"
            xLabel="10³ K / T"
            yLabel={`ln(k/T) [k in ${a.kUnitSI}, T in K]`}
            x={x}
            y={a.rows.map((p) => Math.log(p.kSI / p.TK))}
            slope={-e.dH.value / R_GAS}
            intercept={e.dS.value / R_GAS + LN_KB_OVER_H + Math.log(settings.kappa)}
            xTickScale={1000}
          />
          <ExportButtons svgRef={eyRef} name="eyring-plot" />
        </div>
        <div className="panel">
          <LineFitPlot
            ref={arRef}
            testId="arrhenius-plot"
            title="Arrhenius plot"
            xLabel="10³ K / T"
            yLabel={`ln k [k in ${a.kUnitSI}]`}
            x={x}
            y={a.rows.map((p) => Math.log(p.kSI))}
            slope={-r.Ea.value / R_GAS}
            intercept={r.lnA.value}
            xTickScale={1000}
          />
          <ExportButtons svgRef={arRef} name="arrhenius-plot" />
        </div>
      </div>
      <div className="panel overflow-x-auto">
        <h2 className="font-semibold">Points</h2>
        <table className="mt-2 w-full text-sm" data-testid="kt-points">
          <thead className="text-left text-xs text-ink-500">
            <tr>
              <th className="py-1 pr-3">Line</th>
              <th className="pr-3">T / K</th>
              <th className="pr-3">k / {a.kUnitSI}</th>
              <th className="pr-3">ln(k/T)</th>
              <th className="pr-3">Eyring residual</th>
              <th className="pr-3">ΔG‡(T) (kJ/mol)</th>
            </tr>
          </thead>
          <tbody>
            {a.rows.map((p, i) => (
              <tr key={p.line} className="border-t border-ink-100">
                <td className="num py-1 pr-3">{p.line}</td>
                <td className="num pr-3">{formatNumber(p.TK, 6)}</td>
                <td className="num pr-3">{formatNumber(p.kSI, 4)}</td>
                <td className="num pr-3">{(Math.log(p.kSI / p.TK)).toFixed(4)}</td>
                <td className="num pr-3">{formatNumber(e.residuals[i], 3)}</td>
                <td className="num pr-3">{plusMinus(a.dGAt[i].value, a.dGAt[i].se, kJ)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2 text-xs text-ink-500">Relations: {[...e.relations, ...r.relations].join(" · ")}. Constants CODATA 2018.</p>
      </div>
    </section>
  );
}

function ExportButtons({ svgRef, name }: { svgRef: React.RefObject<SVGSVGElement | null>; name: string }) {
  return (
    <div className="mt-2 flex gap-2">
      <button type="button" className="btn-quiet" onClick={() => svgRef.current && downloadSvg(svgRef.current, `${name}.svg`)}>
        SVG
      </button>
      <button type="button" className="btn-quiet" onClick={() => svgRef.current && void downloadSvgAsPng(svgRef.current, `${name}.png`)}>
        PNG
      </button>
    </div>
  );
}
