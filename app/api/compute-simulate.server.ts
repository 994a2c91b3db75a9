/**
 * POST /api/v1/simulate — concentrations against time for a mechanism in the exchange format.
 *
 * Request:
 *   {"mechanism": <saddlebook.mechanism v1 document>,
 *    "conditions": {
 *      "temperature": {"value","unit":"K"|"degC"|"°C"}            (isothermal), or
 *      "program": {"kind":"ramp","from":T,"to":T,"rate":{"value","unit":"K/min"|"K/s"},"holdBefore"?:time}
 *               | {"kind":"holds","holds":[{"from":time,"temperature":T}…]},
 *      "initial": {"<species id>": {"value","unit":"mol/L"|"mmol/L"|"umol/L"|"molecules/cm3"|"Pa"|"bar"|"atm"}},
 *      "endTime": {"value","unit":"s"|"min"|"h"|"d"},
 *      "output"?: {"grid":"linear"|"log","points":2–5000,"firstTime"?:time}},
 *    "analysis"?: {"conversions"?: [0.5, 0.9], "yields"?: {"reactant","products":[…],"reactantPerProduct"?}},
 *    "solver"?: {"method":"stiff"|"nonstiff","rtol","atol" (mol/L),"maxSteps","wallTimeMs"}}
 * Response: times (s), temperatures (K), concentrations per species (mol/L), rate constants at
 *   the start temperature, analysis (per species initial/final/extremes, conversion and times to
 *   the requested conversions located on the dense output; element and conservation-law mass
 *   balance; yields and selectivity when asked), statistics and the solver settings used.
 * The wall-time budget is capped at SIMULATE_MAX_WALL_MS whatever the request asks.
 */
import { z } from "zod";
import { MechanismDocumentSchema, documentToEngine, validateMechanismDocument } from "../../solver/exchange-format";
import type { CompiledModel } from "../../solver/model";
import { buildMechanism } from "../../solver/step-rates";
import { massBalanceReport, yieldsAndSelectivity } from "../../solver/analysis";
import { simulate, type ConversionEventRequest, type SimulationResult } from "../../solver/simulate";
import type { TemperatureProgram } from "../../solver/temperature-program";
import type { OutputGrid } from "../../solver/output-grid";
import { rateConstantUnitLabel, concentrationToMolPerL, timeToSeconds, type TimeUnit } from "../../solver/units";
import type { Result, Species } from "../../solver/types";
import { engineFailure, invalidBody, jsonResponse, zodFields } from "./json-request.server";
import { TemperatureSchema, TimeUnitSchema, requestPath, toKelvin } from "./compute-common.server";
import { apiError } from "./errors.server";

/** Server-side cap on a run's wall time, ms. */
export const SIMULATE_MAX_WALL_MS = 10_000;
/** Server-side cap on integrator steps. */
export const SIMULATE_MAX_STEPS = 1_000_000;
/** Largest output: points × species. */
export const SIMULATE_MAX_VALUES = 2_000_000;

const DurationSchema = z.strictObject({ value: z.number().positive(), unit: TimeUnitSchema });
const TimePointSchema = z.strictObject({ value: z.number().nonnegative(), unit: TimeUnitSchema });

const ProgramSchema = z.discriminatedUnion("kind", [
  z.strictObject({
    kind: z.literal("ramp"),
    from: TemperatureSchema,
    to: TemperatureSchema,
    rate: z.strictObject({ value: z.number().positive(), unit: z.enum(["K/min", "K/s"]) }),
    holdBefore: TimePointSchema.optional(),
  }),
  z.strictObject({
    kind: z.literal("holds"),
    holds: z.array(z.strictObject({ from: TimePointSchema, temperature: TemperatureSchema })).min(1).max(1000),
  }),
]);

const ConcentrationSchema = z.strictObject({
  value: z.number().nonnegative(),
  unit: z.enum(["mol/L", "mmol/L", "umol/L", "molecules/cm3", "Pa", "bar", "atm"]),
});

