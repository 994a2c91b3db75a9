/**
 * Pieces shared by the compute endpoints: temperature and time quantities with units, and
 * the translation of engine error paths (SI field names) into request paths (format names).
 */
import { z } from "zod";
import { temperatureToK } from "../../solver/units";
import type { Result } from "../../solver/types";

/** "K", "degC" or "°C". */
export const TemperatureUnitSchema = z.enum(["K", "degC", "°C"]);
export type TemperatureUnitInput = z.infer<typeof TemperatureUnitSchema>;

export const TemperatureSchema = z.strictObject({ value: z.number(), unit: TemperatureUnitSchema });
export const TimeUnitSchema = z.enum(["s", "min", "h", "d"]);

/** A temperature with its unit → K (> 0), or a typed error at `path`. */
export function toKelvin(value: number, unit: TemperatureUnitInput, path: string): Result<number> {
  return temperatureToK(value, unit === "°C" ? "degC" : unit, path);
}

const ENGINE_TO_FORMAT: [RegExp, string][] = [
  [/^reactions\[/, "steps["],
  [/\.thermo(?=\.|\[|$)/g, ".reactionThermo"],
  [/\.Tref(?=\.|\[|$)/g, ".T"],
  [/\.imagFreq(?=\.|\[|$)/g, ".imaginaryFrequency"],
  [/\.targetStandardState(?=\.|\[|$)/g, ".reportStandardState"],
];

/**
 * An engine error path ("steps[0].barrier.Tref", "reactions[2].products") → the request's
 * path in exchange-format names, under `prefix` ("mechanism", or "" for the top level).
 */
export function requestPath(enginePath: string | undefined, prefix: string): string {
  let p = enginePath ?? "";
  for (const [re, rep] of ENGINE_TO_FORMAT) p = p.replace(re, rep);
  if (prefix === "") return p;
  return p === "" ? prefix : `${prefix}.${p}`;
}
