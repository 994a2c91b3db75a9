/**
 * The mechanism as a graph (@xyflow/react): species nodes, and each elementary step as a node of
 * its own between its reactants and products; edges carry stoichiometric coefficients other than 1;
 * reversible steps are marked ⇌ and their edges arrowed both ways; each step node shows its
 * barrier (ΔG‡ at T, 1 mol/L) and k at T. Layout in ./graph-layout.ts: catalytic cycles on
 * rings, the rest by dagre (left to right), no overlapping boxes, species no step uses left out
 * (listed under the graph by the workbench); each node is drawn at exactly its layout box.
 * The first view fits the graph but never below a zoom at which the 12 px node text would be
 * smaller than 11 px on screen (a large graph then opens partly in view, to be panned).
 * Dragged positions are reported for saving with the mechanism's layout.
 * Only visible elements are rendered and nodes are memoised, so 200-step mechanisms stay fluid.
 */
import { memo, useCallback, useEffect, useMemo, useState } from "react";
import { Background, Controls, Handle, MarkerType, Position, ReactFlow, type Edge, type Node, type NodeProps, type NodeChange, applyNodeChanges } from "@xyflow/react";
import "@xyflow/react/dist/style.css";
import { GRAPH_FONT_PX, layoutGraph, type Positions } from "./graph-layout";
import type { MechanismDocument } from "../../../solver/exchange-format";
import type { StepNumbers } from "./step-rates";
import { num } from "./format";
import { namesOf } from "../names";

export type { Positions };

/** Smallest on-screen text size at the first view, px. */
export const MIN_TEXT_PX = 11;

type SpeciesData = { label: string; formula?: string };
type StepData = { label: string; reversible: boolean; dG: number | null; k: number | null; kUnit: string; selected: boolean };

const SpeciesNode = memo(function SpeciesNode({ data }: NodeProps<Node<SpeciesData>>) {
  return (
    <div className="flex h-full w-full items-center justify-center rounded-full border border-ink-400 bg-white px-3 text-xs font-semibold text-ink-900 shadow-xs" title={data.formula ? `${data.label} (${data.formula})` : data.label} data-testid="species-node">
      <Handle type="target" position={Position.Left} className="!bg-ink-400" />
      <span className="truncate">{data.label}</span>
      <Handle type="source" position={Position.Right} className="!bg-ink-400" />
    </div>
  );
});

const StepNode = memo(function StepNode({ data }: NodeProps<Node<StepData>>) {
  return (
    <div className={`h-full w-full overflow-hidden rounded-md border px-2 py-1 text-xs leading-4 shadow-xs ${data.selected ? "border-copper-600 bg-copper-50" : "border-ink-300 bg-ink-50"}`} data-testid="step-node" title={data.label}>
      <Handle type="target" position={Position.Left} className="!bg-copper-500" />
      <div className="line-clamp-2 font-semibold text-ink-800">
        {data.reversible ? "⇌ " : "→ "}
        {data.label}
      </div>
      <div className="num text-ink-600">ΔG‡ {data.dG === null ? "—" : `${num(data.dG / 1000, 4)} kJ/mol`}</div>
      <div className="num text-ink-600">
        k {num(data.k, 3)} {data.kUnit}
      </div>
      <Handle type="source" position={Position.Right} className="!bg-copper-500" />
    </div>
  );
});

const nodeTypes = { species: SpeciesNode, step: StepNode };

