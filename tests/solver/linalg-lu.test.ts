import { describe, expect, it } from "vitest";
import { lusolve, matrix } from "mathjs";
import { createDenseLU } from "../../solver/linalg-dense.ts";
import { createSparseLU } from "../../solver/linalg-sparse.ts";

/** Seeded linear congruential generator (Numerical Recipes constants, common practice). */
function lcg(seed: number) {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
}

describe("dense and sparse LU against mathjs lusolve (cross-check)", () => {
  it("dense LU with pivoting solves a random system like mathjs", () => {
    const rnd = lcg(7);
    const n = 12;
    const A = Array.from({ length: n }, () => Array.from({ length: n }, () => rnd() - 0.5));
    A[0][0] = 0; // forces a row exchange
    const b = Array.from({ length: n }, () => rnd());
    const lu = createDenseLU(n);
    expect(lu.factor(Float64Array.from(A.flat()))).toBe(true);
    const x = Float64Array.from(b);
    lu.solve(x);
    const ref = (lusolve(matrix(A), matrix(b)).toArray() as number[][]).map((r) => r[0]);
    for (let i = 0; i < n; i++) expect(x[i]).toBeCloseTo(ref[i], 10);
  });

  it("dense LU reports a singular matrix", () => {
    const lu = createDenseLU(2);
    expect(lu.factor(Float64Array.of(1, 2, 2, 4))).toBe(false);
  });

  it("sparse LU (minimum-degree order, refactorisation) matches mathjs on a random sparse, diagonally dominant matrix", () => {
    const rnd = lcg(42);
    const n = 150;
    const rows: Map<number, number>[] = Array.from({ length: n }, () => new Map());
    for (let i = 0; i < n; i++) {
      for (let e = 0; e < 3; e++) rows[i].set(Math.floor(rnd() * n), rnd() - 0.5);
      rows[i].set(i, 4 + rnd());
    }
    const rowPtr = new Int32Array(n + 1);
    const cols: number[] = [];
    const vals: number[] = [];
    for (let i = 0; i < n; i++) {
      const keys = [...rows[i].keys()].sort((a, b) => a - b);
      for (const j of keys) (cols.push(j), vals.push(rows[i].get(j)!));
      rowPtr[i + 1] = cols.length;
    }
    const slu = createSparseLU(n, rowPtr, Int32Array.from(cols));
    const dense = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => rows[i].get(j) ?? 0));
    for (let round = 0; round < 2; round++) {
      // second round: new values, same pattern (numeric refactorisation)
      const v = Float64Array.from(vals.map((x) => x * (round + 1)));
      expect(slu.factor(v)).toBe(true);
      const b = Array.from({ length: n }, (_, i) => Math.sin(i));
      const x = Float64Array.from(b);
      slu.solve(x);
      const ref = (lusolve(matrix(dense.map((r) => r.map((x) => x * (round + 1)))), matrix(b)).toArray() as number[][]).map((r) => r[0]);
      for (let i = 0; i < n; i++) expect(x[i]).toBeCloseTo(ref[i], 9);
    }
    expect(slu.nnzLU).toBeLessThan(n * n / 2);
  });
});
