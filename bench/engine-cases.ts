/**
 * Engine benchmark cases: Robertson to t = 1e11, HIRES to t = 321.8122 (RODAS4), seeded stiff
 * mass-action networks (N = 50, 200, 1000) through simulate() (whose "auto" choice runs them with
 * the BDF integrator, solver/bdf.ts; each is also run with RODAS4 at the same tolerances, and the
 * error and time of both are printed side by side: the automatic choice must be no less
 * accurate than RODAS4), and the rate-constant batch.
 * Tolerances rtol 1e-6 throughout; atol per problem (stated below). When python3 with scipy is
 * available, bench/scipy_compare.py runs solve_ivp (BDF, Radau, LSODA, analytic Jacobians,
 * sparse for the networks) on the same problems and tolerances.
 *
 * References: Robertson and HIRES from the Bari IVP test set (Mazzia & Magherini), values in
 * tests/solver/reference-problems.ts (shared with the integrator tests); networks: our own
 * RODAS4 at rtol 1e-11, atol 1e-20 (a different method from the one timed), computed once and
 * cached in bench/results/ (a self-convergence reference; the scipy script reports its error
 * against the same reference, which cross-checks it).
 *
 * Timing: wall-clock median after warm-up (steady state, as in the long-lived server or browser
 * tab); the first (cold, JIT-compiling) run and the median CPU time are reported beside it.
 */
import { execFileSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { compileMechanism } from "../solver/model.ts";
import { integrateStiff } from "../solver/rosenbrock.ts";
import { simulate } from "../solver/simulate.ts";
import { benchRates } from "./rates.bench.ts";
import { NETWORK_GENERATOR_VERSION, networkToJson, stiffNetwork } from "./stiff-network.ts";
import { HIRES_REF, ROBERTSON_REF_1E11 as ROBER_REF, hires, robertson } from "../tests/solver/reference-problems.ts";
import type { BenchCase, BenchSuite } from "./types.ts";

const RTOL = 1e-6;
/** Per-run wall budget of the network cases, ms: a case that needs more is reported as not finished. */
const NETWORK_BUDGET_MS = 30_000;
const SCIPY_TIMEOUT_MS = 240_000;

function maxRelError(y: ArrayLike<number>, ref: ArrayLike<number>, atol: number): number {
  let m = 0;
  for (let i = 0; i < ref.length; i++) {
    if (Math.abs(ref[i]) <= atol) continue;
    const e = Math.abs(y[i] - ref[i]) / Math.abs(ref[i]);
    if (e > m) m = e;
  }
  return m;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

/**
 * Times `fn`: one cold call (first use in this process: includes JIT compilation), then warm-up
 * calls until at least `warmCalls` calls and `warmMs` ms have passed (steady state, as a long-lived
 * server or browser tab runs it), then `runs` timed calls. Returns the median wall ms, the median
 * CPU ms of this process (less sensitive to other load on the machine), the cold ms and the last value.
 */
function timeIt<T>(fn: () => T, runs: number, warmCalls = 50, warmMs = 1000): { ms: number; cpuMs: number; coldMs: number; value: T } {
  const c0 = performance.now();
  let value = fn();
  const coldMs = performance.now() - c0;
  let calls = 1;
  while (calls < warmCalls || performance.now() - c0 < warmMs) {
    value = fn();
    calls++;
    if (calls > 10_000) break;
  }
  const ts: number[] = [];
  const cs: number[] = [];
  for (let r = 0; r < runs; r++) {
    const cu = process.cpuUsage();
    const t0 = performance.now();
    value = fn();
    ts.push(performance.now() - t0);
    const d = process.cpuUsage(cu);
    cs.push((d.user + d.system) / 1000);
  }
  return { ms: median(ts), cpuMs: median(cs), coldMs, value };
}

/**
 * Reference solution of a generated network: computed once with our RODAS4 at rtol 1e-11,
 * atol 1e-20 and cached in bench/results/ (not committed) under a key made of N, the seed, the
 * generator version and a hash of the problem, so a changed generator never reuses a stale file.
 * The scipy runs report their own error against the same reference (a cross-check).
 */
function networkReference(key: string, compute: () => number[] | null): { y: number[] | null; source: string } {
  const dir = join(dirname(fileURLToPath(import.meta.url)), "results");
  const file = join(dir, `network-reference-${key}.json`);
  if (existsSync(file)) {
    const saved = JSON.parse(readFileSync(file, "utf8")) as { y: number[]; method: string };
    return { y: saved.y, source: `${saved.method} (cached ${file.split("/").slice(-2).join("/")})` };
  }
  console.error(`computing the reference solution ${key} (once; cached in bench/results/) …`);
  const y = compute();
  if (!y) return { y: null, source: "none: the reference run did not finish" };
  mkdirSync(dir, { recursive: true });
  const method = "RODAS4 rtol 1e-11 atol 1e-20";
  writeFileSync(file, JSON.stringify({ key, method, y }));
  return { y, source: method };
}

interface ScipyProblem {
  name: string;
  kind: "robertson" | "hires" | "network";
  tEnd: number;
  y0: number[];
  rtol: number;
  atol: number;
  reference: number[];
  network?: unknown;
}

type ScipyRun = { method: string; ms: number; maxRelError: number; status: string };

/** Runs the scipy script once per problem (each with a time limit); null when python3/scipy is missing. */
function runScipy(problems: ScipyProblem[]): Record<string, ScipyRun[]> | null {
  try {
    execFileSync("python3", ["-c", "import scipy"], { stdio: "ignore" });
  } catch {
    console.error("scipy comparison skipped: python3 with scipy is not available");
    return null;
  }
  const dir = mkdtempSync(join(tmpdir(), "saddlebook-bench-"));
  const script = join(dirname(fileURLToPath(import.meta.url)), "scipy_compare.py");
  const out: Record<string, ScipyRun[]> = {};
  try {
    for (const p of problems) {
      const file = join(dir, "problem.json");
      writeFileSync(file, JSON.stringify([p]));
      try {
        const text = execFileSync("python3", [script, file], { encoding: "utf8", maxBuffer: 1 << 26, stdio: ["ignore", "pipe", "inherit"], timeout: SCIPY_TIMEOUT_MS });
        Object.assign(out, JSON.parse(text));
      } catch (e) {
        console.error(`scipy on "${p.name}" did not finish: ${(e as Error).message.split("\n")[0]}`);
      }
      console.error(`scipy done: ${p.name}`);
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return out;
}

async function run(): Promise<BenchCase[]> {
  const cases: BenchCase[] = [];
  const scipyProblems: ScipyProblem[] = [];

  // Robertson, atol 1e-12 (y₂ falls below it late; error counted on components above atol)
  {
    const atol = 1e-12;
    const r = timeIt(() => integrateStiff(robertson(), 0, [1, 0, 0], 1e11, { rtol: RTOL, atol }), 21);
    if (!r.value.ok) throw new Error(`Robertson failed: ${r.value.error.message}`);
    cases.push({ name: "Robertson to t = 1e11", wallMsMedian: r.ms, runs: 21, steps: r.value.value.stats.accepted, maxRelError: maxRelError(r.value.value.yFinal, ROBER_REF, atol), extra: { rtol: RTOL, atol, cpuMsMedian: r.cpuMs, coldMs: r.coldMs } });
    scipyProblems.push({ name: "Robertson to t = 1e11", kind: "robertson", tEnd: 1e11, y0: [1, 0, 0], rtol: RTOL, atol, reference: ROBER_REF });
  }
  // HIRES, atol 1e-10
  {
    const atol = 1e-10;
    const y0 = [1, 0, 0, 0, 0, 0, 0, 0.0057];
    const r = timeIt(() => integrateStiff(hires(), 0, y0, 321.8122, { rtol: RTOL, atol }), 21);
    if (!r.value.ok) throw new Error(`HIRES failed: ${r.value.error.message}`);
    cases.push({ name: "HIRES to t = 321.8122", wallMsMedian: r.ms, runs: 21, steps: r.value.value.stats.accepted, maxRelError: maxRelError(r.value.value.yFinal, HIRES_REF, atol), extra: { rtol: RTOL, atol, cpuMsMedian: r.cpuMs, coldMs: r.coldMs } });
    scipyProblems.push({ name: "HIRES to t = 321.8122", kind: "hires", tEnd: 321.8122, y0, rtol: RTOL, atol, reference: HIRES_REF });
  }
  // generated networks through the full simulate() path
  for (const N of [50, 200, 1000]) {
    const atol = 1e-12;
    const net = stiffNetwork(N, 1234 + N);
    const compiled = compileMechanism(net.mechanism);
    if (!compiled.ok) throw new Error(compiled.error.message);
    const model = compiled.value;
    const rc = Array.from({ length: model.nReactions }, (_, r) => ({ kf: () => net.kf[r], kr: () => net.kr[r] }));
    const sim = (rtol: number, at: number, budget: number, stiffMethod: "auto" | "rosenbrock" = "auto") =>
      simulate(model, {
        rateConstants: rc,
        temperature: { kind: "isothermal", T: 298.15 },
        initial: net.c0,
        tEnd: net.tEnd,
        grid: { kind: "times", times: [net.tEnd] },
        rtol,
        atol: at,
        conservation: false,
        maxSteps: 1e6,
        maxWallMs: budget,
        stiffMethod,
      });
    const name = `stiff network N = ${N} (${model.nReactions} reversible steps)`;
    const first = sim(RTOL, atol, NETWORK_BUDGET_MS);
    if (!first.ok) {
      cases.push({ name, wallMsMedian: NaN, runs: 0, extra: { status: `not finished: ${first.error.message}` } });
      console.error(`done: ${name} (not finished)`);
      continue;
    }
    const json = networkToJson(net);
    const key = `N${N}-seed${net.seed}-v${NETWORK_GENERATOR_VERSION}-${createHash("sha256").update(json).digest("hex").slice(0, 12)}`;
    const ref = networkReference(key, () => {
      const rr = sim(1e-11, 1e-20, 20 * NETWORK_BUDGET_MS, "rosenbrock");
      return rr.ok ? rr.value.conc.map((c) => c[c.length - 1]) : null;
    });
    const yRef = ref.y;
    const runs = first.value.stats.wallMs > 5000 ? 1 : N >= 1000 ? 5 : 9;
    const r = runs === 1 ? { ms: first.value.stats.wallMs, cpuMs: NaN, coldMs: first.value.stats.wallMs, value: first } : timeIt(() => sim(RTOL, atol, NETWORK_BUDGET_MS), runs, 3, 1000);
    if (!r.value.ok) throw new Error(`network ${N} failed: ${r.value.error.message}`);
    const y = r.value.value.conc.map((c) => c[c.length - 1]);
    // the yardstick: RODAS4 on the same problem and tolerances
    const rod = timeIt(() => sim(RTOL, atol, NETWORK_BUDGET_MS, "rosenbrock"), N >= 1000 ? 3 : 5, 2, 0);
    const yRod = rod.value.ok ? rod.value.value.conc.map((c) => c[c.length - 1]) : null;
    let m0 = 0, m1 = 0;
    for (let i = 0; i < N; i++) ((m0 += net.mass[i] * net.c0[i]), (m1 += net.mass[i] * y[i]));
    cases.push({
      name,
      wallMsMedian: r.ms,
      runs,
      steps: r.value.value.stats.accepted,
      maxRelError: yRef ? maxRelError(y, yRef, atol) : undefined,
      rodas4Ms: yRod ? rod.ms : undefined,
      rodas4Error: yRod && yRef ? maxRelError(yRod, yRef, atol) : undefined,
      extra: {
        rtol: RTOL,
        atol,
        // the integrator that produced the result ("bdf", or "rosenbrock" after a fallback)
        method: r.value.value.method ?? "?",
        cpuMsMedian: r.cpuMs,
        firstRunMs: first.value.stats.wallMs,
        massDrift: Math.abs(m1 - m0) / m0,
        rejected: r.value.value.stats.rejected,
        jacobianNonzeros: model.jacobianPattern.colIdx.length,
        reference: ref.source,
      },
    });
    if (yRef) scipyProblems.push({ name, kind: "network", tEnd: net.tEnd, y0: Array.from(net.c0), rtol: RTOL, atol, reference: yRef, network: JSON.parse(json) });
    console.error(`done: ${name}`);
  }
  // rate constants
  cases.push(...(await benchRates()));

  if (!process.argv.includes("--no-scipy")) {
    const sc = runScipy(scipyProblems);
    if (sc) {
      for (const c of cases) {
        const res = sc[c.name];
        if (!res) continue;
        const okRuns = res.filter((x) => x.status === "ok");
        for (const x of res) c.extra = { ...c.extra, [`scipy ${x.method} ms`]: x.ms, [`scipy ${x.method} err`]: x.maxRelError, [`scipy ${x.method} status`]: x.status };
        if (okRuns.length === 0) continue;
        const best = okRuns.reduce((a, b) => (b.ms < a.ms ? b : a));
        c.scipyFastestMs = best.ms;
        c.scipyFastestMethod = best.method;
        c.speedup = best.ms / c.wallMsMedian;
      }
    }
  }
  return cases;
}

export const suite: BenchSuite = { name: "engine", run };
