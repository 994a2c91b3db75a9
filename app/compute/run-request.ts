/**
 * What a stored run asks for: conditions (temperature or program, initial concentrations with
 * units, end time, output grid), solver settings and the outcomes to analyse. The JSON shape is
 * the one POST /api/v1/simulate uses, so a request moves between the two endpoints unchanged.
 * Shared by the API, the workbench form (client) and the worker; no server-only imports.
 *
 * `toEngineConditions` turns a validated request into SI engine inputs: K, s, mol/L.
 */
import { z } from "zod";
import type { OutputGrid, Result, TemperatureProgram } from "../../solver/index";
import { MAX_TEMPERATURE_K, concentrationToMolPerL, temperatureToK, timeToSeconds, type TimeUnit } from "../../solver/index";

export const TEMPERATURE_UNITS = ["K", "degC", "°C"] as const;
export const TIME_UNITS = ["s", "min", "h", "d"] as const;
export const CONC_UNITS = ["mol/L", "mmol/L", "umol/L", "molecules/cm3", "Pa", "bar", "atm"] as const;

/** Server-side caps. */
export const RUN_MAX_WALL_MS = 60_000;
export const RUN_DEFAULT_WALL_MS = 20_000;
export const RUN_MAX_STEPS = 2_000_000;
export const RUN_MAX_VALUES = 5_000_000; // output points × species

const Temperature = z
  .strictObject({ value: z.number(), unit: z.enum(TEMPERATURE_UNITS) })
  .refine((t) => (t.unit === "K" ? t.value : t.value + 273.15) <= MAX_TEMPERATURE_K, { message: `must be at most ${MAX_TEMPERATURE_K} K`, path: ["value"] });
const Duration = z.strictObject({ value: z.number().positive("must be positive"), unit: z.enum(TIME_UNITS) });
const TimePoint = z.strictObject({ value: z.number().nonnegative("must be 0 or later"), unit: z.enum(TIME_UNITS) });

export const ProgramSchema = z.discriminatedUnion("kind", [
  z.strictObject({
    kind: z.literal("ramp"),
    from: Temperature,
    to: Temperature,
    rate: z.strictObject({ value: z.number().positive("must be positive"), unit: z.enum(["K/min", "K/s"]) }),
    holdBefore: TimePoint.optional(),
  }),
  z.strictObject({
    kind: z.literal("holds"),
    holds: z.array(z.strictObject({ from: TimePoint, temperature: Temperature })).min(1).max(1000),
  }),
]);

export const ConditionsSchema = z
  .strictObject({
    temperature: Temperature.optional(),
    program: ProgramSchema.optional(),
    initial: z.record(z.string().min(1).max(200), z.strictObject({ value: z.number().nonnegative("must be 0 or more"), unit: z.enum(CONC_UNITS) })),
    endTime: Duration,
    output: z
      .strictObject({
        grid: z.enum(["linear", "log"]),
        points: z.int().min(2).max(20_000),
        firstTime: Duration.optional(),
      })
      .optional(),
  })
  .superRefine((c, ctx) => {
    if ((c.temperature === undefined) === (c.program === undefined)) {
      ctx.addIssue({ code: "custom", path: ["temperature"], message: 'Give either "temperature" (isothermal) or "program", not both or neither.' });
    }
  });
export type Conditions = z.infer<typeof ConditionsSchema>;

export const SolverSettingsSchema = z.strictObject({
  method: z.enum(["stiff", "nonstiff"]).optional(),
  rtol: z.number().min(1e-13).max(0.1).optional(),
  atol: z.number().positive().max(1).optional(),
  maxSteps: z.int().min(1).max(RUN_MAX_STEPS).optional(),
  wallTimeMs: z.number().positive().max(RUN_MAX_WALL_MS, `must be at most ${RUN_MAX_WALL_MS} ms`).optional(),
});
export type SolverSettings = z.infer<typeof SolverSettingsSchema>;

export const AnalysisRequestSchema = z.strictObject({
  /** Limiting reactant for conversion, yields and selectivity; default: the first species present at t = 0. */
  reactant: z.string().min(1).max(200).optional(),
  /** Products for yields and selectivity; default: species absent at t = 0 that are still rising at the end. */
  products: z.array(z.string().min(1).max(200)).max(50).optional(),
  /** Degree of rate control (extra simulations, 2 per step); default on for ≤ 40 steps. */
  rateControl: z.boolean().optional(),
});
export type AnalysisRequest = z.infer<typeof AnalysisRequestSchema>;

/** Settings with defaults filled in, as stored with the run. */
export interface ResolvedSolverSettings {
  method: "stiff" | "nonstiff";
  rtol: number;
  atol: number;
  maxSteps: number;
  wallTimeMs: number;
}

export function resolveSolver(s: SolverSettings | undefined): ResolvedSolverSettings {
  return {
    method: s?.method ?? "stiff",
    rtol: s?.rtol ?? 1e-6,
    atol: s?.atol ?? 1e-12,
    maxSteps: s?.maxSteps ?? 200_000,
    wallTimeMs: Math.min(s?.wallTimeMs ?? RUN_DEFAULT_WALL_MS, RUN_MAX_WALL_MS),
  };
}

