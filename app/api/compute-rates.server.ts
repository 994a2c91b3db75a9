/**
 * POST /api/v1/rates — rate constants and every derived barrier form of one or more
 * elementary steps (exchange-format step objects) at a list of temperatures.
 *
 * Request:  {"steps":[step…]} or {"step":step}, "temperatures":{"values":[…],"unit":"K"|"degC"|"°C"},
 *           optional "units":{"energy":"kJ/mol"…,"entropy":"J/(mol K)"…} for the derived values.
 * Response: {"temperatureUnit":"K","results":[{"id","molecularity","form","at":[{T, kForward, kReverse?,
 *           equilibriumConstant?, derived:{dG,dH,dS,Ea,A,lnA,…}, relations, notes, extrapolated}]}]}
 * k is in (mol/L)^(1−m)·s⁻¹ with its unit label; energies in the requested unit (default kJ/mol).
 */
import { z } from "zod";
import { EnergyUnitSchema, EntropyUnitSchema, StepSchema, stepToEngine, type DocumentStep } from "../../solver/exchange-format";
import { convertBarrier } from "../../solver/rates";
import { reverseRateConstant } from "../../solver/detailed-balance";
import { ENERGY_FACTORS, ENTROPY_FACTORS, type EnergyUnit, type EntropyUnit } from "../../solver/units";
import { engineFailure, invalidBody, jsonResponse, readJsonBody, zodFields } from "./json-request.server";
import { TemperatureUnitSchema, requestPath, toKelvin } from "./compute-common.server";
import { apiError } from "./errors.server";

/** At most this many (step, temperature) pairs per request. */
export const RATES_MAX_PAIRS = 100_000;
/** Up to this many (step, temperature) pairs a request is answered on the request thread (well under 1 ms of work). */
export const RATES_INLINE_PAIRS = 256;

/** How many rate constants a body asks for (steps × temperatures), read before validation; 0 if unclear. */
export function requestedPairs(value: unknown): number {
  const v = value as { step?: unknown; steps?: unknown; temperatures?: { values?: unknown } } | null;
  if (!v || typeof v !== "object") return 0;
  const steps = Array.isArray(v.steps) ? v.steps.length : v.step !== undefined ? 1 : 0;
  const temps = Array.isArray(v.temperatures?.values) ? v.temperatures.values.length : 0;
  return steps * temps;
}

/** Wall time a rates request may take in its thread, ms (the thread is stopped some time after). */
export const RATES_MAX_WALL_MS = 10_000;
/** Largest answer, bytes of JSON (8 MiB): past it the request is refused, never half answered. */
export const RATES_MAX_RESPONSE_BYTES = 8 * 1024 * 1024;

export const RatesRequestSchema = z
  .strictObject({
    step: StepSchema.optional(),
    steps: z.array(StepSchema).min(1).max(10_000).optional(),
    temperatures: z.strictObject({
      values: z.array(z.number()).min(1).max(1000),
      unit: TemperatureUnitSchema,
    }),
    units: z.strictObject({ energy: EnergyUnitSchema.optional(), entropy: EntropyUnitSchema.optional() }).optional(),
  })
  .superRefine((body, ctx) => {
    if ((body.step === undefined) === (body.steps === undefined)) {
      ctx.addIssue({ code: "custom", path: ["steps"], message: 'Give either "step" (one step) or "steps" (a list), not both or neither.' });
    }
  });
export type RatesRequest = z.infer<typeof RatesRequestSchema>;

function quantity(value: number, unit: string) {
  return { value, unit };
}

/**
 * Reads a rates request's body and answers it: a request for at most RATES_INLINE_PAIRS rate
 * constants here (cheaper than the trip to a thread), a larger one through `inThread` when given
 * (the route passes the compute pool; tests may leave it out and compute here).
 */
export async function handleRates(request: Request, inThread?: (text: string, signal: AbortSignal) => Promise<Response>): Promise<Response> {
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  if (inThread && requestedPairs(body.value) > RATES_INLINE_PAIRS) return inThread(body.text, request.signal);
  return answerRates(body.value, body.text);
}

/**
 * Answers a parsed rates body (`text` is its source, for error positions). Runs in a compute
 * thread (app/compute/api-pool.server.ts). The answer's size is counted as it grows: past
 * `maxBytes` the request is refused with 413 before more is computed.
 */
