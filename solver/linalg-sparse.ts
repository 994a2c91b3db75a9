/**
 * Sparse LU factorisation for large, sparse systems with a fixed pattern (the stiff
 * integrator's W = I/(hγ) − J for big mechanisms). Unitless: the caller's units carry through.
 *
 * Phases:
 *  1. Ordering, once: minimum-degree ordering on the symmetrised pattern A + Aᵀ
 *     (explicit elimination graph with degree buckets; Tinney–Walker scheme 2 / Rose 1972 —
 *     common practice).
 *  2. Symbolic factorisation, once: elimination tree (Liu 1986) and row patterns of L
 *     by tree traversal (Davis, "Direct Methods for Sparse Linear Systems", ch. 4 —
 *     algorithm described there, implemented here from the description). Because the
 *     symmetrised pattern is used, the pattern of U is the transpose of that of L.
 *     When the operation count is moderate, the elimination is also recorded as a flat
 *     list of target positions ("static schedule"), so that every later numeric
 *     factorisation is one tight loop with no scatter/gather bookkeeping.
 *  3. Numeric factorisation, every call: row-oriented (IKJ) Gaussian elimination with
 *     static diagonal pivots in the chosen order, reusing the pattern; no allocation.
 *     A pivot that is zero, tiny relative to its row or non-finite makes `factor` return
 *     false (the integrator then shrinks its step, which makes W diagonally dominant).
 *     The numeric loops (loading A into the factor pattern, both eliminations and the
 *     triangular solves) are WebAssembly kernels (solver/wasm/sparse-lu-kernels.wat) over a
 *     memory owned by each factorisation. In JavaScript the same loops ran about twice as
 *     slowly once a process held more than one factorisation; the kernels do not.
 */

import { WasmArena } from "./wasm/sparse-lu-memory.ts";

export interface SparseLU {
  readonly n: number;
  /** Number of stored entries of L+U (including the diagonal). */
  readonly nnzLU: number;
  /** Multiply–add operations of one numeric factorisation. */
  readonly flops: number;
  /** Factor the matrix whose CSR values (pattern given at creation) are `values`. */
  factor(values: Float64Array): boolean;
  /** Factor shift·I + scale·A, A with the CSR values `values` (e.g. W = I/(hγ) − J: shift 1/(hγ), scale −1). */
  factorShifted(values: Float64Array, shift: number, scale: number): boolean;
  /** Solve A x = b in place (b overwritten with x). */
  solve(b: Float64Array): void;
}

/**
 * Minimum-degree ordering of a symmetric pattern given as adjacency lists (no self loops,
 * no duplicates). Returns perm with perm[newIndex] = old index. Ties go to the vertex that
 * entered its degree bucket last (deterministic).
 */
export function minimumDegreeOrder(n: number, adjIn: ArrayLike<number>[]): Int32Array {
  const adj: number[][] = [];
  for (let v = 0; v < n; v++) adj.push(Array.from(adjIn[v]));
  const eliminated = new Uint8Array(n);
  const order = new Int32Array(n);
  // degree buckets as doubly linked lists
  const head = new Int32Array(n + 1).fill(-1);
  const next = new Int32Array(n).fill(-1);
  const prev = new Int32Array(n).fill(-1);
  const deg = new Int32Array(n);
  const insert = (v: number, d: number) => {
    deg[v] = d;
    prev[v] = -1;
    next[v] = head[d];
    if (head[d] !== -1) prev[head[d]] = v;
    head[d] = v;
  };
  const remove = (v: number) => {
    if (prev[v] !== -1) next[prev[v]] = next[v];
    else head[deg[v]] = next[v];
    if (next[v] !== -1) prev[next[v]] = prev[v];
  };
  for (let v = 0; v < n; v++) insert(v, Math.min(adj[v].length, n));
  const mark = new Int32Array(n).fill(-1);
  let minDeg = 0;
  for (let k = 0; k < n; k++) {
    while (head[minDeg] === -1) minDeg++;
    const v = head[minDeg];
    remove(v);
    order[k] = v;
    eliminated[v] = 1;
    const nb = adj[v];
    adj[v] = [];
    // each neighbour u: adj[u] ← (adj[u] ∪ nb) \ {u, v}
    for (let a = 0; a < nb.length; a++) {
      const u = nb[a];
      const au = adj[u];
      const stamp = k * 2 + 1; // unique per (k) pass; mark[x] === stamp means "already in adj[u]"
      let w = 0;
      for (let q = 0; q < au.length; q++) {
        const x = au[q];
        if (x === v || eliminated[x]) continue;
        au[w++] = x;
        mark[x] = stamp;
      }
      au.length = w;
      mark[u] = stamp;
      for (let b = 0; b < nb.length; b++) {
        const x = nb[b];
        if (mark[x] !== stamp) {
          au.push(x);
          mark[x] = stamp;
        }
      }
      // reset marks for the next neighbour (stamp is reused within this pass)
      for (let q = 0; q < au.length; q++) mark[au[q]] = -1;
      mark[u] = -1;
      remove(u);
      insert(u, au.length);
      if (au.length < minDeg) minDeg = au.length;
    }
  }
  return order;
}

