import { describe, expect, it } from "vitest";
import { lusolve, matrix } from "mathjs";
import { createDenseLU } from "../../solver/linalg-dense.ts";
import { createSparseLU, minimumDegreeOrder } from "../../solver/linalg-sparse.ts";

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
  it("shifted factorisations (W = s·I + c·A, as the stiff integrator uses) match mathjs, dense and sparse", () => {
    const rnd = lcg(99);
    const n = 40;
    const rows: Map<number, number>[] = Array.from({ length: n }, () => new Map());
    for (let i = 0; i < n; i++) {
      // locally connected pattern without a stored diagonal in some rows
      for (let e = 0; e < 3; e++) {
        const j = Math.min(n - 1, Math.max(0, i + Math.floor(rnd() * 7) - 3));
        if (j !== i || i % 3 === 0) rows[i].set(j, rnd() - 0.5);
      }
    }
    const rowPtr = new Int32Array(n + 1);
    const cols: number[] = [];
    const vals: number[] = [];
    for (let i = 0; i < n; i++) {
      const keys = [...rows[i].keys()].sort((a, b) => a - b);
      for (const j of keys) (cols.push(j), vals.push(rows[i].get(j)!));
      rowPtr[i + 1] = cols.length;
    }
    const shift = 3.5, scale = -1;
    const W = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => scale * (rows[i].get(j) ?? 0) + (i === j ? shift : 0)));
    const b = Array.from({ length: n }, (_, i) => Math.cos(i));
    const ref = (lusolve(matrix(W), matrix(b)).toArray() as number[][]).map((r) => r[0]);
    const slu = createSparseLU(n, rowPtr, Int32Array.from(cols));
    expect(slu.factorShifted(Float64Array.from(vals), shift, scale)).toBe(true);
    const xs = Float64Array.from(b);
    slu.solve(xs);
    const dense = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (const [j, v] of rows[i]) dense[i * n + j] = v;
    const dlu = createDenseLU(n);
    expect(dlu.factorShifted(dense, shift, scale)).toBe(true);
    const xd = Float64Array.from(b);
    dlu.solve(xd);
    for (let i = 0; i < n; i++) {
      expect(xs[i]).toBeCloseTo(ref[i], 10);
      expect(xd[i]).toBeCloseTo(ref[i], 10);
    }
  });

  it("minimum-degree order is a permutation and keeps a path graph free of fill", () => {
    // A path (tridiagonal pattern) has a no-fill elimination order (textbook, common practice).
    const n = 30;
    const adj = Array.from({ length: n }, (_, i) => [i - 1, i + 1].filter((j) => j >= 0 && j < n));
    const order = minimumDegreeOrder(n, adj);
    expect([...order].sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, i) => i));
    const rowPtr = new Int32Array(n + 1);
    const cols: number[] = [];
    for (let i = 0; i < n; i++) {
      for (const j of [i - 1, i, i + 1]) if (j >= 0 && j < n) cols.push(j);
      rowPtr[i + 1] = cols.length;
    }
    const slu = createSparseLU(n, rowPtr, Int32Array.from(cols));
    expect(slu.nnzLU).toBe(cols.length);
  });
});
