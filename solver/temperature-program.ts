/**
 * Temperature programs for a simulation: isothermal, linear ramp with a hold at the end
 * temperature, and piecewise-constant holds. Units: time t in s, temperatures in K,
 * ramp rates in K/s or K/min as stated by `rateUnit`.
 * Breakpoints are the times where T(t) or its slope jumps; the integrator must not step
 * across them (rate constants change non-smoothly there).
 */
import type { EngineError, Result } from "./types.ts";

export type TemperatureProgram =
  | { kind: "isothermal"; T: number } // K
  | {
      kind: "ramp";
      T0: number; // K, start temperature
      T1: number; // K, end temperature (held after it is reached)
      rate: number; // positive magnitude, in rateUnit
      rateUnit?: "K/s" | "K/min"; // default "K/min"
      holdBefore?: number; // s at T0 before the ramp starts, default 0
    }
  | { kind: "holds"; holds: [t: number, T: number][] }; // from time t (s) on, temperature T (K); first t must be 0

export interface CompiledTemperatureProgram {
  /** Temperature in K at time t (s). */
  T(t: number): number;
  /** Times (s, ascending, > 0) where T or dT/dt jumps. */
  breakpoints: number[];
  /** True if T never changes. */
  constant: boolean;
}

function bad(message: string, path: string): { ok: false; error: EngineError } {
  return { ok: false, error: { code: "BAD_TEMPERATURE_PROGRAM", message, path } };
}
const okT = (T: number) => Number.isFinite(T) && T > 0;

/** Validate and compile a temperature program. */
export function compileTemperatureProgram(p: TemperatureProgram): Result<CompiledTemperatureProgram> {
  if (!p || typeof p !== "object") return bad("A temperature program is required.", "temperature");
  if (p.kind === "isothermal") {
    if (!okT(p.T)) return bad("The temperature must be a finite number of kelvin above 0.", "temperature.T");
    const T = p.T;
    return { ok: true, value: { T: () => T, breakpoints: [], constant: true } };
  }
  if (p.kind === "ramp") {
    if (!okT(p.T0)) return bad("The start temperature must be a finite number of kelvin above 0.", "temperature.T0");
    if (!okT(p.T1)) return bad("The end temperature must be a finite number of kelvin above 0.", "temperature.T1");
    if (!(p.rate > 0) || !Number.isFinite(p.rate)) return bad("The ramp rate must be a positive finite number.", "temperature.rate");
    const hold = p.holdBefore ?? 0;
    if (!(hold >= 0) || !Number.isFinite(hold)) return bad("The hold before the ramp must be a finite number of seconds ≥ 0.", "temperature.holdBefore");
    const perS = (p.rateUnit ?? "K/min") === "K/min" ? p.rate / 60 : p.rate; // K/s
    const dir = Math.sign(p.T1 - p.T0);
    const tRampEnd = hold + Math.abs(p.T1 - p.T0) / perS;
    const { T0, T1 } = p;
    const T = (t: number) => (t <= hold ? T0 : t >= tRampEnd ? T1 : T0 + dir * perS * (t - hold));
    const bps = dir === 0 ? [] : [hold, tRampEnd].filter((b) => b > 0);
    return { ok: true, value: { T, breakpoints: bps, constant: dir === 0 } };
  }
  if (p.kind === "holds") {
    const hs = p.holds;
    if (!Array.isArray(hs) || hs.length === 0) return bad("A stepped program needs at least one hold.", "temperature.holds");
    for (let k = 0; k < hs.length; k++) {
      const [t, T] = hs[k];
      if (!Number.isFinite(t) || (k === 0 ? t !== 0 : !(t > hs[k - 1][0]))) return bad("Hold start times must begin at 0 and increase strictly.", `temperature.holds[${k}][0]`);
      if (!okT(T)) return bad("Every hold temperature must be a finite number of kelvin above 0.", `temperature.holds[${k}][1]`);
    }
    const times = hs.map((h) => h[0]);
    const temps = hs.map((h) => h[1]);
    const T = (t: number) => {
      let k = 0;
      while (k + 1 < times.length && t >= times[k + 1]) k++;
      return temps[k];
    };
    return { ok: true, value: { T, breakpoints: times.slice(1), constant: temps.every((x) => x === temps[0]) } };
  }
  return bad("Unknown temperature program kind.", "temperature.kind");
}
