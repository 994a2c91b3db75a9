/**
 * Workbench benchmarks.
 *  1. A 200-species mechanism from the conditions form to plot-ready series: form draft →
 *     request (zod) → the worker's run task (compile, stiff integration, conversion times, yields,
 *     mass balance) → the stored Float64 block → unpacked series aligned for the plot. This is the
 *     server and data path of "conditions form to drawn plot" without the network and the pool's
 *     thread hand-off; the canvas draw is case 2.
 *  2. uPlot in Chromium (headless, software rendering): 50 species × 5000 points, median time of
 *     one zoom/pan redraw (setScale on x, draw included), and of the first draw.
 * Target (issue): 1 under 2 s; 2 under 50 ms per frame.
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { BenchCase, BenchSuite } from "./types.ts";
import { buildRequest, defaultDraft } from "../app/components/workbench/ConditionsForm.tsx";
import { packResults, runTask, unpackResults } from "../app/compute/run-task.ts";
import { resolveSolver } from "../app/compute/run-request.ts";

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/** 200 species: a branched chain of first- and second-order steps with barriers 60–95 kJ/mol (invented). */
function bigMechanism(nSpecies = 200) {
  const species = Array.from({ length: nSpecies }, (_, i) => ({ id: `S${i}`, formula: "C2H4O" }));
  const steps = [];
  for (let i = 0; i + 1 < nSpecies; i++) {
    const dG = 60 + ((i * 37) % 36);
    const reversible = i % 5 === 0;
    steps.push({
      id: `r${i}`,
      reactants: [{ species: `S${i}`, coef: 1 }],
      products: [{ species: `S${i + 1}`, coef: 1 }],
      reversible,
      barrier: { form: "dG", dG, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      ...(reversible ? { reactionThermo: { form: "dG", dG: -10, unit: "kJ/mol", T: 298.15, standardState: "1M" } } : {}),
    });
    if (i % 10 === 3 && i + 2 < nSpecies) {
      steps.push({
        id: `b${i}`,
        reactants: [{ species: `S${i}`, coef: 1 }, { species: `S${i + 2}`, coef: 1 }],
        products: [{ species: `S${i + 1}`, coef: 1 }, { species: `S${i + 2}`, coef: 1 }],
        reversible: false,
        barrier: { form: "dG", dG: 70, unit: "kJ/mol", T: 298.15, standardState: "1M" },
      });
    }
  }
  return { format: "saddlebook.mechanism", version: 1, about: { name: "bench chain", illustrative: true }, species, steps };
}

function formToSeries(doc: ReturnType<typeof bigMechanism>) {
  const draft = defaultDraft(doc.species.map((s) => s.id));
  draft.endTime = "10";
  draft.endUnit = "h";
  draft.points = "400";
  const req = buildRequest(draft);
  if (!req.ok) throw new Error(JSON.stringify(req.errors));
  const out = runTask({ snapshot: doc, conditions: req.conditions, solver: resolveSolver(req.solver), analysis: { rateControl: false } });
  if (!out.ok) throw new Error(out.message);
  const block = packResults(out.value);
  const back = unpackResults(block, out.value.times.length, out.value.speciesIds.length);
  const series = back.conc.map((c) => Array.from(c));
  return { steps: out.value.statistics.accepted, points: back.times.length, series: series.length };
}

async function plotFrames(): Promise<{ firstDraw: number; frame: number } | null> {
  let chromium;
  try {
    ({ chromium } = await import("playwright-core"));
  } catch {
    return null;
  }
  const exe = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
  try {
    readFileSync(exe);
  } catch {
    return null;
  }
  const req = createRequire(import.meta.url);
  const uplotJs = readFileSync(req.resolve("uplot/dist/uPlot.iife.min.js"), "utf8");
  const uplotCss = readFileSync(req.resolve("uplot/dist/uPlot.min.css"), "utf8");
  const browser = await chromium.launch({ executablePath: exe, args: ["--headless", "--no-sandbox", "--disable-gpu"] });
  try {
    const page = await browser.newPage({ viewport: { width: 1200, height: 700 } });
    await page.setContent(`<html><head><style>${uplotCss}</style></head><body><div id="p"></div></body></html>`);
    await page.addScriptTag({ content: uplotJs });
    return await page.evaluate(async () => {
      const N = 5000, S = 50;
      const x = Array.from({ length: N }, (_, k) => (k + 1) * 2);
      const data: number[][] = [x];
      for (let s = 0; s < S; s++) data.push(x.map((t) => 0.1 * Math.exp(-t / (500 + 300 * s)) + 0.001 * s));
      const U = (window as unknown as { uPlot: any }).uPlot;
      const t0 = performance.now();
      const u = new U(
        { width: 1100, height: 500, scales: { x: { time: false } }, series: [{}, ...Array.from({ length: S }, (_, s) => ({ stroke: `hsl(${s * 7},60%,40%)`, width: 1 }))], cursor: { drag: { x: true, y: true } } },
        data,
        document.getElementById("p"),
      );
      const firstDraw = performance.now() - t0;
      const frames: number[] = [];
      for (let i = 0; i < 40; i++) {
        const lo = 200 + i * 50, hi = lo + 4000 - i * 40;
        const a = performance.now();
        u.batch(() => u.setScale("x", { min: lo, max: hi }));
        frames.push(performance.now() - a);
        await new Promise((r) => requestAnimationFrame(() => r(null)));
      }
      frames.sort((p, q) => p - q);
      return { firstDraw, frame: frames[Math.floor(frames.length / 2)] };
    });
  } finally {
    await browser.close();
  }
}

export const suite: BenchSuite = {
  name: "workbench",
  async run(): Promise<BenchCase[]> {
    const doc = bigMechanism(200);
    formToSeries(doc); // warm-up (JIT)
    const times: number[] = [];
    let info = { steps: 0, points: 0, series: 0 };
    for (let i = 0; i < 5; i++) {
      const t0 = performance.now();
      info = formToSeries(doc);
      times.push(performance.now() - t0);
    }
    const cases: BenchCase[] = [
      { name: "workbench: 200 species form → plot series", wallMsMedian: median(times), runs: times.length, steps: info.steps, extra: { species: 200, reactions: doc.steps.length, points: info.points, targetMs: 2000 } },
    ];
    const p = await plotFrames();
    if (p) {
      cases.push({ name: "workbench: uPlot 50×5000 first draw", wallMsMedian: p.firstDraw, runs: 1 });
      cases.push({ name: "workbench: uPlot 50×5000 zoom frame", wallMsMedian: p.frame, runs: 40, extra: { targetMs: 50 } });
    }
    return cases;
  },
};
