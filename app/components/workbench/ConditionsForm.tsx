/**
 * The conditions of a run: temperature (isothermal, linear ramp or stepped holds) in K or °C,
 * initial concentrations with units, end time, output grid, tolerances and the wall-time budget.
 * Controlled: the parent keeps the draft (so presets can fill it) and gets the request body
 * built from it, validated with the same zod schemas the server uses.
 */
import { ConditionsSchema, SolverSettingsSchema, type Conditions, type SolverSettings } from "~/compute/run-request";

export interface ConditionsDraft {
  mode: "isothermal" | "ramp" | "holds";
  T: string;
  TUnit: "K" | "°C";
  rampTo: string;
  rampRate: string;
  rampRateUnit: "K/min" | "K/s";
  /** one hold per line: "time, T" in holdsTimeUnit and TUnit */
  holds: string;
  holdsTimeUnit: "s" | "min" | "h";
  initial: Record<string, { value: string; unit: "mol/L" | "mmol/L" | "umol/L" }>;
  endTime: string;
  endUnit: "s" | "min" | "h" | "d";
  grid: "log" | "linear";
  points: string;
  method: "stiff" | "nonstiff";
  rtol: string;
  atol: string;
  wallTimeS: string;
}

export function defaultDraft(speciesIds: string[]): ConditionsDraft {
  const initial: ConditionsDraft["initial"] = {};
  speciesIds.forEach((id, i) => (initial[id] = { value: i === 0 ? "0.1" : "0", unit: "mol/L" }));
  return {
    mode: "isothermal",
    T: "25",
    TUnit: "°C",
    rampTo: "80",
    rampRate: "1",
    rampRateUnit: "K/min",
    holds: "0, 25\n30, 60",
    holdsTimeUnit: "min",
    initial,
    endTime: "2",
    endUnit: "h",
    grid: "log",
    points: "400",
    method: "stiff",
    rtol: "1e-6",
    atol: "1e-12",
    wallTimeS: "20",
  };
}

export type BuiltRequest = { ok: true; conditions: Conditions; solver: SolverSettings } | { ok: false; errors: Record<string, string> };

const n = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(/\u2212/g, "-")));

/** Draft → request body parts, with field errors keyed by draft field ("T", "initial.A", "holds", …). */
export function buildRequest(d: ConditionsDraft): BuiltRequest {
  const errors: Record<string, string> = {};
  const num = (key: string, s: string, what: string) => {
    const v = n(s);
    if (!Number.isFinite(v)) errors[key] = `${what} must be a number.`;
    return v;
  };
  const tU = d.TUnit;
  const c: Record<string, unknown> = {};
  if (d.mode === "isothermal") c.temperature = { value: num("T", d.T, "The temperature"), unit: tU };
  else if (d.mode === "ramp") {
    c.program = {
      kind: "ramp",
      from: { value: num("T", d.T, "The start temperature"), unit: tU },
      to: { value: num("rampTo", d.rampTo, "The end temperature"), unit: tU },
      rate: { value: num("rampRate", d.rampRate, "The ramp rate"), unit: d.rampRateUnit },
    };
  } else {
    const holds: unknown[] = [];
    d.holds.split(/\r?\n/).forEach((line, i) => {
      if (line.trim() === "") return;
      const [a, b] = line.split(/[,;\t]|\s+/).filter(Boolean);
      const t = n(a ?? ""), T = n(b ?? "");
      if (!Number.isFinite(t) || !Number.isFinite(T)) errors.holds ??= `Line ${i + 1} of the holds needs "time, temperature".`;
      holds.push({ from: { value: t, unit: d.holdsTimeUnit }, temperature: { value: T, unit: tU } });
    });
    if (holds.length === 0) errors.holds ??= "Give at least one hold (time, temperature).";
    c.program = { kind: "holds", holds };
  }
  const initial: Record<string, unknown> = {};
  for (const [id, q] of Object.entries(d.initial)) {
    const v = n(q.value === "" ? "0" : q.value);
    if (!Number.isFinite(v) || v < 0) errors[`initial.${id}`] = "A concentration must be a number ≥ 0.";
    if (v > 0) initial[id] = { value: v, unit: q.unit };
  }
  if (Object.keys(initial).length === 0 && Object.keys(d.initial).length > 0) errors[`initial.${Object.keys(d.initial)[0]}`] ??= "At least one species needs a concentration above 0.";
  c.initial = initial;
  c.endTime = { value: num("endTime", d.endTime, "The end time"), unit: d.endUnit };
  c.output = { grid: d.grid, points: Math.round(num("points", d.points, "The number of points")) };
  const solver = { method: d.method, rtol: num("rtol", d.rtol, "rtol"), atol: num("atol", d.atol, "atol"), wallTimeMs: num("wallTimeS", d.wallTimeS, "The time budget") * 1000 };
  if (Object.keys(errors).length) return { ok: false, errors };
  const pc = ConditionsSchema.safeParse(c);
  const ps = SolverSettingsSchema.safeParse(solver);
  if (!pc.success || !ps.success) {
    for (const iss of pc.success ? [] : pc.error.issues) errors[draftKey(iss.path.map(String))] ??= iss.message;
    for (const iss of ps.success ? [] : ps.error.issues) errors[iss.path[0] === "wallTimeMs" ? "wallTimeS" : String(iss.path[0])] ??= iss.message;
    return { ok: false, errors };
  }
  return { ok: true, conditions: pc.data, solver: ps.data };
}