export const SimulateRequestSchema = z.strictObject({
  mechanism: MechanismDocumentSchema,
  conditions: z
    .strictObject({
      temperature: TemperatureSchema.optional(),
      program: ProgramSchema.optional(),
      initial: z.record(z.string(), ConcentrationSchema),
      endTime: DurationSchema,
      output: z
        .strictObject({
          grid: z.enum(["linear", "log"]),
          points: z.int().min(2).max(5000),
          firstTime: DurationSchema.optional(),
        })
        .optional(),
    })
    .superRefine((c, ctx) => {
      if ((c.temperature === undefined) === (c.program === undefined)) {
        ctx.addIssue({ code: "custom", path: ["temperature"], message: 'Give either "temperature" (isothermal) or "program", not both or neither.' });
      }
    }),
  analysis: z
    .strictObject({
      conversions: z.array(z.number().gt(0).lt(1)).max(20).optional(),
      yields: z
        .strictObject({
          reactant: z.string(),
          products: z.array(z.string()).min(1).max(100),
          reactantPerProduct: z.record(z.string(), z.number().positive()).optional(),
        })
        .optional(),
    })
    .optional(),
  solver: z
    .strictObject({
      method: z.enum(["stiff", "nonstiff"]).optional(),
      rtol: z.number().min(1e-13).max(0.1).optional(),
      atol: z.number().positive().max(1).optional(),
      maxSteps: z.int().min(1).max(SIMULATE_MAX_STEPS).optional(),
      wallTimeMs: z.number().positive().optional(),
    })
    .optional(),
});
export type SimulateRequest = z.infer<typeof SimulateRequestSchema>;

const seconds = (q: { value: number; unit: TimeUnit }, path: string) => timeToSeconds(q.value, q.unit, path);

function temperatureProgram(c: SimulateRequest["conditions"]): Result<TemperatureProgram> {
  if (c.temperature) {
    const T = toKelvin(c.temperature.value, c.temperature.unit, "conditions.temperature.value");
    return T.ok ? { ok: true, value: { kind: "isothermal", T: T.value } } : T;
  }
  const p = c.program!;
  if (p.kind === "ramp") {
    const T0 = toKelvin(p.from.value, p.from.unit, "conditions.program.from.value");
    if (!T0.ok) return T0;
    const T1 = toKelvin(p.to.value, p.to.unit, "conditions.program.to.value");
    if (!T1.ok) return T1;
    const out: TemperatureProgram = { kind: "ramp", T0: T0.value, T1: T1.value, rate: p.rate.value, rateUnit: p.rate.unit };
    if (p.holdBefore) {
      const h = seconds(p.holdBefore, "conditions.program.holdBefore.value");
      if (!h.ok) return h;
      out.holdBefore = h.value;
    }
    return { ok: true, value: out };
  }
  const holds: [number, number][] = [];
  for (let k = 0; k < p.holds.length; k++) {
    const t = seconds(p.holds[k].from, `conditions.program.holds[${k}].from.value`);
    if (!t.ok) return t;
    const T = toKelvin(p.holds[k].temperature.value, p.holds[k].temperature.unit, `conditions.program.holds[${k}].temperature.value`);
    if (!T.ok) return T;
    holds.push([t.value, T.value]);
  }
  return { ok: true, value: { kind: "holds", holds } };
}

