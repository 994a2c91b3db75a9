/**
 * Layout of the mechanism graph (species nodes and one node per elementary step), as a pure
 * function of the mechanism document: no React, no DOM, so it is tested on its own.
 *
 * - Catalytic cycles stay cycles: the directed species/step graph (reactant → step → product,
 *   forward direction only, so a reversible step alone is not a cycle) is split into strongly
 *   connected components (Tarjan's algorithm, common practice); each component of two or more
 *   nodes (a species regenerated through a sequence of steps, such as a catalyst) is placed on a
 *   ring, in the order a depth-first walk along its edges meets them. Components of more than
 *   MAX_RING nodes are left to dagre (a ring that large would not be legible).
 * - Everything else is placed by dagre (left to right), with each ring standing in as one node of
 *   the ring's size, so no node box overlaps another: dagre keeps its nodes apart, each ring's
 *   nodes lie inside its stand-in, and on a ring adjacent centres are at least the largest box
 *   diagonal plus a gap apart (a larger chord for any other pair).
 * - Species that no step uses are left out of the graph and listed in `orphans`.
 * - Node boxes are sized from their text (12 px type): the graph component draws each node at
 *   exactly this size, so the layout's boxes are the boxes on screen.
 *
 * Units: CSS pixels at zoom 1; positions are the top-left corners of the boxes.
 */
import dagre from "@dagrejs/dagre";
import type { MechanismDocument } from "../../../solver/exchange-format";

export type Positions = Record<string, { x: number; y: number }>;

