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

/** Random sparse pattern with a full diagonal; `density` is the share of off-diagonal entries. */
function randomSparse(n: number, density: number, rnd: () => number) {
  const rows: Map<number, number>[] = Array.from({ length: n }, () => new Map());
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) if (j !== i && rnd() < density) rows[i].set(j, rnd() - 0.5);
    rows[i].set(i, 1 + rnd());
  }
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    for (const j of [...rows[i].keys()].sort((a, b) => a - b)) (cols.push(j), vals.push(rows[i].get(j)!));
    rowPtr[i + 1] = cols.length;
  }
  const dense = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => rows[i].get(j) ?? 0));
  return { rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals), dense };
}

describe("sparse LU numeric kernels (WebAssembly)", () => {
  it("the committed module is the assembly of solver/wasm/sparse-lu-kernels.wat (npm run gen:wasm)", async () => {
    const { readFileSync } = await import("node:fs");
    const { sparseKernelsModuleText } = await import("../../scripts/gen-wasm.ts");
    const committed = readFileSync(new URL("../../solver/wasm/sparse-lu-kernels.ts", import.meta.url), "utf8");
    expect(committed).toBe(await sparseKernelsModuleText());
  });

  it("the scatter elimination (operation count above the schedule limit) matches mathjs", () => {
    const n = 260;
    const m = randomSparse(n, 0.3, lcg(5));
    const slu = createSparseLU(n, m.rowPtr, m.colIdx);
    expect(slu.flops).toBeGreaterThan(4_000_000); // SCHEDULE_MAX_OPS in solver/linalg-sparse.ts
    const shift = 2, scale = -0.5;
    expect(slu.factorShifted(m.values, shift, scale)).toBe(true);
    const b = Array.from({ length: n }, (_, i) => Math.sin(0.3 * i));
    const x = Float64Array.from(b);
    slu.solve(x);
    const W = m.dense.map((r, i) => r.map((v, j) => scale * v + (i === j ? shift : 0)));
    const ref = (lusolve(matrix(W), matrix(b)).toArray() as number[][]).map((r) => r[0]);
    for (let i = 0; i < n; i++) expect(x[i]).toBeCloseTo(ref[i], 9);
  });

  it("a zero, tiny or non-finite pivot is reported on both elimination paths, and the next factorisation recovers", () => {
    for (const [n, density] of [[40, 0.1], [260, 0.3]] as const) {
      const m = randomSparse(n, density, lcg(11));
      const slu = createSparseLU(n, m.rowPtr, m.colIdx);
      expect(slu.factor(m.values.map(() => 0))).toBe(false); // all zero
      const withNaN = Float64Array.from(m.values);
      withNaN[0] = NaN;
      expect(slu.factorShifted(withNaN, 10, 1)).toBe(false);
      expect(slu.factorShifted(m.values, 1e-300, 1e-300)).toBe(true); // scaled, not singular
      expect(slu.factorShifted(m.values, 10, 1)).toBe(true);
      const x = new Float64Array(n).fill(1);
      slu.solve(x);
      for (const v of x) expect(Number.isFinite(v)).toBe(true);
    }
  });

  it("factorisations held at the same time keep their own factors (one memory each)", () => {
    const n = 60;
    const m = randomSparse(n, 0.08, lcg(3));
    const a = createSparseLU(n, m.rowPtr, m.colIdx);
    const b = createSparseLU(n, m.rowPtr, m.colIdx);
    expect(a.factorShifted(m.values, 5, 1)).toBe(true);
    expect(b.factorShifted(m.values, 50, -1)).toBe(true);
    const rhs = Array.from({ length: n }, (_, i) => Math.cos(i));
    for (const [lu, shift, scale] of [[a, 5, 1], [b, 50, -1], [a, 5, 1]] as const) {
      const x = Float64Array.from(rhs);
      lu.solve(x);
      const W = m.dense.map((r, i) => r.map((v, j) => scale * v + (i === j ? shift : 0)));
      const ref = (lusolve(matrix(W), matrix(rhs)).toArray() as number[][]).map((r) => r[0]);
      for (let i = 0; i < n; i++) expect(x[i]).toBeCloseTo(ref[i], 10);
    }
  });
});