export function MechanismGraph({
  doc,
  numbers,
  saved,
  selected,
  onSelect,
  onPositions,
  height = 520,
}: {
  doc: MechanismDocument;
  numbers: StepNumbers[];
  saved: Positions;
  selected: string | null;
  onSelect: (stepId: string | null) => void;
  onPositions?: (p: Positions) => void;
  height?: number;
}) {
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  const byId = useMemo(() => new Map(numbers.map((n) => [n.id, n])), [numbers]);
  const names = useMemo(() => namesOf(doc), [doc]);
  const layout = useMemo(() => layoutGraph(doc, names, saved), [doc, names, saved]);
  const initial = useMemo(() => Object.fromEntries(layout.nodes.map((n) => [n.id, { x: n.x, y: n.y }])) as Positions, [layout]);
  const sizes = useMemo(() => new Map(layout.nodes.map((n) => [n.id, { width: n.width, height: n.height }])), [layout]);
  const [positions, setPositions] = useState<Positions>(initial);
  useEffect(() => setPositions(initial), [initial]);

  const nodes = useMemo<Node[]>(() => {
    const orphans = new Set(layout.orphans);
    const out: Node[] = doc.species
      .filter((s) => !orphans.has(s.id))
      .map((s) => ({ id: `s:${s.id}`, type: "species", position: positions[`s:${s.id}`] ?? { x: 0, y: 0 }, style: sizes.get(`s:${s.id}`), data: { label: names.species(s.id), formula: s.formula } }));
    for (const st of doc.steps) {
      const n = byId.get(st.id);
      out.push({
        id: `r:${st.id}`,
        type: "step",
        position: positions[`r:${st.id}`] ?? { x: 0, y: 0 },
        style: sizes.get(`r:${st.id}`),
        data: { label: names.step(st.id), reversible: st.reversible, dG: n?.dG ?? null, k: n?.kf ?? null, kUnit: n?.kfUnit ?? "", selected: selected === st.id },
      });
    }
    return out;
  }, [doc, byId, positions, selected, names, layout, sizes]);

  const edges = useMemo<Edge[]>(() => {
    const out: Edge[] = [];
    for (const st of doc.steps) {
      const both = st.reversible ? { markerStart: { type: MarkerType.ArrowClosed, color: "#6f889d" } } : {};
      st.reactants.forEach((t) =>
        out.push({ id: `e:${st.id}:r:${t.species}`, source: `s:${t.species}`, target: `r:${st.id}`, label: t.coef !== 1 ? String(t.coef) : undefined, markerEnd: { type: MarkerType.ArrowClosed, color: "#6f889d" }, style: { stroke: "#6f889d" }, ...both }),
      );
      st.products.forEach((t) =>
        out.push({ id: `e:${st.id}:p:${t.species}`, source: `r:${st.id}`, target: `s:${t.species}`, label: t.coef !== 1 ? String(t.coef) : undefined, markerEnd: { type: MarkerType.ArrowClosed, color: "#a65a2b" }, style: { stroke: "#a65a2b" }, ...both }),
      );
    }
    return out;
  }, [doc]);

  const onNodesChange = useCallback(
    (changes: NodeChange[]) => {
      const moved = applyNodeChanges(changes, nodes);
      const next: Positions = { ...positions };
      let changed = false;
      for (const n of moved) {
        const p = positions[n.id];
        if (!p || p.x !== n.position.x || p.y !== n.position.y) ((next[n.id] = n.position), (changed = true));
      }
      if (changed) setPositions(next);
    },
    [nodes, positions],
  );

  if (!mounted) return <div style={{ height }} className="rounded border border-ink-200 bg-white" />;
  return (
    <div style={{ height }} className="rounded border border-ink-200 bg-white" data-testid="mechanism-graph">
      <ReactFlow
        nodes={nodes}
        edges={edges}
        nodeTypes={nodeTypes}
        onNodesChange={onNodesChange}
        onNodeDragStop={() => onPositions?.(positions)}
        onNodeClick={(_, n) => onSelect(n.id.startsWith("r:") ? n.id.slice(2) : null)}
        onPaneClick={() => onSelect(null)}
        onlyRenderVisibleElements
        fitView
        fitViewOptions={{ minZoom: MIN_TEXT_PX / GRAPH_FONT_PX, maxZoom: 1.5 }}
        minZoom={0.1}
        proOptions={{ hideAttribution: true }}
      >
        <Background gap={20} color="#e3e9ee" />
        <Controls showInteractive={false} />
      </ReactFlow>
    </div>
  );
}
