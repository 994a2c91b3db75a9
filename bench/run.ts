/**
 * Benchmark dispatcher: `npm run bench` runs every suite; `npm run bench -- engine web` runs the
 * named ones. A suite is any module bench/<name>-cases.ts exporting `suite: BenchSuite`
 * (bench/types.ts), so new suites need no change here. Prints one JSON line per case, then a
 * table.
 */
import { readdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import type { BenchCase, BenchSuite } from "./types.ts";

const here = dirname(fileURLToPath(import.meta.url));

async function loadSuites(): Promise<BenchSuite[]> {
  const files = readdirSync(here)
    .filter((f) => f.endsWith("-cases.ts"))
    .sort();
  const suites: BenchSuite[] = [];
  for (const f of files) {
    const mod = (await import(pathToFileURL(join(here, f)).href)) as { suite?: BenchSuite };
    if (mod.suite && typeof mod.suite.run === "function") suites.push(mod.suite);
  }
  return suites;
}

function fmt(v: number | undefined, digits = 3): string {
  if (v === undefined || !Number.isFinite(v)) return "–";
  return Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-2 && v !== 0) ? v.toExponential(digits - 1) : v.toPrecision(digits);
}

function table(rows: BenchCase[]): string {
  const head = ["case", "ours ms", "steps", "max rel err", "RODAS4 ms", "RODAS4 err", "scipy ms", "scipy method", "scipy/ours"];
  const body = rows.map((c) => [
    c.name,
    fmt(c.wallMsMedian),
    c.steps === undefined ? "–" : String(c.steps),
    fmt(c.maxRelError, 2),
    fmt(c.rodas4Ms),
    fmt(c.rodas4Error, 2),
    fmt(c.scipyFastestMs),
    c.scipyFastestMethod ?? "–",
    fmt(c.speedup),
  ]);
  const w = head.map((h, i) => Math.max(h.length, ...body.map((r) => r[i].length)));
  const line = (r: string[]) => r.map((x, i) => (i === 0 ? x.padEnd(w[i]) : x.padStart(w[i]))).join("  ");
  return [line(head), w.map((n) => "-".repeat(n)).join("  "), ...body.map(line)].join("\n");
}

async function main(): Promise<void> {
  const wanted = process.argv.slice(2).filter((a) => !a.startsWith("-"));
  const suites = await loadSuites();
  const known = suites.map((s) => s.name);
  const unknown = wanted.filter((w) => !known.includes(w));
  if (unknown.length > 0) {
    console.error(`Unknown bench suite(s): ${unknown.join(", ")}. Known: ${known.join(", ")}.`);
    process.exitCode = 2;
    return;
  }
  const chosen = wanted.length === 0 ? suites : suites.filter((s) => wanted.includes(s.name));
  const all: BenchCase[] = [];
  for (const s of chosen) {
    const cases = await s.run();
    for (const c of cases) {
      console.log(JSON.stringify({ suite: s.name, ...c }));
      all.push(c);
    }
  }
  console.log("");
  console.log(table(all));
}

await main();