export interface LayoutNode {
  /** "s:<species id>" or "r:<step id>". */
  id: string;
  kind: "species" | "step";
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface Ring {
  /** Node ids in ring order. */
  members: string[];
  center: { x: number; y: number };
  radius: number;
}

export interface GraphLayout {
  nodes: LayoutNode[];
  rings: Ring[];
  /** Ids of species that no step uses (not drawn). */
  orphans: string[];
}

/** The smallest on-screen text of the graph at the default zoom, px. */
export const GRAPH_FONT_PX = 12;
/** Largest cycle kept as a ring. */
export const MAX_RING = 24;
const CHAR_PX = 7.2; // width of an average 12 px Noto Sans character, semibold (measured on screen, rounded up)
const RING_GAP = 18;

/** Box of a species node: one line of its label. */
export function speciesBox(label: string): { width: number; height: number } {
  return { width: Math.round(Math.min(220, Math.max(64, label.length * CHAR_PX + 30))), height: 32 };
}

/** Box of a step node: its label (at most two lines), then ΔG‡ and k lines. */
export function stepBox(label: string): { width: number; height: number } {
  const width = Math.round(Math.min(240, Math.max(170, label.length * CHAR_PX + 20)));
  const lines = Math.min(2, Math.max(1, Math.ceil((label.length * CHAR_PX) / (width - 20))));
  return { width, height: 16 * lines + 2 * 16 + 12 };
}

interface Graph {
  ids: string[];
  out: Map<string, string[]>;
}

function directedGraph(doc: MechanismDocument): Graph {
  const out = new Map<string, string[]>();
  const ids: string[] = [];
  const add = (id: string) => {
    if (!out.has(id)) (out.set(id, []), ids.push(id));
  };
  for (const st of doc.steps) {
    const r = `r:${st.id}`;
    add(r);
    for (const t of st.reactants) (add(`s:${t.species}`), out.get(`s:${t.species}`)!.push(r));
    for (const t of st.products) (add(`s:${t.species}`), out.get(r)!.push(`s:${t.species}`));
  }
  return { ids, out };
}

/** Strongly connected components with at least two nodes, each in depth-first order along its edges. */
export function findCycles(doc: MechanismDocument): string[][] {
  const g = directedGraph(doc);
  // Tarjan's algorithm, iterative (a long chain must not overflow the call stack).
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const onStack = new Set<string>();
  const stack: string[] = [];
  const comps: string[][] = [];
  let next = 0;
  for (const root of g.ids) {
    if (index.has(root)) continue;
    const work: Array<{ v: string; i: number }> = [{ v: root, i: 0 }];
    index.set(root, next), low.set(root, next++), stack.push(root), onStack.add(root);
    while (work.length) {
      const top = work[work.length - 1];
      const edges = g.out.get(top.v)!;
      if (top.i < edges.length) {
        const w = edges[top.i++];
        if (!index.has(w)) {
          index.set(w, next), low.set(w, next++), stack.push(w), onStack.add(w);
          work.push({ v: w, i: 0 });
        } else if (onStack.has(w)) low.set(top.v, Math.min(low.get(top.v)!, index.get(w)!));
        continue;
      }
      work.pop();
      if (work.length) low.set(work[work.length - 1].v, Math.min(low.get(work[work.length - 1].v)!, low.get(top.v)!));
      if (low.get(top.v) === index.get(top.v)) {
        const comp: string[] = [];
        let w: string;
        do {
          w = stack.pop()!;
          onStack.delete(w);
          comp.push(w);
        } while (w !== top.v);
        if (comp.length > 1) comps.push(comp);
      }
    }
  }
  // Ring order: a depth-first walk inside the component from its first species in document order.
  const order = new Map(g.ids.map((id, i) => [id, i]));
  return comps.map((comp) => {
    const inComp = new Set(comp);
    const start = comp.filter((id) => id.startsWith("s:")).sort((a, b) => order.get(a)! - order.get(b)!)[0] ?? comp[0];
    const seen = new Set<string>();
    const walk: string[] = [];
    const visit = [start];
    while (visit.length) {
      const v = visit.pop()!;
      if (seen.has(v)) continue;
      seen.add(v);
      walk.push(v);
      const nexts = g.out.get(v)!.filter((w) => inComp.has(w) && !seen.has(w));
      for (let i = nexts.length - 1; i >= 0; i--) visit.push(nexts[i]);
    }
    return walk;
  });
}

/** Species ids that no step of the document uses. */
export function orphanSpecies(doc: MechanismDocument): string[] {
  const used = new Set(doc.steps.flatMap((st) => [...st.reactants, ...st.products].map((t) => t.species)));
  return doc.species.filter((s) => !used.has(s.id)).map((s) => s.id);
}

/**
 * Lays out the graph: rings for catalytic cycles, dagre for the rest. Nodes with a position in
 * `saved` (arranged by hand and stored with the mechanism) keep it.
 */
export function layoutGraph(doc: MechanismDocument, label: { species: (id: string) => string; step: (id: string) => string }, saved: Positions = {}): GraphLayout {
  const orphans = orphanSpecies(doc);
  const orphanSet = new Set(orphans);
  const boxes = new Map<string, LayoutNode>();
  for (const s of doc.species) if (!orphanSet.has(s.id)) boxes.set(`s:${s.id}`, { id: `s:${s.id}`, kind: "species", x: 0, y: 0, ...speciesBox(label.species(s.id)) });
  for (const st of doc.steps) boxes.set(`r:${st.id}`, { id: `r:${st.id}`, kind: "step", x: 0, y: 0, ...stepBox(label.step(st.id)) });

  const cycles = findCycles(doc).filter((c) => c.length <= MAX_RING);
  const ringOf = new Map<string, number>();
  const ringSize = cycles.map((members, i) => {
    members.forEach((m) => ringOf.set(m, i));
    const maxDiag = Math.max(...members.map((m) => Math.hypot(boxes.get(m)!.width, boxes.get(m)!.height)));
    const radius = (maxDiag + RING_GAP) / (2 * Math.sin(Math.PI / members.length));
    const maxW = Math.max(...members.map((m) => boxes.get(m)!.width));
    const maxH = Math.max(...members.map((m) => boxes.get(m)!.height));
    return { radius, width: 2 * radius + maxW, height: 2 * radius + maxH };
  });

  const g = new dagre.graphlib.Graph();
  g.setGraph({ rankdir: "LR", nodesep: 28, ranksep: 70, marginx: 10, marginy: 10 });
  g.setDefaultEdgeLabel(() => ({}));
  const dagreId = (id: string) => (ringOf.has(id) ? `ring:${ringOf.get(id)}` : id);
  ringSize.forEach((r, i) => g.setNode(`ring:${i}`, { width: r.width, height: r.height }));
  for (const [id, b] of boxes) if (!ringOf.has(id)) g.setNode(id, { width: b.width, height: b.height });
  for (const st of doc.steps) {
    const r = dagreId(`r:${st.id}`);
    for (const t of st.reactants) if (dagreId(`s:${t.species}`) !== r) g.setEdge(dagreId(`s:${t.species}`), r);
    for (const t of st.products) if (dagreId(`s:${t.species}`) !== r) g.setEdge(r, dagreId(`s:${t.species}`));
  }
  dagre.layout(g);

  const rings: Ring[] = cycles.map((members, i) => {
    const c = g.node(`ring:${i}`);
    const { radius } = ringSize[i];
    members.forEach((m, k) => {
      // Clockwise from the left (where the flow comes in), evenly spaced.
      const angle = Math.PI + (2 * Math.PI * k) / members.length;
      const b = boxes.get(m)!;
      b.x = c.x + radius * Math.cos(angle) - b.width / 2;
      b.y = c.y - radius * Math.sin(angle) - b.height / 2;
    });
    return { members, center: { x: c.x, y: c.y }, radius };
  });
  for (const [id, b] of boxes) {
    if (!ringOf.has(id)) {
      const n = g.node(id);
      b.x = n.x - b.width / 2;
      b.y = n.y - b.height / 2;
    }
    const keep = saved[id];
    if (keep) (b.x = keep.x), (b.y = keep.y);
  }
  return { nodes: [...boxes.values()], rings, orphans };
}