export function answerRates(value: unknown, text: string, maxBytes = RATES_MAX_RESPONSE_BYTES): Response {
  const parsed = RatesRequestSchema.safeParse(value);
  if (!parsed.success) return invalidBody(zodFields(parsed.error, text));
  const req = parsed.data;
  const single = req.step !== undefined;
  const docSteps: DocumentStep[] = single ? [req.step!] : req.steps!;
  const stepPath = (i: number) => (single ? "step" : `steps[${i}]`);
  const pairs = docSteps.length * req.temperatures.values.length;
  if (pairs > RATES_MAX_PAIRS) {
    return apiError(413, "too_many_values", `The request asks for ${pairs} rate constants; the limit is ${RATES_MAX_PAIRS} (steps × temperatures).`, {
      temperatures: `steps × temperatures must not exceed ${RATES_MAX_PAIRS}`,
    });
  }

  const temps: number[] = [];
  for (let j = 0; j < req.temperatures.values.length; j++) {
    const path = `temperatures.values[${j}]`;
    const T = toKelvin(req.temperatures.values[j], req.temperatures.unit, path);
    if (!T.ok) return engineFailure(T.error, path);
    temps.push(T.value);
  }
  const eUnit: EnergyUnit = req.units?.energy ?? "kJ/mol";
  const sUnit: EntropyUnit = req.units?.entropy ?? "J/(mol K)";
  const e = (v: number) => quantity(v / ENERGY_FACTORS[eUnit], eUnit);
  const s = (v: number) => quantity(v / ENTROPY_FACTORS[sUnit], sUnit);

  const results = [];
  let bytes = 0;
  for (let i = 0; i < docSteps.length; i++) {
    const step = stepToEngine(docSteps[i], stepPath(i));
    if (!step.ok) return engineFailure(step.error, step.error.path);
    const at = [];
    let molecularity = 0;
    for (let j = 0; j < temps.length; j++) {
      const T = temps[j];
      const conv = convertBarrier(step.value, T, stepPath(i));
      if (!conv.ok) return engineFailure(conv.error, requestPath(conv.error.path === "T" ? `temperatures.values[${j}]` : conv.error.path, ""));
      const c = conv.value;
      molecularity = c.molecularity;
      const entry: Record<string, unknown> = {
        T: quantity(T, "K"),
        kForward: { value: c.k, unit: c.units, ln: c.lnk },
      };
      if (step.value.thermo) {
        const rev = reverseRateConstant(step.value, T, stepPath(i));
        if (!rev.ok) return engineFailure(rev.error, requestPath(rev.error.path, ""));
        const r = rev.value;
        entry.kReverse = { value: r.kRev, unit: r.unitsRev, ln: r.lnkRev };
        entry.equilibriumConstant = { value: r.Kc, unit: r.units, ln: r.lnKc, K0: r.K0, dGrxn: e(r.dGrxn), standardState: r.standardState };
        entry.reverseRelations = r.relations;
      }
      entry.derived = {
        standardState: c.standardState,
        standardConcentration: quantity(c.standardConcentration, "mol/L"),
        dG: e(c.dG),
        dH: e(c.dH),
        dS: s(c.dS),
        Ea: e(c.Ea),
        A: quantity(c.A, c.units),
        lnA: c.lnA,
        dGEntered: c.dGSource === null ? null : { ...e(c.dGSource), standardState: c.sourceStandardState },
        standardStateShift: e(c.standardStateShift),
      };
      entry.kappa = c.kappa;
      entry.kappaWigner = c.kappaWigner;
      entry.extrapolated = c.extrapolated;
      entry.relations = c.relations;
      entry.notes = c.notes;
      at.push(entry);
    }
    const result = { id: docSteps[i].id, molecularity, form: docSteps[i].barrier.form, at };
    bytes += JSON.stringify(result).length + 1;
    if (bytes > maxBytes) {
      const fit = Math.max(1, Math.floor(maxBytes / (bytes / ((i + 1) * temps.length))));
      return apiError(413, "response_too_large", `The answer would be larger than the ${maxBytes} byte limit (${(maxBytes / 1048576).toFixed(0)} MiB); about ${fit} rate constants (steps × temperatures) fit in one answer: split the request.`, {
        temperatures: `steps × temperatures: about ${fit} fit in one answer`,
      });
    }
    results.push(result);
  }
  return jsonResponse({ temperatureUnit: "K", energyUnit: eUnit, entropyUnit: sUnit, results });
}