/** Request path (conditions.…) → draft field key. */
export function draftKey(path: string[]): string {
  const p = path[0] === "conditions" ? path.slice(1) : path;
  if (p[0] === "temperature") return "T";
  if (p[0] === "program") return p[1] === "to" ? "rampTo" : p[1] === "rate" ? "rampRate" : p[1] === "holds" ? "holds" : "T";
  if (p[0] === "initial") return `initial.${p[1]}`;
  if (p[0] === "endTime") return "endTime";
  if (p[0] === "output") return "points";
  return p[0] ?? "form";
}

export function ConditionsForm({
  draft,
  onChange,
  errors,
  presets,
  labels,
}: {
  draft: ConditionsDraft;
  onChange: (d: ConditionsDraft) => void;
  errors: Record<string, string>;
  presets?: { name: string; draft: ConditionsDraft }[];
  /** species id → display label */
  labels?: Record<string, string>;
}) {
  const set = <K extends keyof ConditionsDraft>(k: K, v: ConditionsDraft[K]) => onChange({ ...draft, [k]: v });
  const err = (k: string) => (errors[k] ? <p className="mt-0.5 text-xs text-brick-700" role="alert">{errors[k]}</p> : null);
  const cls = (k: string) => `field num ${errors[k] ? "field-error" : ""}`;
  return (
    <fieldset className="space-y-3" aria-label="Conditions">
      {presets && presets.length > 0 && (
        <label className="block">
          <span className="label">Preset</span>
          <select className="field" defaultValue="" onChange={(e) => e.target.value !== "" && onChange(presets[Number(e.target.value)].draft)}>
            <option value="">—</option>
            {presets.map((p, i) => (
              <option key={p.name} value={i}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
      )}
      <div className="flex flex-wrap gap-3 text-sm" role="radiogroup" aria-label="Temperature">
        {(["isothermal", "ramp", "holds"] as const).map((m) => (
          <label key={m} className="inline-flex items-center gap-1">
            <input type="radio" name="mode" checked={draft.mode === m} onChange={() => set("mode", m)} />
            {m === "isothermal" ? "Isothermal" : m === "ramp" ? "Linear ramp" : "Stepped holds"}
          </label>
        ))}
      </div>
      <div className="grid grid-cols-3 gap-2">
        <label className="col-span-2 block">
          <span className="label">{draft.mode === "isothermal" ? "Temperature" : draft.mode === "ramp" ? "Start temperature" : "Temperatures in"}</span>
          {draft.mode !== "holds" && <input aria-label="Temperature value" className={cls("T")} value={draft.T} onChange={(e) => set("T", e.target.value)} inputMode="decimal" />}
          {err("T")}
        </label>
        <label className="block">
          <span className="label">unit</span>
          <select aria-label="Temperature unit" className="field" value={draft.TUnit} onChange={(e) => set("TUnit", e.target.value as ConditionsDraft["TUnit"])}>
            <option value="K">K</option>
            <option value="°C">°C</option>
          </select>
        </label>
        {draft.mode === "ramp" && (
          <>
            <label className="block">
              <span className="label">End T</span>
              <input className={cls("rampTo")} value={draft.rampTo} onChange={(e) => set("rampTo", e.target.value)} inputMode="decimal" />
              {err("rampTo")}
            </label>
            <label className="block">
              <span className="label">Rate</span>
              <input className={cls("rampRate")} value={draft.rampRate} onChange={(e) => set("rampRate", e.target.value)} inputMode="decimal" />
              {err("rampRate")}
            </label>
            <label className="block">
              <span className="label">unit</span>
              <select className="field" value={draft.rampRateUnit} onChange={(e) => set("rampRateUnit", e.target.value as ConditionsDraft["rampRateUnit"])}>
                <option>K/min</option>
                <option>K/s</option>
              </select>
            </label>
          </>
        )}
        {draft.mode === "holds" && (
          <>
            <label className="col-span-2 block">
              <span className="label">Holds: from time, temperature</span>
              <textarea className={cls("holds")} rows={3} value={draft.holds} onChange={(e) => set("holds", e.target.value)} />
              {err("holds")}
            </label>
            <label className="block">
              <span className="label">time unit</span>
              <select className="field" value={draft.holdsTimeUnit} onChange={(e) => set("holdsTimeUnit", e.target.value as ConditionsDraft["holdsTimeUnit"])}>
                <option>s</option>
                <option>min</option>
                <option>h</option>
              </select>
            </label>
          </>
        )}
      </div>
      <div>
        <span className="label">Initial concentrations</span>
        <div className="max-h-64 space-y-1 overflow-auto pr-1">
          {Object.entries(draft.initial).map(([id, q]) => (
            <div key={id} className="grid grid-cols-[minmax(0,1fr)_7rem_6rem] items-center gap-2">
              <span className="truncate text-sm" title={labels?.[id] ?? id}>
                {labels?.[id] ?? id}
              </span>
              <input
                aria-label={`Initial concentration of ${labels?.[id] ?? id}`}
                className={cls(`initial.${id}`)}
                value={q.value}
                inputMode="decimal"
                onChange={(e) => set("initial", { ...draft.initial, [id]: { ...q, value: e.target.value } })}
              />
              <select aria-label={`Unit of ${labels?.[id] ?? id}`} className="field" value={q.unit} onChange={(e) => set("initial", { ...draft.initial, [id]: { ...q, unit: e.target.value as typeof q.unit } })}>
                <option value="mol/L">mol/L</option>
                <option value="mmol/L">mmol/L</option>
                <option value="umol/L">µmol/L</option>
              </select>
              {errors[`initial.${id}`] && <div className="col-span-3">{err(`initial.${id}`)}</div>}
            </div>
          ))}
        </div>
      </div>
      <div className="grid grid-cols-3 gap-2">
        <label className="col-span-2 block">
          <span className="label">End time</span>
          <input aria-label="End time" className={cls("endTime")} value={draft.endTime} onChange={(e) => set("endTime", e.target.value)} inputMode="decimal" />
          {err("endTime")}
        </label>
        <label className="block">
          <span className="label">unit</span>
          <select aria-label="End time unit" className="field" value={draft.endUnit} onChange={(e) => set("endUnit", e.target.value as ConditionsDraft["endUnit"])}>
            <option>s</option>
            <option>min</option>
            <option>h</option>
            <option>d</option>
          </select>
        </label>
        <label className="block">
          <span className="label">Output grid</span>
          <select className="field" value={draft.grid} onChange={(e) => set("grid", e.target.value as ConditionsDraft["grid"])}>
            <option value="log">logarithmic</option>
            <option value="linear">linear</option>
          </select>
        </label>
        <label className="block">
          <span className="label">Points</span>
          <input className={cls("points")} value={draft.points} onChange={(e) => set("points", e.target.value)} inputMode="numeric" />
          {err("points")}
        </label>
        <label className="block">
          <span className="label">Method</span>
          <select className="field" value={draft.method} onChange={(e) => set("method", e.target.value as ConditionsDraft["method"])}>
            <option value="stiff">stiff</option>
            <option value="nonstiff">non-stiff</option>
          </select>
        </label>
        <label className="block">
          <span className="label">rtol</span>
          <input className={cls("rtol")} value={draft.rtol} onChange={(e) => set("rtol", e.target.value)} />
          {err("rtol")}
        </label>
        <label className="block">
          <span className="label">atol (mol/L)</span>
          <input className={cls("atol")} value={draft.atol} onChange={(e) => set("atol", e.target.value)} />
          {err("atol")}
        </label>
        <label className="block">
          <span className="label">Budget / s</span>
          <input className={cls("wallTimeS")} value={draft.wallTimeS} onChange={(e) => set("wallTimeS", e.target.value)} />
          {err("wallTimeS")}
        </label>
      </div>
    </fieldset>
  );
}
