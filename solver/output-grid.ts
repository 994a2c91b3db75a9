/**
 * Output times for a simulation (linear, logarithmic or explicit grids) and events found on
 * the integrator's dense output: the time at which a species reaches a given conversion.
 * Units: times in s, concentrations in mol/L, conversion as a fraction 0–1.
 */
import type { EngineError, Result } from "./types.ts";
import type { StepView } from "./ode-problem.ts";

export type OutputGrid =
  | { kind: "linear"; points: number } // evenly spaced, including 0 and tEnd
  | { kind: "log"; points: number; tFirst?: number } // 0, then log-spaced from tFirst (default tEnd·1e-6) to tEnd
  | { kind: "times"; times: number[] }; // explicit times in s, within [0, tEnd]

function bad(message: string, path: string): { ok: false; error: EngineError } {
  return { ok: false, error: { code: "BAD_OUTPUT_GRID", message, path } };
}

/** Build the ascending output times (s) for a run from 0 to tEnd (s). */
export function buildOutputTimes(grid: OutputGrid, tEnd: number): Result<Float64Array> {
  if (!(tEnd > 0) || !Number.isFinite(tEnd)) return bad("The end time must be a positive finite number of seconds.", "tEnd");
  if (grid.kind === "linear") {
    if (!Number.isInteger(grid.points) || grid.points < 2 || grid.points > 1e6) return bad("A linear grid needs an integer number of points between 2 and 1 000 000.", "grid.points");
    const out = new Float64Array(grid.points);
    for (let k = 0; k < grid.points; k++) out[k] = (tEnd * k) / (grid.points - 1);
    out[grid.points - 1] = tEnd;
    return { ok: true, value: out };
  }
  if (grid.kind === "log") {
    if (!Number.isInteger(grid.points) || grid.points < 2 || grid.points > 1e6) return bad("A logarithmic grid needs an integer number of points between 2 and 1 000 000.", "grid.points");
    const t1 = grid.tFirst ?? tEnd * 1e-6;
    if (!(t1 > 0) || !(t1 < tEnd)) return bad("The first logarithmic time must lie strictly between 0 and the end time.", "grid.tFirst");
    const m = grid.points - 1;
    const out = new Float64Array(grid.points);
    const a = Math.log(t1), b = Math.log(tEnd);
    for (let k = 0; k < m; k++) out[k + 1] = m === 1 ? tEnd : Math.exp(a + ((b - a) * k) / (m - 1));
    out[m] = tEnd;
    return { ok: true, value: out };
  }
  if (grid.kind === "times") {
    if (!Array.isArray(grid.times) || grid.times.length === 0) return bad("An explicit grid needs at least one time.", "grid.times");
    const sorted = [...grid.times].sort((x, y) => x - y);
    for (let k = 0; k < sorted.length; k++) {
      if (!Number.isFinite(sorted[k]) || sorted[k] < 0 || sorted[k] > tEnd) return bad("Every output time must be a finite number of seconds within [0, end time].", `grid.times[${k}]`);
    }
    return { ok: true, value: Float64Array.from(sorted) };
  }
  return bad("Unknown output grid kind.", "grid.kind");
}

/** Watches accepted steps for the first time species `index` falls to `target` (mol/L). */
export interface CrossingWatcher {
  onStep(step: StepView): void;
  /** Time (s) of the first downward crossing, or null if not (yet) reached. */
  readonly time: number | null;
}

/**
 * Create a watcher for the first time y[index] ≤ target, located by bisection on the dense
 * output (to 1e-12 relative in time). Works for a decreasing reactant (conversion events).
 */
export function watchDownwardCrossing(n: number, index: number, target: number): CrossingWatcher {
  const buf = new Float64Array(n);
  let found: number | null = null;
  return {
    get time() {
      return found;
    },
    onStep(step: StepView) {
      if (found !== null) return;
      step.interpolate(step.t1, buf);
      if (!(buf[index] <= target)) return;
      step.interpolate(step.t0, buf);
      if (buf[index] <= target) {
        found = step.t0;
        return;
      }
      let lo = step.t0, hi = step.t1;
      for (let it = 0; it < 200 && hi - lo > 1e-12 * Math.max(Math.abs(hi), 1e-300); it++) {
        const mid = 0.5 * (lo + hi);
        step.interpolate(mid, buf);
        if (buf[index] <= target) hi = mid;
        else lo = mid;
      }
      found = hi;
    },
  };
}

/** Target concentration (mol/L) for a fractional conversion X of a reactant starting at c0. */
export function conversionTarget(c0: number, conversion: number): number {
  return c0 * (1 - conversion);
}
