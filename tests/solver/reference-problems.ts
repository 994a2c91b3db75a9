/**
 * Published stiff test problems and their reference solutions, shared by the integrator tests
 * (RODAS4 and BDF) and the engine benchmark (bench/engine-cases.ts). Units: the problems are
 * dimensionless as published (time and concentrations in the problems' own units).
 */
import type { OdeProblem } from "../../solver/ode-problem.ts";

/** Robertson's chemical kinetics problem, k = 0.04, 3e7, 1e4 (Robertson 1966; Hairer & Wanner II §IV.1 and §IV.10). */
export function robertson(): OdeProblem {
  return {
    n: 3,
    autonomous: true,
    rhs(_t, y, dy) {
      dy[0] = -0.04 * y[0] + 1e4 * y[1] * y[2];
      dy[2] = 3e7 * y[1] * y[1];
      dy[1] = -dy[0] - dy[2];
    },
    jacobian: {
      kind: "dense",
      fill(_t, y, J) {
        J[0] = -0.04; J[1] = 1e4 * y[2]; J[2] = 1e4 * y[1];
        J[3] = 0.04; J[4] = -1e4 * y[2] - 6e7 * y[1]; J[5] = -1e4 * y[1];
        J[6] = 0; J[7] = 6e7 * y[1]; J[8] = 0;
      },
    },
  };
}

export const ROBERTSON_Y0 = [1, 0, 0];

/**
 * Robertson reference values at every second decade up to t = 1e11.
 * t = 1e11: Bari IVP test set (Mazzia & Magherini), problem ROBER, recalled from memory:
 * y = (0.2083340149701255e-7, 0.8333360770334713e-13, 0.9999999791665050); agrees to 1e-12 with
 * an independent scipy 1.17 Radau run at rtol 1e-13, atol 1e-22.
 * Intermediate decades: that same scipy Radau run (independent implementation, not ours).
 */
export const ROBERTSON_REFS: [t: number, y: number[]][] = [
  [0.4, [0.9851721138609911, 3.386395378974901e-5, 0.014794022185220607]],
  [40, [0.7158270687194063, 9.1855347645577e-6, 0.284163745745832]],
  [4000, [0.18320225777671045, 8.94237125277594e-7, 0.8167968479861694]],
  [4e5, [0.00493827452098006, 1.9849940879544662e-8, 0.995061705629083]],
  [4e7, [5.203071844121328e-5, 2.0813357318928392e-10, 0.999947969073428]],
  [4e9, [5.208276611432387e-7, 2.083311716603154e-12, 0.9999994791702549]],
  [1e11, [0.2083340149701255e-7, 0.8333360770334713e-13, 0.999999979166505]],
];
/** Bari IVP test set reference at t = 1e11 (from memory, see ROBERTSON_REFS). */
export const ROBERTSON_REF_1E11 = ROBERTSON_REFS[ROBERTSON_REFS.length - 1][1];

/** HIRES (Schäfer 1975; Hairer & Wanner II §IV.10; Bari IVP test set "hires"): 8 species, nonlinear. */
export function hires(): OdeProblem {
  return {
    n: 8,
    autonomous: true,
    rhs(_t, y, f) {
      f[0] = -1.71 * y[0] + 0.43 * y[1] + 8.32 * y[2] + 0.0007;
      f[1] = 1.71 * y[0] - 8.75 * y[1];
      f[2] = -10.03 * y[2] + 0.43 * y[3] + 0.035 * y[4];
      f[3] = 8.32 * y[1] + 1.71 * y[2] - 1.12 * y[3];
      f[4] = -1.745 * y[4] + 0.43 * y[5] + 0.43 * y[6];
      f[5] = -280 * y[5] * y[7] + 0.69 * y[3] + 1.71 * y[4] - 0.43 * y[5] + 0.69 * y[6];
      f[6] = 280 * y[5] * y[7] - 1.81 * y[6];
      f[7] = -f[6];
    },
    jacobian: {
      kind: "dense",
      fill(_t, y, J) {
        J.fill(0);
        const s = (i: number, j: number, v: number) => (J[i * 8 + j] = v);
        s(0, 0, -1.71); s(0, 1, 0.43); s(0, 2, 8.32);
        s(1, 0, 1.71); s(1, 1, -8.75);
        s(2, 2, -10.03); s(2, 3, 0.43); s(2, 4, 0.035);
        s(3, 1, 8.32); s(3, 2, 1.71); s(3, 3, -1.12);
        s(4, 4, -1.745); s(4, 5, 0.43); s(4, 6, 0.43);
        s(5, 3, 0.69); s(5, 4, 1.71); s(5, 5, -0.43 - 280 * y[7]); s(5, 6, 0.69); s(5, 7, -280 * y[5]);
        s(6, 5, 280 * y[7]); s(6, 6, -1.81); s(6, 7, 280 * y[5]);
        s(7, 5, -280 * y[7]); s(7, 6, 1.81); s(7, 7, -280 * y[5]);
      },
    },
  };
}

export const HIRES_Y0 = [1, 0, 0, 0, 0, 0, 0, 0.0057];
export const HIRES_T_END = 321.8122;
/**
 * HIRES reference at t = 321.8122: Bari IVP test set, problem HIRES (recalled from memory;
 * agrees to ~1e-12 with scipy 1.17 Radau at rtol 1e-13).
 */
export const HIRES_REF = [
  0.7371312573325668e-3, 0.1442485726316185e-3, 0.5888729740967575e-4, 0.1175651343283149e-2,
  0.2386356198831331e-2, 0.6238968252742796e-2, 0.2849998395185769e-2, 0.2850001604814231e-2,
];

/** |a − b| / |b|. */
export function relErr(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}