function analysis(model: CompiledModel, species: Species[], res: SimulationResult, req: SimulateRequest) {
  const perSpecies: Record<string, Record<string, unknown>> = {};
  const K = res.times.length;
  for (let i = 0; i < model.nSpecies; i++) {
    const c = res.conc[i];
    let min = Infinity, max = -Infinity;
    for (let k = 0; k < K; k++) ((min = Math.min(min, c[k])), (max = Math.max(max, c[k])));
    const c0 = c[0], cEnd = c[K - 1];
    const entry: Record<string, unknown> = { initial: c0, final: cEnd, min, max };
    if (c0 > 0) {
      entry.conversion = 1 - cEnd / c0;
      entry.timesToConversion = [];
    }
    perSpecies[model.speciesIds[i]] = entry;
  }
  for (const ev of res.events) {
    (perSpecies[ev.species].timesToConversion as unknown[]).push({ conversion: ev.conversion, time: ev.time, located: ev.located });
  }
  const out: Record<string, unknown> = { concentrationUnit: "mol/L", timeUnit: "s", species: perSpecies };
  const mb = massBalanceReport(species, res);
  out.massBalance = mb.ok ? mb.value : { conservationMaxDrift: res.maxDrift, note: mb.error.message };
  const y = req.analysis?.yields;
  if (y) {
    const report = yieldsAndSelectivity(res, y);
    if (!report.ok) return { ok: false as const, error: report.error, path: `analysis.yields.${report.error.path ?? ""}`.replace(/\.$/, "") };
    out.yields = report.value;
  }
  return { ok: true as const, value: out };
}

/**
 * Everything after reading the body: validation, simulation, analysis and the response. Pure
 * computation, so it also runs in a compute thread (app/compute/api-pool.server.ts), where
 * `signal` is a shared stop flag raised when the client goes away.
 * @param value the parsed JSON body; @param text its text (for error positions)
 */