/** Above this many multiply–adds, the factorisation uses scatter/gather instead of a static schedule (memory bound). */
const SCHEDULE_MAX_OPS = 4_000_000;

/**
 * Build a sparse LU workspace for the n×n CSR pattern (rowPtr, colIdx).
 * The diagonal need not be present in the pattern; it is added internally.
 */
export function createSparseLU(n: number, rowPtr: Int32Array, colIdx: Int32Array): SparseLU {
  // 1. symmetrised adjacency (deduplicated) and ordering
  const adjL: number[][] = [];
  for (let i = 0; i < n; i++) adjL.push([]);
  for (let i = 0; i < n; i++) {
    for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) {
      const j = colIdx[p];
      if (j !== i) {
        adjL[i].push(j);
        adjL[j].push(i);
      }
    }
  }
  const seen = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    const a = adjL[i];
    let w = 0;
    for (let q = 0; q < a.length; q++) if (seen[a[q]] !== i) ((seen[a[q]] = i), (a[w++] = a[q]));
    a.length = w;
  }
  const perm = minimumDegreeOrder(n, adjL); // perm[newIndex] = old index
  const iperm = new Int32Array(n);
  for (let k = 0; k < n; k++) iperm[perm[k]] = k;

  // permuted symmetric adjacency, lower part per row
  const lowerRows: number[][] = [];
  for (let i = 0; i < n; i++) lowerRows.push([]);
  for (let oi = 0; oi < n; oi++) {
    const i = iperm[oi];
    for (const oj of adjL[oi]) {
      const j = iperm[oj];
      if (j < i) lowerRows[i].push(j);
    }
  }

  // 2. elimination tree
  const parent = new Int32Array(n).fill(-1);
  const ancestor = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    for (const k of lowerRows[i]) {
      let j = k;
      while (ancestor[j] !== -1 && ancestor[j] !== i) {
        const nx = ancestor[j];
        ancestor[j] = i;
        j = nx;
      }
      if (ancestor[j] === -1) {
        ancestor[j] = i;
        parent[j] = i;
      }
    }
  }
  // row patterns of L (strictly lower)
  const mark = new Int32Array(n).fill(-1);
  const lRows: number[][] = [];
  for (let i = 0; i < n; i++) {
    mark[i] = i;
    const row: number[] = [];
    for (const k of lowerRows[i]) {
      let j = k;
      while (j !== -1 && mark[j] !== i) {
        row.push(j);
        mark[j] = i;
        j = parent[j];
      }
    }
    row.sort((a, b) => a - b);
    lRows.push(row);
  }
  // U rows = transpose of L pattern
  const uRows: number[][] = [];
  for (let i = 0; i < n; i++) uRows.push([]);
  for (let i = 0; i < n; i++) for (const j of lRows[i]) uRows[j].push(i);
  // combined row storage: L part, diagonal, U part (sorted ascending)
  const luPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) luPtr[i + 1] = luPtr[i] + lRows[i].length + 1 + uRows[i].length;
  const nnz = luPtr[n];
  const luCol = new Int32Array(nnz);
  const diag = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let p = luPtr[i];
    for (const j of lRows[i]) luCol[p++] = j;
    diag[i] = p;
    luCol[p++] = i;
    for (const j of uRows[i]) luCol[p++] = j; // already ascending (i loops ascending)
  }
  // map from input CSR value index to LU position
  const where = new Int32Array(n).fill(-1);
  const aMap = new Int32Array(rowPtr[n]);
  for (let oi = 0; oi < n; oi++) {
    const i = iperm[oi];
    for (let p = luPtr[i]; p < luPtr[i + 1]; p++) where[luCol[p]] = p;
    for (let q = rowPtr[oi]; q < rowPtr[oi + 1]; q++) aMap[q] = where[iperm[colIdx[q]]];
    for (let p = luPtr[i]; p < luPtr[i + 1]; p++) where[luCol[p]] = -1;
  }
  // operation count: each L entry (i, k) updates the U part of row k into row i
  let flops = 0;
  for (let i = 0; i < n; i++) for (let p = luPtr[i]; p < diag[i]; p++) flops += luPtr[luCol[p] + 1] - diag[luCol[p]] - 1;
  // static schedule: for L entry p, targets sched[schedPtr[p] ...] in row order of U row k
  const sched: Int32Array | null = flops <= SCHEDULE_MAX_OPS ? new Int32Array(flops) : null;
  const schedPtr: Int32Array | null = sched ? new Int32Array(nnz + 1) : null;
  if (sched && schedPtr) {
    let m = 0;
    for (let i = 0; i < n; i++) {
      for (let p = luPtr[i]; p < luPtr[i + 1]; p++) where[luCol[p]] = p;
      for (let p = luPtr[i]; p < luPtr[i + 1]; p++) {
        schedPtr[p] = m;
        if (p < diag[i]) {
          const k = luCol[p];
          for (let q = diag[k] + 1; q < luPtr[k + 1]; q++) sched[m++] = where[luCol[q]];
        }
      }
      for (let p = luPtr[i]; p < luPtr[i + 1]; p++) where[luCol[p]] = -1;
    }
    schedPtr[nnz] = m;
  }

  // Column indices of L+U mapped back to original numbering, so the triangular solves work in
  // place on b (row i of the permuted factors is original row perm[i]) with no gather/scatter.
  const luColOrig = new Int32Array(nnz);
  for (let p = 0; p < nnz; p++) luColOrig[p] = perm[luCol[p]];
  const aRow = new Int32Array(rowPtr[n]);
  for (let oi = 0; oi < n; oi++) for (let q = rowPtr[oi]; q < rowPtr[oi + 1]; q++) aRow[q] = iperm[oi];
  const nnzA = rowPtr[n];

  // 3. numeric phase in WebAssembly (solver/wasm/sparse-lu-kernels.wat): every array in one
  // memory of this factorisation's own, so the kernels run at the same speed however many
  // factorisations a process holds.
  const mem = new WasmArena();
  const val = mem.f64(nnz);
  const invDiag = mem.f64(n);
  const rowMaxA = mem.f64(n);
  const rhsBuf = mem.f64(n);
  const inBuf = mem.f64(nnzA);
  const luPtrW = mem.i32From(luPtr);
  const luColW = mem.i32From(luCol);
  const colOrigW = mem.i32From(luColOrig);
  const diagW = mem.i32From(diag);
  const permW = mem.i32From(perm);
  const aMapW = mem.i32From(aMap);
  const aRowW = mem.i32From(aRow);
  const schedW = sched ? mem.i32From(sched) : 0;
  const schedPtrW = schedPtr ? mem.i32From(schedPtr) : 0;
  const whereW = sched ? 0 : mem.i32From(where); // every entry is back at −1 after the symbolic phase
  const kern = mem.instantiate();
  const values64 = new Float64Array(mem.buffer, inBuf, nnzA);
  const rhs64 = new Float64Array(mem.buffer, rhsBuf, n);

  function factorShifted(values: Float64Array, shift: number, scale: number): boolean {
    values64.set(values.length === nnzA ? values : values.subarray(0, nnzA));
    kern.load(n, nnz, nnzA, shift, scale, val, inBuf, aMapW, aRowW, diagW, rowMaxA);
    const ok = sched
      ? kern.eliminateScheduled(n, val, luPtrW, luColW, diagW, invDiag, rowMaxA, schedW, schedPtrW)
      : kern.eliminateScatter(n, val, luPtrW, luColW, diagW, invDiag, whereW);
    return ok === 1;
  }

  function factor(values: Float64Array): boolean {
    return factorShifted(values, 0, 1);
  }

  function solve(b: Float64Array): void {
    rhs64.set(b.length === n ? b : b.subarray(0, n));
    kern.solve(n, val, luPtrW, colOrigW, diagW, permW, invDiag, rhsBuf);
    b.set(rhs64);
  }

  return { n, nnzLU: nnz, flops, factor, factorShifted, solve };
}