export interface EngineConditions {
  temperature: TemperatureProgram;
  /** K, temperature at t = 0 (for partial-pressure units and the rate table). */
  T0: number;
  /** mol/L by species id */
  initial: Record<string, number>;
  /** s */
  tEnd: number;
  grid: OutputGrid;
  points: number;
  /** True when the conditions include heating (a program that rises) — the page shows the process-safety note. */
  heating: boolean;
  /** mol/L, the largest initial concentration. */
  maxInitial: number;
}

const tUnit = (u: string) => (u === "°C" ? "degC" : u) as "K" | "degC";

function K(q: { value: number; unit: string }, path: string): Result<number> {
  return temperatureToK(q.value, tUnit(q.unit), path);
}

function sec(q: { value: number; unit: TimeUnit }, path: string): Result<number> {
  return timeToSeconds(q.value, q.unit, path);
}

/** Validated conditions → SI engine inputs; error paths name the request fields ("conditions.…"). */
export function toEngineConditions(c: Conditions, speciesIds: readonly string[]): Result<EngineConditions> {
  let temperature: TemperatureProgram;
  let heating = false;
  if (c.temperature) {
    const T = K(c.temperature, "conditions.temperature.value");
    if (!T.ok) return T;
    temperature = { kind: "isothermal", T: T.value };
  } else if (c.program!.kind === "ramp") {
    const p = c.program as Extract<Conditions["program"], { kind: "ramp" }>;
    const T0 = K(p.from, "conditions.program.from.value");
    if (!T0.ok) return T0;
    const T1 = K(p.to, "conditions.program.to.value");
    if (!T1.ok) return T1;
    temperature = { kind: "ramp", T0: T0.value, T1: T1.value, rate: p.rate.value, rateUnit: p.rate.unit };
    if (p.holdBefore) {
      const h = sec(p.holdBefore, "conditions.program.holdBefore.value");
      if (!h.ok) return h;
      temperature.holdBefore = h.value;
    }
    heating = T1.value > T0.value;
  } else {
    const p = c.program as Extract<Conditions["program"], { kind: "holds" }>;
    const holds: [number, number][] = [];
    for (let k = 0; k < p.holds.length; k++) {
      const t = sec(p.holds[k].from, `conditions.program.holds[${k}].from.value`);
      if (!t.ok) return t;
      const T = K(p.holds[k].temperature, `conditions.program.holds[${k}].temperature.value`);
      if (!T.ok) return T;
      holds.push([t.value, T.value]);
    }
    holds.sort((a, b) => a[0] - b[0]);
    if (holds[0][0] !== 0) return { ok: false, error: { code: "BAD_TEMPERATURE_PROGRAM", message: "The first hold of a stepped program must start at time 0.", path: "conditions.program.holds[0].from.value" } };
    for (let k = 1; k < holds.length; k++) if (holds[k][1] > holds[k - 1][1]) heating = true;
    temperature = { kind: "holds", holds };
  }
  const T0 = temperature.kind === "isothermal" ? temperature.T : temperature.kind === "ramp" ? temperature.T0 : temperature.holds[0][1];
  const initial: Record<string, number> = {};
  let maxInitial = 0;
  const known = new Set(speciesIds);
  for (const [id, q] of Object.entries(c.initial)) {
    const path = `conditions.initial.${id}`;
    if (!known.has(id)) return { ok: false, error: { code: "UNKNOWN_SPECIES", message: `Initial concentration given for "${id}", which is not in the mechanism.`, path } };
    const v = concentrationToMolPerL(q.value, q.unit, T0, path);
    if (!v.ok) return v;
    initial[id] = v.value;
    maxInitial = Math.max(maxInitial, v.value);
  }
  const tEnd = sec(c.endTime, "conditions.endTime.value");
  if (!tEnd.ok) return tEnd;
  const points = c.output?.points ?? 400;
  let grid: OutputGrid;
  if ((c.output?.grid ?? "log") === "linear") grid = { kind: "linear", points };
  else {
    grid = { kind: "log", points };
    if (c.output?.firstTime) {
      const t1 = sec(c.output.firstTime, "conditions.output.firstTime.value");
      if (!t1.ok) return t1;
      if (!(t1.value < tEnd.value)) return { ok: false, error: { code: "BAD_OUTPUT_GRID", message: "The first logarithmic output time must be earlier than the end time.", path: "conditions.output.firstTime.value" } };
      grid.tFirst = t1.value;
    }
  }
  return { ok: true, value: { temperature, T0, initial, tEnd: tEnd.value, grid, points, heating, maxInitial } };
}

/** mol/L above which the page shows the process-safety note (common practice: concentrated batches). */
export const HIGH_CONCENTRATION_MOL_L = 2;

/** Temperature of a program in K at t = 0 (for display). */
export function describeTemperature(c: Conditions): string {
  const u = (q: { value: number; unit: string }) => `${q.value} ${q.unit === "degC" ? "°C" : q.unit}`;
  if (c.temperature) return `${u(c.temperature)}, isothermal`;
  const p = c.program!;
  if (p.kind === "ramp") return `ramp ${u(p.from)} → ${u(p.to)} at ${p.rate.value} ${p.rate.unit}`;
  return `${p.holds.length} holds from ${u(p.holds[0].temperature)}`;
}