export async function answerSimulate(value: unknown, text: string, signal?: { readonly aborted: boolean }): Promise<Response> {
  const parsed = SimulateRequestSchema.safeParse(value);
  if (!parsed.success) return invalidBody(zodFields(parsed.error, text));
  const req = parsed.data;

  const doc = validateMechanismDocument(req.mechanism);
  if (!doc.ok) {
    const fields: Record<string, string> = {};
    for (const iss of doc.error.issues) fields[`mechanism.${iss.path}`] ??= iss.message;
    return apiError(422, "invalid_mechanism", `mechanism.${doc.error.message}`, fields);
  }
  const eng = documentToEngine(doc.value);
  if (!eng.ok) return engineFailure(eng.error, requestPath(eng.error.path, "mechanism"));
  const built = buildMechanism(eng.value.species, eng.value.steps);
  if (!built.ok) return engineFailure(built.error, requestPath(built.error.path, "mechanism"));
  const m = built.value.model;
  const rates = { value: built.value.rateConstants };

  const c = req.conditions;
  const program = temperatureProgram(c);
  if (!program.ok) return engineFailure(program.error, program.error.path);
  const T0 = program.value.kind === "isothermal" ? program.value.T : program.value.kind === "ramp" ? program.value.T0 : program.value.holds[0]?.[1];

  const initial: Record<string, number> = {};
  for (const [id, q] of Object.entries(c.initial)) {
    const path = `conditions.initial.${id}`;
    if (!m.speciesIndex.has(id)) return apiError(422, "unknown_species", `Initial concentration given for "${id}", which is not in the mechanism.`, { [path]: "not a species of the mechanism" });
    const v = concentrationToMolPerL(q.value, q.unit, T0, path);
    if (!v.ok) return engineFailure(v.error, path);
    initial[id] = v.value;
  }
  const tEnd = seconds(c.endTime, "conditions.endTime.value");
  if (!tEnd.ok) return engineFailure(tEnd.error, "conditions.endTime.value");
  let grid: OutputGrid = { kind: "log", points: 200 };
  if (c.output) {
    if (c.output.grid === "linear") grid = { kind: "linear", points: c.output.points };
    else {
      grid = { kind: "log", points: c.output.points };
      if (c.output.firstTime) {
        const t1 = seconds(c.output.firstTime, "conditions.output.firstTime.value");
        if (!t1.ok) return engineFailure(t1.error, "conditions.output.firstTime.value");
        grid.tFirst = t1.value;
      }
    }
  }
  const points = c.output?.points ?? 200;
  if (points * m.nSpecies > SIMULATE_MAX_VALUES) {
    return apiError(413, "too_many_values", `The output would hold ${points * m.nSpecies} values; the limit is ${SIMULATE_MAX_VALUES} (points × species).`, {
      "conditions.output.points": `points × species must not exceed ${SIMULATE_MAX_VALUES}`,
    });
  }

  const settings = {
    method: req.solver?.method ?? "stiff",
    rtol: req.solver?.rtol ?? 1e-6,
    atol: req.solver?.atol ?? 1e-12,
    maxSteps: req.solver?.maxSteps ?? 100_000,
    wallTimeMs: Math.min(req.solver?.wallTimeMs ?? SIMULATE_MAX_WALL_MS, SIMULATE_MAX_WALL_MS),
    wallTimeCapMs: SIMULATE_MAX_WALL_MS,
  };
  const conversions = req.analysis?.conversions ?? [0.5, 0.9];
  const conversionEvents: ConversionEventRequest[] = [];
  for (const [id, v] of Object.entries(initial)) if (v > 0) for (const conversion of conversions) conversionEvents.push({ species: id, conversion });
  const run = simulate(m, {
    conversionEvents,
    rateConstants: rates.value,
    temperature: program.value,
    initial,
    tEnd: tEnd.value,
    grid,
    rtol: settings.rtol,
    atol: settings.atol,
    method: settings.method,
    maxSteps: settings.maxSteps,
    maxWallMs: settings.wallTimeMs,
    signal: signal as AbortSignal | undefined, // only `aborted` is read
  });
  if (!run.ok) {
    const e = run.error;
    const path = e.path?.startsWith("rateConstants.")
      ? `mechanism.steps[${m.reactionIds.indexOf(e.path.split(".")[1])}]`
      : e.path === "tEnd"
        ? "conditions.endTime"
        : e.path?.startsWith("grid")
          ? e.path.replace(/^grid/, "conditions.output")
          : e.path?.startsWith("temperature")
            ? `conditions.${e.path.replace(/^temperature/, c.temperature ? "temperature" : "program")}`
            : e.path?.startsWith("initial")
              ? `conditions.${e.path}`
              : e.path;
    return engineFailure(e, path);
  }
  const res = run.value;
  const summary = analysis(m, eng.value.species, res, req);
  if (!summary.ok) return engineFailure(summary.error, summary.path);

  const rateTable = eng.value.steps.map((st, r) => {
    const kf = rates.value[r].kf(T0);
    const entry: Record<string, unknown> = { step: st.id, T: { value: T0, unit: "K" }, kForward: { value: kf, unit: rateConstantUnitLabel(sum(st.reactants)) } };
    if (rates.value[r].kr) entry.kReverse = { value: rates.value[r].kr!(T0), unit: rateConstantUnitLabel(sum(st.products)) };
    return entry;
  });
  const bySpecies: Record<string, Float64Array> = {};
  m.speciesIds.forEach((id, i) => (bySpecies[id] = res.conc[i]));

  return jsonResponse({
    mechanism: { name: doc.value.about.name, species: m.speciesIds, steps: m.reactionIds },
    times: { unit: "s", values: res.times },
    temperatures: { unit: "K", values: res.temperatures },
    concentrations: { unit: "mol/L", species: bySpecies },
    rateConstants: rateTable,
    analysis: summary.value,
    statistics: {
      integrator: res.method,
      steps: res.stats.steps,
      accepted: res.stats.accepted,
      rejected: res.stats.rejected,
      rhsEvaluations: res.stats.rhsEvals,
      jacobianEvaluations: res.stats.jacEvals,
      luDecompositions: res.stats.luDecomps,
      wallMs: res.stats.wallMs,
    },
    solver: settings,
    warnings: res.warnings,
  });
}

function sum(terms: { coef: number }[]): number {
  return terms.reduce((s, t) => s + t.coef, 0);
}
