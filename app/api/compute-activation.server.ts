/**
 * POST /api/v1/activation-parameters — Eyring and Arrhenius regression of a measured k(T)
 * table (solver/regression.ts): ΔH‡, ΔS‡ (1 mol/L standard state), ΔG‡ at a stated
 * temperature, Ea and ln A, each with its standard error and confidence interval, R² and the
 * residuals of the linearised fits.
 *
 * Request:  {"points":[{"T","k","sigmaK"?}…] (≥ 3, two temperatures at least),
 *            "temperatureUnit":"K"|"degC"|"°C", "rateUnit":{"concentration","time"},
 *            "molecularity": m (0–3; the order of k, needed to bring k to (mol/L)^(1−m)·s⁻¹),
 *            "kappa"? (κ of the Eyring analysis, default 1), "confidence"? (default 0.95),
 *            "referenceTemperature"? {"value","unit"} (where ΔG‡ is reported; default the mean
 *            of the measured temperatures, stated in the answer),
 *            "units"? {"energy","entropy"} for the results (default kJ/mol, J/(mol K))}
 * Response: {"standardState":"1M","kUnit", "n","dof","confidence",
 *            "eyring":{"dH","dS","dG","referenceTemperature","r2","residuals","relations"},
 *            "arrhenius":{"Ea","lnA","A","r2","residuals","relations"}, "notes"}
 * Each estimate is {"value","standardError","confidenceHalfWidth","unit"}.
 */
import { z } from "zod";
import { EnergyUnitSchema, EntropyUnitSchema, RateUnitSchema } from "../../solver/exchange-format";
import { arrheniusRegression, eyringRegression, type Estimate, type RatePoint } from "../../solver/regression";
import { ENERGY_FACTORS, ENTROPY_FACTORS, MAX_ORDER, rateConstantToSI, rateConstantUnitLabel, type EnergyUnit, type EntropyUnit } from "../../solver/units";
import { engineFailure, invalidBody, jsonResponse, readJsonBody, zodFields } from "./json-request.server";
import { TemperatureSchema, TemperatureUnitSchema, toKelvin } from "./compute-common.server";

export const ActivationRequestSchema = z
  .strictObject({
    points: z
      .array(
        z.strictObject({
          T: z.number().meta({ description: "Temperature in `temperatureUnit`." }),
          k: z.number().positive().meta({ description: "Measured rate constant in `rateUnit`." }),
          sigmaK: z.number().positive().optional().meta({ description: "Standard uncertainty of k (same unit); give it for every point or for none (then points weigh as 1/σ(ln k)²)." }),
        }),
      )
      .min(3, "A regression with standard errors needs at least 3 points.")
      .max(10_000),
    temperatureUnit: TemperatureUnitSchema,
    rateUnit: RateUnitSchema,
    molecularity: z.number().min(0).max(MAX_ORDER).meta({ description: "Order m of the rate constant (1 unimolecular, 2 bimolecular …; 0 for a zero-order k)." }),
    kappa: z.number().positive().max(1e6).optional().meta({ description: "Transmission coefficient κ assumed in the Eyring analysis; default 1." }),
    confidence: z.number().gt(0).lt(1).optional().meta({ description: "Two-sided confidence level of the intervals; default 0.95." }),
    referenceTemperature: TemperatureSchema.optional().meta({ description: "Where ΔG‡ is reported; default the mean of the measured temperatures." }),
    units: z.strictObject({ energy: EnergyUnitSchema.optional(), entropy: EntropyUnitSchema.optional() }).optional(),
  })
  .meta({ id: "ActivationParametersRequest", description: "A k(T) table for Eyring and Arrhenius regression." });
export type ActivationRequest = z.infer<typeof ActivationRequestSchema>;

export async function handleActivationParameters(request: Request): Promise<Response> {
  const body = await readJsonBody(request);
  if (!body.ok) return body.response;
  const parsed = ActivationRequestSchema.safeParse(body.value);
  if (!parsed.success) return invalidBody(zodFields(parsed.error, body.text));
  const req = parsed.data;
  const m = req.molecularity;

  // Every k and T to SI-molar units: K and (mol/L)^(1−m)·s⁻¹ (σ_k scales with k).
  const points: RatePoint[] = [];
  for (let i = 0; i < req.points.length; i++) {
    const p = req.points[i];
    const T = toKelvin(p.T, req.temperatureUnit, `points[${i}].T`);
    if (!T.ok) return engineFailure(T.error, `points[${i}].T`);
    const k = rateConstantToSI(p.k, m, req.rateUnit.concentration, req.rateUnit.time, `points[${i}].k`);
    if (!k.ok) return engineFailure(k.error, `points[${i}].k`);
    const point: RatePoint = { T: T.value, k: k.value };
    if (p.sigmaK !== undefined) point.sigmaK = (p.sigmaK * k.value) / p.k;
    points.push(point);
  }
  let Tref = points.reduce((s, p) => s + p.T, 0) / points.length;
  if (req.referenceTemperature) {
    const T = toKelvin(req.referenceTemperature.value, req.referenceTemperature.unit, "referenceTemperature");
    if (!T.ok) return engineFailure(T.error, "referenceTemperature");
    Tref = T.value;
  }
  const options = { kappa: req.kappa ?? 1, confidence: req.confidence ?? 0.95, Tref };
  const ey = eyringRegression(points, options);
  if (!ey.ok) return engineFailure(ey.error, ey.error.path);
  const ar = arrheniusRegression(points, options);
  if (!ar.ok) return engineFailure(ar.error, ar.error.path);

  const eUnit: EnergyUnit = req.units?.energy ?? "kJ/mol";
  const sUnit: EntropyUnit = req.units?.entropy ?? "J/(mol K)";
  const scaled = (e: Estimate, factor: number, unit: string) => ({ value: e.value / factor, standardError: e.se / factor, confidenceHalfWidth: e.ci / factor, unit });
  const kUnit = rateConstantUnitLabel(m);
  const Ts = points.map((p) => p.T);
  const notes = [
    `k converted to ${kUnit}; the Eyring parameters refer to the 1 mol/L standard state${m === 1 ? " (for a first-order k they do not depend on it)" : ""}.`,
    `Measured from ${Math.min(...Ts).toFixed(2)} K to ${Math.max(...Ts).toFixed(2)} K; values outside that range are extrapolations.`,
  ];
  if (ey.value.dof < 3) notes.push(`Only ${ey.value.dof} degree(s) of freedom: the confidence intervals are wide.`);
  return jsonResponse({
    standardState: "1M",
    kUnit,
    n: ey.value.n,
    dof: ey.value.dof,
    confidence: ey.value.confidence,
    eyring: {
      dH: scaled(ey.value.dH, ENERGY_FACTORS[eUnit], eUnit),
      dS: scaled(ey.value.dS, ENTROPY_FACTORS[sUnit], sUnit),
      dG: scaled(ey.value.dG, ENERGY_FACTORS[eUnit], eUnit),
      referenceTemperature: { value: Tref, unit: "K" },
      kappa: options.kappa,
      r2: ey.value.r2,
      residuals: ey.value.residuals,
      relations: ey.value.relations,
    },
    arrhenius: {
      Ea: scaled(ar.value.Ea, ENERGY_FACTORS[eUnit], eUnit),
      lnA: { value: ar.value.lnA.value, standardError: ar.value.lnA.se, confidenceHalfWidth: ar.value.lnA.ci, unit: `ln(${kUnit})` },
      A: { value: ar.value.A, unit: kUnit },
      r2: ar.value.r2,
      residuals: ar.value.residuals,
      relations: ar.value.relations,
    },
    notes,
  });
}
