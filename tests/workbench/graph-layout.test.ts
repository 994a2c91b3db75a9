// The mechanism graph's layout as a pure function: catalytic cycles on rings, no two node boxes
// overlapping, species that no step uses left out. The geometry checked: boxes are disjoint when
// they are separated along x or along y (axis-aligned rectangles); ring members all lie at the
// ring's radius from its centre and are evenly spaced (common practice for drawing cycles).
import { describe, expect, it } from "vitest";
import { findCycles, layoutGraph, orphanSpecies, speciesBox, stepBox, type LayoutNode } from "../../app/components/workbench/graph-layout";
import { namesOf } from "../../app/components/names";
import type { MechanismDocument } from "../../solver/exchange-format";

const barrier = { form: "dG", dG: 70, unit: "kJ/mol", T: 298.15, standardState: "1M" } as const;
const step = (id: string, r: string[], p: string[], label?: string) => ({
  id,
  ...(label ? { label } : {}),
  reactants: r.map((species) => ({ species, coef: 1 })),
  products: p.map((species) => ({ species, coef: 1 })),
  reversible: false,
  barrier,
});

/** A catalytic acylation: Cat + Ac2O → IP; IP + ROH → Cat + ester; IP + H2O → Cat + AcOH; background ROH + Ac2O → ester + AcOH; Cat + AcOH → CatH (sink). */
function catalytic(extraSpecies: string[] = []): MechanismDocument {
  const ids = ["Cat", "Ac2O", "IP", "ROH", "ester", "H2O", "AcOH", "CatH", ...extraSpecies];
  return {
    format: "saddlebook.mechanism",
    version: 1,
    about: { name: "Catalytic cycle (test)" },
    species: ids.map((id) => ({ id, label: id === "Cat" ? "Cat-7 (illustrative aminopyridine catalyst)" : id })),
    steps: [
      step("form", ["Cat", "Ac2O"], ["IP"], "Catalyst acetylation (ion pair formation)"),
      step("transfer", ["IP", "ROH"], ["Cat", "ester"], "Acyl transfer to the alcohol"),
      step("hydrolysis", ["IP", "H2O"], ["Cat", "AcOH"]),
      step("background", ["ROH", "Ac2O"], ["ester", "AcOH"], "Uncatalysed acetylation"),
      step("salt", ["Cat", "AcOH"], ["CatH"], "Catalyst sequestration"),
    ],
  } as MechanismDocument;
}

function disjoint(a: LayoutNode, b: LayoutNode): boolean {
  return a.x + a.width <= b.x || b.x + b.width <= a.x || a.y + a.height <= b.y || b.y + b.height <= a.y;
}
function expectNoOverlap(nodes: LayoutNode[]) {
  for (let i = 0; i < nodes.length; i++)
    for (let j = i + 1; j < nodes.length; j++) expect(disjoint(nodes[i], nodes[j]), `${nodes[i].id} overlaps ${nodes[j].id}`).toBe(true);
}
const layout = (doc: MechanismDocument) => layoutGraph(doc, namesOf(doc));

describe("cycles", () => {
  it("finds the catalyst's cycle: Cat → form → IP → transfer/hydrolysis → Cat, and nothing else", () => {
    const cycles = findCycles(catalytic());
    expect(cycles).toHaveLength(1);
    expect(new Set(cycles[0])).toEqual(new Set(["s:Cat", "r:form", "s:IP", "r:transfer", "r:hydrolysis"]));
    // Ring order follows the edges: catalyst, its acetylation, the ion pair, then the steps back.
    expect(cycles[0].slice(0, 3)).toEqual(["s:Cat", "r:form", "s:IP"]);
  });

  it("a chain and a reversible step alone are not cycles", () => {
    const doc = catalytic();
    doc.steps = [step("a", ["ROH"], ["ester"]), { ...step("b", ["ester"], ["AcOH"]), reversible: true }] as MechanismDocument["steps"];
    expect(findCycles(doc)).toEqual([]);
  });
});

describe("layout", () => {
  it("places the cycle's nodes on a ring, evenly spaced, and no node box overlaps another", () => {
    const l = layout(catalytic());
    expect(l.rings).toHaveLength(1);
    const ring = l.rings[0];
    const byId = new Map(l.nodes.map((n) => [n.id, n]));
    const angles: number[] = [];
    for (const m of ring.members) {
      const n = byId.get(m)!;
      const cx = n.x + n.width / 2, cy = n.y + n.height / 2;
      expect(Math.hypot(cx - ring.center.x, cy - ring.center.y)).toBeCloseTo(ring.radius, 6);
      angles.push(Math.atan2(cy - ring.center.y, cx - ring.center.x));
    }
    const sorted = angles.map((a) => (a + 2 * Math.PI) % (2 * Math.PI)).sort((a, b) => a - b);
    const gaps = sorted.map((a, i) => (i ? a - sorted[i - 1] : a + 2 * Math.PI - sorted[sorted.length - 1]));
    for (const g of gaps) expect(g).toBeCloseTo((2 * Math.PI) / ring.members.length, 6);
    expectNoOverlap(l.nodes);
    // Every species a step uses and every step is drawn once.
    expect(l.nodes.map((n) => n.id).sort()).toEqual([..."Cat Ac2O IP ROH ester H2O AcOH CatH".split(" ").map((s) => `s:${s}`), ..."form transfer hydrolysis background salt".split(" ").map((s) => `r:${s}`)].sort());
  });

  it("keeps boxes apart in a larger network with two cycles and long labels", () => {
    const doc = catalytic(["Cu", "CuL", "L"]);
    doc.steps.push(
      step("bind", ["Cu", "L"], ["CuL"], "Ligand binding to the copper centre with a rather long label to wrap"),
      step("release", ["CuL", "ROH"], ["Cu", "L", "ester"]) as never,
    );
    for (let i = 0; i < 12; i++) doc.steps.push(step(`side${i}`, ["ester"], [i % 2 ? "AcOH" : "H2O"]) as never);
    const l = layout(doc);
    expect(l.rings).toHaveLength(2);
    expectNoOverlap(l.nodes);
  });

  it("leaves out species no step uses, and lists them", () => {
    const doc = catalytic(["toluene", "internal standard"]);
    expect(orphanSpecies(doc)).toEqual(["toluene", "internal standard"]);
    const l = layout(doc);
    expect(l.orphans).toEqual(["toluene", "internal standard"]);
    expect(l.nodes.some((n) => n.id === "s:toluene")).toBe(false);
  });

  it("keeps positions arranged by hand", () => {
    const doc = catalytic();
    const l = layoutGraph(doc, namesOf(doc), { "s:Ac2O": { x: -500, y: 40 } });
    expect(l.nodes.find((n) => n.id === "s:Ac2O")).toMatchObject({ x: -500, y: 40 });
  });

  it("sizes boxes from their text: longer labels get wider boxes, within bounds", () => {
    expect(speciesBox("A").width).toBeLessThan(speciesBox("acetic anhydride").width);
    expect(speciesBox("x".repeat(200)).width).toBe(220);
    expect(stepBox("x".repeat(200)).width).toBe(240);
    expect(stepBox("x".repeat(200)).height).toBeGreaterThan(stepBox("short").height);
  });
});
